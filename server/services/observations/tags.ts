import { and, desc, eq, or, sql } from 'drizzle-orm';

import type { Executor } from '../../../db/client';
import { inJsonList, preparedOn } from '../../../db/prepared';
import { auditLog, campaigns, observationTags, tags } from '../../../db/schema';
import { ApiError } from '../../errors';

/**
 * The tag a merged tag went into, following later merges, when it is still in use; null for a
 * tag that was only retired. A merge is known from the audit trail (the tags table keeps no
 * link); the latest merge or retirement of the tag decides.
 */
function replacementOf(db: Executor, campaignId: string, tagId: string): { id: string; name: string } | null {
  let current = tagId;
  for (let hop = 0; hop < 5; hop++) {
    const last = db
      .select({ action: auditLog.action, detail: auditLog.detail })
      .from(auditLog)
      .where(
        and(
          eq(auditLog.target, current),
          or(
            eq(auditLog.action, 'tag.merged'),
            and(eq(auditLog.action, 'tag.updated'), sql`json_extract(${auditLog.detail}, '$.retired') is not null`),
          ),
        ),
      )
      .orderBy(desc(auditLog.id))
      .limit(1)
      .get();
    if (last?.action !== 'tag.merged') return null;
    const detail = (last.detail ?? {}) as { into?: unknown; intoId?: unknown };
    const target =
      typeof detail.intoId === 'string'
        ? db.select().from(tags).where(eq(tags.id, detail.intoId)).get()
        : typeof detail.into === 'string'
          ? db
              .select()
              .from(tags)
              .where(and(eq(tags.campaignId, campaignId), sql`lower(${tags.name}) = lower(${detail.into})`))
              .get()
          : undefined;
    if (!target) return null;
    if (!target.retired) return { id: target.id, name: target.name };
    current = target.id;
  }
  return null;
}

const tagsByNameQuery = (db: Executor) =>
  db
    .select()
    .from(tags)
    .where(and(eq(tags.campaignId, sql.placeholder('campaignId')), inJsonList(sql`lower(${tags.name})`, 'names')))
    .prepare();

const addTagQuery = (db: Executor) =>
  db
    .insert(observationTags)
    .values({ observationId: sql.placeholder('observationId'), tagId: sql.placeholder('tagId') })
    .prepare();

/** Puts the tags on the entry, which has none of them yet. */
function addTags(db: Executor, observationId: string, tagIds: readonly string[]) {
  const add = preparedOn(db, addTagQuery);
  for (const tagId of tagIds) add.run({ observationId, tagId });
}

/**
 * Finds the campaign's tags by name (case-insensitively), creating the missing ones when the
 * campaign allows free tags; otherwise an unknown tag is a field error. A merged tag stands for
 * the tag it went into. A tag that was only retired stays on the entries that had it; an edit may
 * not add it (a field error), while a new entry keeps it: a new entry may have been logged on a
 * device without a link before the tag was retired, and it must not be refused for that.
 */
function resolveTags(db: Executor, campaignId: string, names: string[], mode: { kept: ReadonlySet<string> } | 'new'): string[] {
  const kept = mode === 'new' ? new Set<string>() : mode.kept;
  const wanted = [...new Map(names.map((n) => [n.toLowerCase(), n])).values()];
  if (wanted.length === 0) return [];
  const existing = preparedOn(db, tagsByNameQuery).all({ campaignId, names: JSON.stringify(wanted.map((n) => n.toLowerCase())) });
  const byLower = new Map<string, { id: string }>(existing.map((t) => [t.name.toLowerCase(), t]));
  const refused: { path: string; message: string }[] = [];
  for (const t of existing.filter((x) => x.retired && !kept.has(x.id))) {
    const replacement = replacementOf(db, campaignId, t.id);
    if (replacement) {
      byLower.set(t.name.toLowerCase(), replacement);
    } else if (mode !== 'new') {
      const given = wanted.find((n) => n.toLowerCase() === t.name.toLowerCase())!;
      refused.push({ path: `tags.${names.indexOf(given)}`, message: `"${t.name}" has been retired from this campaign's tag vocabulary` });
    }
  }
  if (refused.length > 0)
    throw new ApiError(400, 'validation_failed', 'Some tags have been retired from the campaign vocabulary.', refused);
  const missing = wanted.filter((n) => !byLower.has(n.toLowerCase()));
  if (missing.length > 0) {
    const campaign = db.select({ allow: campaigns.allowFreeTags }).from(campaigns).where(eq(campaigns.id, campaignId)).get();
    if (!campaign?.allow) {
      throw new ApiError(
        400,
        'validation_failed',
        'Some tags are not in the campaign vocabulary.',
        missing.map((n) => ({ path: `tags.${names.indexOf(n)}`, message: `"${n}" is not in this campaign's tag vocabulary` })),
      );
    }
    for (const name of missing) byLower.set(name.toLowerCase(), db.insert(tags).values({ campaignId, name }).returning().get());
  }
  return [...new Set(wanted.map((n) => byLower.get(n.toLowerCase())!.id))];
}

export function setTags(db: Executor, observationId: string, campaignId: string, names: string[], isNew = false) {
  // A new entry has no tags yet: nothing to keep or take off.
  if (isNew) {
    addTags(db, observationId, resolveTags(db, campaignId, names, 'new'));
    return;
  }
  const had = db.select({ id: observationTags.tagId }).from(observationTags).where(eq(observationTags.observationId, observationId)).all();
  const tagIds = resolveTags(db, campaignId, names, { kept: new Set(had.map((t) => t.id)) });
  db.delete(observationTags).where(eq(observationTags.observationId, observationId)).run();
  addTags(db, observationId, tagIds);
}
