import { desc, eq, sql } from 'drizzle-orm';

import type { Db, Executor } from '../../../db/client';
import { preparedOn } from '../../../db/prepared';
import { observationRevisions, observations } from '../../../db/schema';
import type { Observation, Revision } from '../../../lib/schemas';
import { notFound } from '../../errors';
import { getObservationDetail } from './detail';
import { getObservation } from './hydrate';
import { namesOf } from './map';

/** The entry as history keeps it: everything but photos and custody, which have their own records. */
function snapshotOf(db: Executor, observation: Observation): Record<string, unknown> {
  const detail = getObservationDetail(db, observation.id, observation)!;
  const { photos: _photos, custody: _custody, ...rest } = detail;
  return rest;
}

// Every column is a placeholder: a default the schema computes would be computed once, when the query is built.
const insertRevision = (db: Executor) =>
  db
    .insert(observationRevisions)
    .values({
      id: sql.placeholder('id'),
      observationId: sql.placeholder('observationId'),
      version: sql.placeholder('version'),
      action: sql.placeholder('action'),
      snapshot: sql.placeholder('snapshot'),
      editedBy: sql.placeholder('editedBy'),
      editedAt: sql.placeholder('editedAt'),
    })
    .prepare();

export function writeRevision(
  db: Executor,
  snapshot: Record<string, unknown> & { id: string },
  version: number,
  action: Revision['action'],
  actorId: string,
  at: Date,
) {
  preparedOn(db, insertRevision).run({
    id: crypto.randomUUID(),
    observationId: snapshot.id,
    version,
    action,
    snapshot,
    editedBy: actorId,
    editedAt: at,
  });
}

/**
 * Bumps an entry's version and records the revision. Every change to an entry or its
 * identification or find goes through here, inside the change's own transaction; it answers the
 * entry as it now stands.
 */
export function recordChange(db: Executor, id: string, actorId: string, action: Revision['action'], at = new Date()): Observation {
  const row = db
    .update(observations)
    .set({ version: sql`${observations.version} + 1`, updatedAt: at })
    .where(eq(observations.id, id))
    .returning({ version: observations.version })
    .get();
  if (!row) throw notFound();
  const observation = getObservation(db, id)!;
  writeRevision(db, { ...snapshotOf(db, observation), id }, row.version, action, actorId, at);
  return observation;
}

export function listRevisions(db: Db, id: string): Revision[] {
  const rows = db
    .select()
    .from(observationRevisions)
    .where(eq(observationRevisions.observationId, id))
    .orderBy(desc(observationRevisions.version))
    .all();
  const names = namesOf(
    db,
    rows.map((r) => r.editedBy),
  );
  return rows.map((r) => ({
    version: r.version,
    action: r.action,
    editedBy: r.editedBy,
    editedByName: names.get(r.editedBy) ?? 'Unknown',
    editedAt: r.editedAt.toISOString(),
    snapshot: r.snapshot as Record<string, unknown>,
  }));
}
