/**
 * A campaign's substrate vocabulary: it starts from the standard's classes (lib/substrates.ts) the
 * first time the campaign needs it, and the lead adds, renames and retires classes. Entries point
 * at a class by id, so a rename reaches every entry at once; a retired class stays on the entries
 * that have it but is offered no more.
 */
import { and, asc, count, eq, sql } from 'drizzle-orm';
import type { z } from 'zod';

import type { Executor } from '../../db/client';
import { observations, substrateClasses } from '../../db/schema';
import type { SubstrateClass, substrateCreateSchema, substrateUpdateSchema } from '../../lib/schemas';
import { standardSubstrates } from '../../lib/substrates';
import { conflict, fieldError, notFound } from '../errors';

type Row = typeof substrateClasses.$inferSelect;

/** Gives a campaign the standard's classes if it has never had a vocabulary. */
export function ensureSubstrates(db: Executor, campaignId: string) {
  const any = db
    .select({ id: substrateClasses.id })
    .from(substrateClasses)
    .where(eq(substrateClasses.campaignId, campaignId))
    .limit(1)
    .get();
  if (any) return;
  db.insert(substrateClasses)
    .values(
      standardSubstrates.map((s, i) => ({
        campaignId,
        name: s.name,
        origin: s.origin,
        standardName: s.name,
        position: i,
      })),
    )
    .run();
}

const byName = (campaignId: string, name: string) =>
  and(eq(substrateClasses.campaignId, campaignId), sql`lower(${substrateClasses.name}) = lower(${name})`);

export function listSubstrates(db: Executor, campaignId: string): SubstrateClass[] {
  ensureSubstrates(db, campaignId);
  const counts = new Map(
    db
      .select({ id: observations.substrateId, n: count() })
      .from(observations)
      .where(and(eq(observations.campaignId, campaignId), eq(observations.retired, false)))
      .groupBy(observations.substrateId)
      .all()
      .map((r) => [r.id, r.n]),
  );
  return db
    .select()
    .from(substrateClasses)
    .where(eq(substrateClasses.campaignId, campaignId))
    .orderBy(asc(substrateClasses.retired), asc(substrateClasses.position), asc(substrateClasses.name))
    .all()
    .map((r) => toSubstrate(r, counts.get(r.id) ?? 0));
}

const toSubstrate = (r: Row, entryCount: number): SubstrateClass => ({
  id: r.id,
  name: r.name,
  origin: r.origin,
  standardName: r.standardName,
  retired: r.retired,
  entryCount,
});

export function createSubstrate(db: Executor, campaignId: string, input: z.output<typeof substrateCreateSchema>): SubstrateClass {
  ensureSubstrates(db, campaignId);
  if (db.select({ id: substrateClasses.id }).from(substrateClasses).where(byName(campaignId, input.name)).get()) {
    throw conflict('duplicate_substrate', `This campaign already has a substrate class named ${input.name}.`);
  }
  const last = db
    .select({ p: sql<number>`coalesce(max(${substrateClasses.position}), -1)` })
    .from(substrateClasses)
    .where(eq(substrateClasses.campaignId, campaignId))
    .get();
  const row = db
    .insert(substrateClasses)
    .values({ campaignId, name: input.name, origin: input.origin ?? null, position: (last?.p ?? -1) + 1 })
    .returning()
    .get();
  return toSubstrate(row, 0);
}

export function substrateCampaign(db: Executor, id: string): string | undefined {
  return db.select({ c: substrateClasses.campaignId }).from(substrateClasses).where(eq(substrateClasses.id, id)).get()?.c;
}

export function updateSubstrate(db: Executor, id: string, input: z.output<typeof substrateUpdateSchema>): SubstrateClass {
  const row = db.select().from(substrateClasses).where(eq(substrateClasses.id, id)).get();
  if (!row) throw notFound();
  if (input.name !== undefined && input.name.toLowerCase() !== row.name.toLowerCase()) {
    const clash = db.select({ id: substrateClasses.id }).from(substrateClasses).where(byName(row.campaignId, input.name)).get();
    if (clash) throw conflict('duplicate_substrate', `This campaign already has a substrate class named ${input.name}.`);
  }
  const next = db
    .update(substrateClasses)
    .set({ ...(input.name !== undefined ? { name: input.name } : {}), ...(input.retired !== undefined ? { retired: input.retired } : {}) })
    .where(eq(substrateClasses.id, id))
    .returning()
    .get();
  const n = db
    .select({ n: count() })
    .from(observations)
    .where(and(eq(observations.substrateId, id), eq(observations.retired, false)))
    .get();
  return toSubstrate(next, n?.n ?? 0);
}

/**
 * The class an entry names, by name in its campaign's vocabulary (any case). A retired class is
 * kept on an entry that already has it, but not given to another.
 */
export function resolveSubstrate(db: Executor, campaignId: string, name: string, currentId: string | null = null): string {
  ensureSubstrates(db, campaignId);
  const row = db.select().from(substrateClasses).where(byName(campaignId, name)).get();
  if (!row || (row.retired && row.id !== currentId)) {
    throw fieldError(
      'substrate',
      `No substrate class named ${name} in this campaign`,
      `No substrate class named ${name} in this campaign.`,
    );
  }
  return row.id;
}
