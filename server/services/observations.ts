import { and, count, desc, eq, inArray, lt, or, sql } from 'drizzle-orm';
import { z } from 'zod';

import type { Db } from '../../db/client';
import { campaigns, observations, observationTags, photos, tags, user } from '../../db/schema';
import {
  observationCreateSchema,
  observationListQuerySchema,
  type Observation,
  type ObservationDetail,
  type ObservationPage,
} from '../../lib/schemas';
import { ApiError } from '../errors';
import { photosOf } from './photos';
import { telemetryValuesAt } from './telemetry';

type Row = typeof observations.$inferSelect;

export function toObservation(row: Row, tagNames: string[], authorName: string, photoCount: number): Observation {
  return {
    id: row.id,
    diveId: row.diveId,
    campaignId: row.campaignId,
    observedAt: row.observedAt.toISOString(),
    kind: row.kind,
    title: row.title,
    note: row.note,
    depth: row.depth,
    depthSource: row.depthSource,
    lat: row.lat,
    lon: row.lon,
    positionSource: row.positionSource,
    temperature: row.temperature,
    temperatureSource: row.temperatureSource,
    tags: tagNames,
    photoCount,
    authorId: row.authorId,
    authorName,
    version: row.version,
    retired: row.retired,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  };
}

/** Tags and author names for a batch of rows, in two queries rather than two per row. */
function hydrate(db: Db, rows: Row[]): Observation[] {
  if (rows.length === 0) return [];
  const ids = rows.map((r) => r.id);
  const tagRows = db
    .select({ observationId: observationTags.observationId, name: tags.name })
    .from(observationTags)
    .innerJoin(tags, eq(tags.id, observationTags.tagId))
    .where(inArray(observationTags.observationId, ids))
    .orderBy(tags.name)
    .all();
  const tagsBy = new Map<string, string[]>();
  for (const t of tagRows) tagsBy.set(t.observationId, [...(tagsBy.get(t.observationId) ?? []), t.name]);
  const authorIds = [...new Set(rows.map((r) => r.authorId))];
  const names = new Map(
    db
      .select({ id: user.id, name: user.name })
      .from(user)
      .where(inArray(user.id, authorIds))
      .all()
      .map((u) => [u.id, u.name]),
  );
  const photoCounts = new Map(
    db
      .select({ id: photos.observationId, n: count() })
      .from(photos)
      .where(and(inArray(photos.observationId, ids), eq(photos.retired, false)))
      .groupBy(photos.observationId)
      .all()
      .map((p) => [p.id, p.n]),
  );
  return rows.map((r) => toObservation(r, tagsBy.get(r.id) ?? [], names.get(r.authorId) ?? 'Unknown', photoCounts.get(r.id) ?? 0));
}

export function getObservation(db: Db, id: string): Observation | undefined {
  const row = db.select().from(observations).where(eq(observations.id, id)).get();
  return row ? hydrate(db, [row])[0] : undefined;
}

/** One observation with everything that hangs off it. */
export function getObservationDetail(db: Db, id: string): ObservationDetail | undefined {
  const observation = getObservation(db, id);
  if (!observation) return undefined;
  return { ...observation, photos: photosOf(db, [id]).get(id) ?? [] };
}

const cursorSchema = z.object({ t: z.number().int(), id: z.string().min(1) });

function encodeCursor(row: Row): string {
  return Buffer.from(JSON.stringify({ t: row.observedAt.getTime(), id: row.id })).toString('base64url');
}

function decodeCursor(cursor: string) {
  try {
    return cursorSchema.parse(JSON.parse(Buffer.from(cursor, 'base64url').toString('utf8')));
  } catch {
    throw new ApiError(400, 'validation_failed', 'The cursor is not valid.', [
      { path: 'cursor', message: 'Use the nextCursor of an earlier page' },
    ]);
  }
}

/** A dive's log, newest first, by keyset pagination on (observedAt, id) so pages never overlap. */
export function listObservations(db: Db, diveId: string, rawQuery: unknown): ObservationPage {
  const q = observationListQuerySchema.parse(rawQuery);
  const conditions = [eq(observations.diveId, diveId), eq(observations.retired, false)];
  if (q.kind) conditions.push(eq(observations.kind, q.kind));
  if (q.author) conditions.push(eq(observations.authorId, q.author));
  if (q.tag) {
    conditions.push(
      sql`exists (select 1 from ${observationTags} ot join ${tags} t on t.id = ot.tag_id
        where ot.observation_id = ${observations.id} and lower(t.name) = lower(${q.tag}))`,
    );
  }
  if (q.cursor) {
    const c = decodeCursor(q.cursor);
    const at = new Date(c.t);
    conditions.push(or(lt(observations.observedAt, at), and(eq(observations.observedAt, at), lt(observations.id, c.id)))!);
  }
  const rows = db
    .select()
    .from(observations)
    .where(and(...conditions))
    .orderBy(desc(observations.observedAt), desc(observations.id))
    .limit(q.limit + 1)
    .all();
  const page = rows.slice(0, q.limit);
  const last = page[page.length - 1];
  return { items: hydrate(db, page), nextCursor: rows.length > q.limit && last ? encodeCursor(last) : null };
}

