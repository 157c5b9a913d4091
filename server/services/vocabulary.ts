import { and, asc, count, eq, ne, sql } from 'drizzle-orm';

import type { Db, Executor } from '../../db/client';
import { observations, observationTags, quickMarks, tags } from '../../db/schema';
import type { z } from 'zod';

import {
  SAMPLE_TAG,
  type quickMarkInputSchema,
  type QuickMark,
  type Tag,
  type tagCreateSchema,
  type tagUpdateSchema,
} from '../../lib/schemas';

export type TagCreateInput = z.output<typeof tagCreateSchema>;
export type TagUpdateInput = z.output<typeof tagUpdateSchema>;
export type QuickMarkInput = z.output<typeof quickMarkInputSchema>;
import { conflict, fieldError, notFound } from '../errors';
import { audit } from './audit';

function tagByName(db: Db, campaignId: string, name: string) {
  return db
    .select()
    .from(tags)
    .where(and(eq(tags.campaignId, campaignId), sql`lower(${tags.name}) = lower(${name})`))
    .get();
}

function usage(db: Executor, tagId: string): number {
  return (
    db
      .select({ n: count() })
      .from(observationTags)
      .innerJoin(observations, eq(observations.id, observationTags.observationId))
      .where(and(eq(observationTags.tagId, tagId), eq(observations.retired, false)))
      .get()?.n ?? 0
  );
}

/**
 * Quick marks name their tags, so a rename or merge carries over to them (`to`) and a retired
 * tag leaves them (`to` null): a quick mark tapped during a dive must never fail on its tags.
 */
function retagQuickMarks(tx: Executor, campaignId: string, from: string, to: string | null): void {
  const marks = tx.select().from(quickMarks).where(eq(quickMarks.campaignId, campaignId)).all();
  for (const mark of marks) {
    if (!mark.tags.some((t) => t.toLowerCase() === from.toLowerCase())) continue;
    const next: string[] = [];
    for (const t of mark.tags) {
      const name = t.toLowerCase() === from.toLowerCase() ? to : t;
      if (name !== null && !next.some((n) => n.toLowerCase() === name.toLowerCase())) next.push(name);
    }
    tx.update(quickMarks).set({ tags: next }).where(eq(quickMarks.id, mark.id)).run();
  }
}

const toTag = (db: Executor, t: typeof tags.$inferSelect): Tag => ({ id: t.id, name: t.name, retired: t.retired, usage: usage(db, t.id) });

export function createTag(db: Db, campaignId: string, actorId: string, { name }: TagCreateInput): Tag {
  const existing = tagByName(db, campaignId, name);
  if (existing) throw conflict('duplicate_tag', `The vocabulary already has "${existing.name}".`);
  const row = db.insert(tags).values({ campaignId, name }).returning().get();
  audit(db, { campaignId, actorId, action: 'tag.created', target: row.id, detail: { name } });
  return toTag(db, row);
}

/**
 * Renames, retires or merges a tag. A merge moves every entry of this tag to the other one and
 * retires this one, so nothing that was tagged loses its tag.
 */
