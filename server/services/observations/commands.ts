/**
 * Changing entries: create, edit, retire, restore. Each change, its revision and its live event
 * are one transaction (`live.withEvents`); readers hear of it only once it has committed. Who may
 * change an entry is settled before (the routes check the permission table).
 */
import { and, eq, sql } from 'drizzle-orm';
import type { z } from 'zod';

import type { Db, Executor } from '../../../db/client';
import { preparedOn } from '../../../db/prepared';
import { observations } from '../../../db/schema';
import type { observationCreateSchema, observationUpdateSchema, Observation } from '../../../lib/schemas';
import { ApiError, conflict, notFound } from '../../errors';
import type { LiveHub } from '../live';
import { getObservation, getObservationRow, hydrate } from './hydrate';
import type { Actor, ObservationRow } from './map';
import { recordColumns, writeSizes } from './record-fields';
import { recordChange, writeRevision } from './revisions';
import { stampValues } from './stamp';
import { setTags } from './tags';

export type ObservationCreateInput = z.output<typeof observationCreateSchema>;
export type ObservationUpdateInput = z.output<typeof observationUpdateSchema>;

/** Every column the insert names is a placeholder: a default the schema computes would be computed once, when the query is built. */
const insertObservation = (db: Executor) => {
  const columns = [
    'id',
    'diveId',
    'campaignId',
    'authorId',
    'observedAt',
    'kind',
    'title',
    'note',
    'depth',
    'depthSource',
    'lat',
    'lon',
    'positionSource',
    'temperature',
    'temperatureSource',
    'heading',
    'headingSource',
    'altitude',
    'altitudeSource',
    'individualCount',
    'organismQuantity',
    'organismQuantityType',
    'substrateId',
    'clientRef',
    'createdAt',
    'updatedAt',
  ] as const;
  const values = Object.fromEntries(columns.map((c) => [c, sql.placeholder(c)])) as unknown as typeof observations.$inferInsert;
  return db.insert(observations).values(values).returning().prepare();
};

export function createObservation(
  db: Db,
  live: LiveHub,
  target: { diveId: string; campaignId: string; authorId: string },
  input: ObservationCreateInput,
  now = new Date(),
): { observation: Observation; repeated: boolean } {
  if (input.clientRef) {
    const sent = db
      .select({ id: observations.id })
      .from(observations)
      .where(and(eq(observations.authorId, target.authorId), eq(observations.clientRef, input.clientRef)))
      .get();
    if (sent) return { observation: getObservation(db, sent.id)!, repeated: true };
  }
  const observedAt = input.observedAt ? new Date(input.observedAt) : now;
  const stamped = stampValues(db, target.diveId, observedAt, input);
  const observation = live.withEvents((tx, stage) => {
    const record = recordColumns(tx, target.campaignId, input.kind, input);
    const row = preparedOn(tx, insertObservation).get({
      id: crypto.randomUUID(),
      diveId: target.diveId,
      campaignId: target.campaignId,
      authorId: target.authorId,
      observedAt,
      kind: input.kind,
      title: input.title,
      note: input.note,
      ...stamped,
      individualCount: null,
      organismQuantity: null,
      organismQuantityType: null,
      substrateId: null,
      ...record,
      clientRef: input.clientRef ?? null,
      createdAt: now,
      updatedAt: now,
    });
    setTags(tx, row.id, target.campaignId, input.tags, true);
    writeSizes(tx, row.id, input.sizes);
    const created = hydrate(tx, [row], { fresh: true })[0]!;
    // A new entry has no identification, find, photos or custody yet.
    writeRevision(tx, { ...created, identificationDetail: null, find: null }, 1, 'created', target.authorId, now);
    stage(target.campaignId, target.diveId, 'observation.created', created, now);
    return created;
  });
  return { observation, repeated: false };
}

/**
 * Refuses a write that started from an older state of the entry: every write that bumps the
 * version (edits, identifications, verifications, finds) carries the version its writer saw.
 */
export function assertCurrent(row: ObservationRow, version: number) {
  if (row.retired) throw conflict('retired', 'This entry has been retired. A lead can restore it.');
  if (row.version !== version) {
    throw new ApiError(
      409,
      'stale_version',
      `This entry was changed by someone else (it is at version ${row.version}, your edit started from version ${version}). Nothing was overwritten.`,
    );
  }
}

export function updateObservation(
  db: Db,
  live: LiveHub,
  id: string,
  actor: Actor,
  input: ObservationUpdateInput,
  now = new Date(),
): Observation {
  return live.withEvents((tx, stage) => {
    const row = getObservationRow(tx, id);
    if (!row) throw notFound();
    assertCurrent(row, input.version);
    const observedAt = input.observedAt ? new Date(input.observedAt) : row.observedAt;
    // A value left out keeps what was typed before; a telemetry value is looked up again.
    const keep = (given: number | null | undefined, current: number | null, source: string | null) =>
      given !== undefined ? given : source === 'manual' ? current : null;
    // The telemetry lookup reads through the database's own connection, which this transaction is on.
    const stamped = stampValues(db, row.diveId, observedAt, {
      depth: keep(input.depth, row.depth, row.depthSource),
      lat: keep(input.lat, row.lat, row.positionSource),
      lon: keep(input.lon, row.lon, row.positionSource),
      temperature: keep(input.temperature, row.temperature, row.temperatureSource),
      heading: keep(input.heading, row.heading, row.headingSource),
      altitude: keep(input.altitude, row.altitude, row.altitudeSource),
    });
    const record = recordColumns(tx, row.campaignId, input.kind ?? row.kind, input, row.substrateId);
    tx.update(observations)
      .set({
        observedAt,
        ...record,
        ...(input.kind ? { kind: input.kind } : {}),
        ...(input.title !== undefined ? { title: input.title } : {}),
        ...(input.note !== undefined ? { note: input.note } : {}),
        ...stamped,
      })
      .where(eq(observations.id, id))
      .run();
    if (input.tags) setTags(tx, id, row.campaignId, input.tags);
    writeSizes(tx, id, input.sizes);
    const updated = recordChange(tx, id, actor.userId, 'updated', now);
    stage(updated.campaignId, updated.diveId, 'observation.updated', updated);
    return updated;
  });
}

export function retireObservation(db: Db, live: LiveHub, id: string, actor: Actor, now = new Date()): Observation {
  return live.withEvents((tx, stage) => {
    const row = getObservationRow(tx, id);
    if (!row) throw notFound();
    if (row.retired) return getObservation(tx, id)!;
    tx.update(observations).set({ retired: true }).where(eq(observations.id, id)).run();
    const retired = recordChange(tx, id, actor.userId, 'retired', now);
    stage(retired.campaignId, retired.diveId, 'observation.retired', { id: retired.id, diveId: retired.diveId, version: retired.version });
    return retired;
  });
}

/** A lead brings a retired entry back; readers get `observation.restored` with the entry. */
export function restoreObservation(db: Db, live: LiveHub, id: string, actor: Actor, now = new Date()): Observation {
  return live.withEvents((tx, stage) => {
    const row = getObservationRow(tx, id);
    if (!row) throw notFound();
    if (!row.retired) return getObservation(tx, id)!;
    tx.update(observations).set({ retired: false }).where(eq(observations.id, id)).run();
    const restored = recordChange(tx, id, actor.userId, 'restored', now);
    stage(restored.campaignId, restored.diveId, 'observation.restored', restored);
    return restored;
  });
}