/**
 * Finds the campaign's tags by name (case-insensitively), creating the missing ones when the
 * campaign allows free tags; otherwise an unknown tag is a field error.
 */
function resolveTags(db: Db, campaignId: string, names: string[]): string[] {
  const wanted = [...new Map(names.map((n) => [n.toLowerCase(), n])).values()];
  if (wanted.length === 0) return [];
  const existing = db
    .select()
    .from(tags)
    .where(
      and(
        eq(tags.campaignId, campaignId),
        inArray(
          sql`lower(${tags.name})`,
          wanted.map((n) => n.toLowerCase()),
        ),
      ),
    )
    .all();
  const byLower = new Map(existing.map((t) => [t.name.toLowerCase(), t]));
  const missing = wanted.filter((n) => !byLower.has(n.toLowerCase()));
  if (missing.length > 0) {
    const campaign = db.select({ allow: campaigns.allowFreeTags }).from(campaigns).where(eq(campaigns.id, campaignId)).get();
    if (!campaign?.allow) {
      throw new ApiError(
        400,
        'validation_failed',
        'Some tags are not in the campaign vocabulary.',
        missing.map((n) => ({
          path: `tags.${names.indexOf(n)}`,
          message: `"${n}" is not in this campaign's tag vocabulary`,
        })),
      );
    }
    for (const name of missing) {
      const created = db.insert(tags).values({ campaignId, name }).returning().get();
      byLower.set(name.toLowerCase(), created);
    }
  }
  return wanted.map((n) => byLower.get(n.toLowerCase())!.id);
}

type Typed = { depth?: number | null; lat?: number | null; lon?: number | null; temperature?: number | null };

/**
 * The depth, position and temperature an entry starts with: what the person typed is `manual`;
 * what they left empty comes from the telemetry log at that instant, when the log has a value.
 */
export function stampValues(db: Db, diveId: string, at: Date, typed: Typed) {
  const fromLog =
    typed.depth == null || typed.lat == null || typed.temperature == null ? telemetryValuesAt(db, diveId, at.getTime()) : null;
  const pick = (manual: number | null | undefined, logged: number | null | undefined) =>
    manual != null
      ? { value: manual, source: 'manual' as const }
      : logged != null
        ? { value: logged, source: 'telemetry' as const }
        : { value: null, source: null };
  const depth = pick(typed.depth, fromLog?.depth);
  const hasPosition = typed.lat != null && typed.lon != null;
  const loggedPosition = fromLog?.lat != null && fromLog.lon != null;
  const temperature = pick(typed.temperature, fromLog?.temperature);
  return {
    depth: depth.value,
    depthSource: depth.source,
    lat: hasPosition ? typed.lat! : loggedPosition ? fromLog.lat : null,
    lon: hasPosition ? typed.lon! : loggedPosition ? fromLog.lon : null,
    positionSource: hasPosition ? ('manual' as const) : loggedPosition ? ('telemetry' as const) : null,
    temperature: temperature.value,
    temperatureSource: temperature.source,
  };
}

export function createObservation(
  db: Db,
  target: { diveId: string; campaignId: string; authorId: string },
  body: unknown,
  now = new Date(),
): Observation {
  const input = observationCreateSchema.parse(body);
  const observedAt = input.observedAt ? new Date(input.observedAt) : now;
  const stamped = stampValues(db, target.diveId, observedAt, input);
  const id = db.transaction((tx) => {
    const tagIds = resolveTags(tx as unknown as Db, target.campaignId, input.tags);
    const row = tx
      .insert(observations)
      .values({
        diveId: target.diveId,
        campaignId: target.campaignId,
        authorId: target.authorId,
        observedAt,
        kind: input.kind,
        title: input.title,
        note: input.note,
        ...stamped,
        createdAt: now,
        updatedAt: now,
      })
      .returning({ id: observations.id })
      .get();
    if (tagIds.length > 0) {
      tx.insert(observationTags)
        .values(tagIds.map((tagId) => ({ observationId: row.id, tagId })))
        .run();
    }
    return row.id;
  });
  return getObservation(db, id)!;
}