export function updateTag(db: Db, tagId: string, actorId: string, input: TagUpdateInput): Tag {
  return db.transaction((tx) => {
    const tag = tx.select().from(tags).where(eq(tags.id, tagId)).get();
    if (!tag) throw notFound();
    const renamed = input.name !== undefined && input.name.toLowerCase() !== tag.name.toLowerCase();
    if (tag.name.toLowerCase() === SAMPLE_TAG && (input.mergeInto || renamed || input.retired === true)) {
      throw conflict(
        'reserved_tag',
        `"${tag.name}" marks the entries whose samples are kept in custody, so it cannot be renamed, merged or retired. Merge other tags into it instead.`,
      );
    }
    if (input.mergeInto) {
      const target = tx.select().from(tags).where(eq(tags.id, input.mergeInto)).get();
      if (!target || target.campaignId !== tag.campaignId || target.id === tag.id) {
        throw fieldError('mergeInto', 'Unknown tag', 'Merge into another tag of the same campaign.');
      }
      if (target.retired) {
        throw fieldError('mergeInto', 'That tag is retired', `"${target.name}" is retired; merge into a tag still in use.`);
      }
      tx.run(sql`insert or ignore into observation_tags (observation_id, tag_id)
        select observation_id, ${target.id} from observation_tags where tag_id = ${tag.id}`);
      tx.delete(observationTags).where(eq(observationTags.tagId, tag.id)).run();
      tx.update(tags).set({ retired: true }).where(eq(tags.id, tag.id)).run();
      retagQuickMarks(tx, tag.campaignId, tag.name, target.name);
      audit(tx, {
        campaignId: tag.campaignId,
        actorId,
        action: 'tag.merged',
        target: tag.id,
        detail: { from: tag.name, into: target.name, intoId: target.id },
      });
      return toTag(tx, tx.select().from(tags).where(eq(tags.id, target.id)).get()!);
    }
    if (input.name && input.name.toLowerCase() !== tag.name.toLowerCase()) {
      const clash = tx
        .select()
        .from(tags)
        .where(and(eq(tags.campaignId, tag.campaignId), ne(tags.id, tag.id), sql`lower(${tags.name}) = lower(${input.name})`))
        .get();
      if (clash) throw conflict('duplicate_tag', `"${clash.name}" already exists; merge into it instead.`);
    }
    tx.update(tags)
      .set({ ...(input.name ? { name: input.name } : {}), ...(input.retired !== undefined ? { retired: input.retired } : {}) })
      .where(eq(tags.id, tagId))
      .run();
    if (input.name && input.name !== tag.name) retagQuickMarks(tx, tag.campaignId, tag.name, input.name);
    if (input.retired === true && !tag.retired) retagQuickMarks(tx, tag.campaignId, input.name ?? tag.name, null);
    audit(tx, { campaignId: tag.campaignId, actorId, action: 'tag.updated', target: tag.id, detail: input });
    return toTag(tx, tx.select().from(tags).where(eq(tags.id, tagId)).get()!);
  });
}

const toQuickMark = (q: typeof quickMarks.$inferSelect): QuickMark => ({
  id: q.id,
  label: q.label,
  kind: q.kind,
  tags: q.tags,
  position: q.position,
});

export function listQuickMarks(db: Db, campaignId: string): QuickMark[] {
  return db
    .select()
    .from(quickMarks)
    .where(and(eq(quickMarks.campaignId, campaignId), eq(quickMarks.retired, false)))
    .orderBy(asc(quickMarks.position), asc(quickMarks.createdAt))
    .all()
    .map(toQuickMark);
}

export function createQuickMark(db: Db, campaignId: string, input: QuickMarkInput): QuickMark {
  const position = input.position ?? listQuickMarks(db, campaignId).length;
  return toQuickMark(
    db.insert(quickMarks).values({ campaignId, label: input.label, kind: input.kind, tags: input.tags, position }).returning().get(),
  );
}

export function updateQuickMark(db: Db, id: string, input: Partial<QuickMarkInput>): QuickMark {
  const row = db
    .update(quickMarks)
    .set({ ...input })
    .where(eq(quickMarks.id, id))
    .returning()
    .get();
  if (!row) throw notFound();
  return toQuickMark(row);
}

export function retireQuickMark(db: Db, id: string): void {
  db.update(quickMarks).set({ retired: true }).where(eq(quickMarks.id, id)).run();
}

export function quickMarkCampaign(db: Db, id: string): string | undefined {
  return db.select({ c: quickMarks.campaignId }).from(quickMarks).where(eq(quickMarks.id, id)).get()?.c;
}

export function tagCampaign(db: Db, id: string): string | undefined {
  return db.select({ c: tags.campaignId }).from(tags).where(eq(tags.id, id)).get()?.c;
}
