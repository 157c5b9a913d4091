import { and, asc, count, desc, eq, gt, inArray, lt, or, sql, type SQL } from 'drizzle-orm';
import { z } from 'zod';

import type { Db, Executor } from '../../db/client';
import {
  auditLog,
  campaigns,
  custodyEvents,
  finds,
  identifications,
  observationRevisions,
  observations,
  observationTags,
  photos,
  tags,
  user,
} from '../../db/schema';
import {
  observationCreateSchema,
  observationListQuerySchema,
  observationUpdateSchema,
  type Observation,
  type ObservationDetail,
  type ObservationPage,
  type Revision,
} from '../../lib/schemas';
import { ApiError, conflict } from '../errors';
import type { LiveHub } from './live';
import { photosOf } from './photos';
import { telemetryValuesAt } from './telemetry';

type Row = typeof observations.$inferSelect;

export type Actor = { userId: string; role: string };

export function toObservation(
  row: Row,
  extra: Pick<Observation, 'tags' | 'authorName' | 'photoCount' | 'identification' | 'findNumber'>,
): Observation {
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
    ...extra,
    authorId: row.authorId,
    version: row.version,
    retired: row.retired,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  };
}

function namesOf(db: Executor, ids: (string | null)[]): Map<string, string> {
  const wanted = [...new Set(ids.filter((i): i is string => !!i))];
  if (wanted.length === 0) return new Map();
  return new Map(
    db
      .select({ id: user.id, name: user.name })
      .from(user)
      .where(inArray(user.id, wanted))
      .all()
      .map((u) => [u.id, u.name]),
  );
}

/** Tags, names, photo counts, identifications and find numbers for a batch of rows, a query each. */
function hydrate(db: Executor, rows: Row[]): Observation[] {
  if (rows.length === 0) return [];
  const ids = rows.map((r) => r.id);
  const tagsBy = new Map<string, string[]>();
  for (const t of db
    .select({ observationId: observationTags.observationId, name: tags.name })
    .from(observationTags)
    .innerJoin(tags, eq(tags.id, observationTags.tagId))
    .where(inArray(observationTags.observationId, ids))
    .orderBy(tags.name)
    .all()) {
    tagsBy.set(t.observationId, [...(tagsBy.get(t.observationId) ?? []), t.name]);
  }
  const names = namesOf(
    db,
    rows.map((r) => r.authorId),
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
  const idents = new Map(
    db
      .select()
      .from(identifications)
      .where(inArray(identifications.observationId, ids))
      .all()
      .map((i) => [i.observationId, i]),
  );
  const findNumbers = new Map(
    db
      .select({ id: finds.observationId, n: finds.findNumber })
      .from(finds)
      .where(inArray(finds.observationId, ids))
      .all()
      .map((f) => [f.id, f.n]),
  );
  return rows.map((r) => {
    const ident = idents.get(r.id);
    return toObservation(r, {
      tags: tagsBy.get(r.id) ?? [],
      authorName: names.get(r.authorId) ?? 'Unknown',
      photoCount: photoCounts.get(r.id) ?? 0,
      identification: ident
        ? { scientificName: ident.scientificName, qualifier: ident.qualifier, verificationStatus: ident.verificationStatus }
        : null,
      findNumber: findNumbers.get(r.id) ?? null,
    });
  });
}

export function getObservationRow(db: Executor, id: string): Row | undefined {
  return db.select().from(observations).where(eq(observations.id, id)).get();
}

export function getObservation(db: Executor, id: string): Observation | undefined {
  const row = getObservationRow(db, id);
  return row ? hydrate(db, [row])[0] : undefined;
}

export function observationsByIds(db: Executor, ids: string[]): Observation[] {
  if (ids.length === 0) return [];
  return hydrate(db, db.select().from(observations).where(inArray(observations.id, ids)).all());
}

/** One observation with everything that hangs off it (reusing the observation when the caller has it). */
export function getObservationDetail(db: Executor, id: string, known?: Observation): ObservationDetail | undefined {
  const observation = known ?? getObservation(db, id);
  if (!observation) return undefined;
  const ident = db.select().from(identifications).where(eq(identifications.observationId, id)).get();
  const find = db.select().from(finds).where(eq(finds.observationId, id)).get();
  const custody = db.select().from(custodyEvents).where(eq(custodyEvents.observationId, id)).orderBy(asc(custodyEvents.since)).all();
  const names = namesOf(db, [ident?.identifiedBy ?? null, ident?.verifiedBy ?? null, ...custody.map((c) => c.recordedBy)]);
  return {
    ...observation,
    // Reads only; the same connection serves the transaction and the database.
    photos: photosOf(db as Db, [id]).get(id) ?? [],
    identificationDetail: ident
      ? {
          scientificName: ident.scientificName,
          taxonRank: ident.taxonRank,
          qualifier: ident.qualifier,
          confidence: ident.confidence,
          taxonId: ident.taxonId,
          verificationStatus: ident.verificationStatus,
          verificationNote: ident.verificationNote,
          identifiedBy: ident.identifiedBy,
          identifiedByName: names.get(ident.identifiedBy) ?? 'Unknown',
          verifiedBy: ident.verifiedBy,
          verifiedByName: ident.verifiedBy ? (names.get(ident.verifiedBy) ?? 'Unknown') : null,
          verifiedAt: ident.verifiedAt ? ident.verifiedAt.toISOString() : null,
          updatedAt: ident.updatedAt.toISOString(),
        }
      : null,
    find: find
      ? {
          findNumber: find.findNumber,
          objectType: find.objectType,
          material: find.material,
          condition: find.condition,
          state: find.state,
          updatedAt: find.updatedAt.toISOString(),
        }
      : null,
    custody: custody.map((c) => ({
      id: c.id,
      holder: c.holder,
      since: c.since.toISOString(),
      location: c.location,
      container: c.container,
      note: c.note,
      recordedBy: c.recordedBy,
      recordedByName: names.get(c.recordedBy) ?? 'Unknown',
      createdAt: c.createdAt.toISOString(),
    })),
  };
}

/* ---- lists ---- */

const cursorSchema = z.object({ t: z.number().int(), id: z.string().min(1) });
const offsetCursorSchema = z.object({ o: z.number().int().min(0) });

const encode = (value: unknown) => Buffer.from(JSON.stringify(value)).toString('base64url');

function decode<S extends z.ZodType>(schema: S, cursor: string): z.output<S> {
  try {
    return schema.parse(JSON.parse(Buffer.from(cursor, 'base64url').toString('utf8')));
  } catch {
    throw new ApiError(400, 'validation_failed', 'The cursor is not valid.', [
      { path: 'cursor', message: 'Use the nextCursor of an earlier page' },
    ]);
  }
}

/**
 * A dive's log. By time (the default) it is keyset-paginated on (observedAt, id), so pages never
 * overlap while entries arrive; other sorts page by offset.
 */
export function listObservations(db: Db, diveId: string, rawQuery: unknown, options: { retired?: boolean } = {}): ObservationPage {
  const q = observationListQuerySchema.parse(rawQuery);
  const conditions: SQL[] = [eq(observations.diveId, diveId), eq(observations.retired, options.retired ?? false)];
  if (q.kind) conditions.push(eq(observations.kind, q.kind));
  if (q.author) conditions.push(eq(observations.authorId, q.author));
  if (q.tag) {
    conditions.push(
      sql`exists (select 1 from ${observationTags} ot join ${tags} t on t.id = ot.tag_id
        where ot.observation_id = ${observations.id} and lower(t.name) = lower(${q.tag}))`,
    );
  }
  if (q.hasPhotos) {
    const has = sql`exists (select 1 from ${photos} p where p.observation_id = ${observations.id} and p.retired = 0)`;
    conditions.push(q.hasPhotos === 'true' ? has : sql`not ${has}`);
  }
  if (q.verification) {
    conditions.push(
      sql`exists (select 1 from ${identifications} i where i.observation_id = ${observations.id} and i.verification_status = ${q.verification})`,
    );
  }
  const ascending = (q.order ?? (q.sort === 'time' ? 'desc' : 'asc')) === 'asc';

  if (q.sort === 'time') {
    if (q.cursor) {
      const c = decode(cursorSchema, q.cursor);
      const at = new Date(c.t);
      const before = ascending ? gt : lt;
      conditions.push(or(before(observations.observedAt, at), and(eq(observations.observedAt, at), before(observations.id, c.id)))!);
    }
    const dir = ascending ? asc : desc;
    const rows = db
      .select()
      .from(observations)
      .where(and(...conditions))
      .orderBy(dir(observations.observedAt), dir(observations.id))
      .limit(q.limit + 1)
      .all();
    const page = rows.slice(0, q.limit);
    const last = page[page.length - 1];
    return {
      items: hydrate(db, page),
      nextCursor: rows.length > q.limit && last ? encode({ t: last.observedAt.getTime(), id: last.id }) : null,
    };
  }

  const offset = q.cursor ? decode(offsetCursorSchema, q.cursor).o : 0;
  const dir = ascending ? asc : desc;
  const key =
    q.sort === 'depth'
      ? [sql`${observations.depth} is null`, dir(observations.depth)]
      : q.sort === 'kind'
        ? [dir(observations.kind)]
        : [dir(sql`(select lower(name) from ${user} u where u.id = ${observations.authorId})`)];
  const rows = db
    .select()
    .from(observations)
    .where(and(...conditions))
    .orderBy(...key, desc(observations.observedAt), desc(observations.id))
    .limit(q.limit + 1)
    .offset(offset)
    .all();
  const page = rows.slice(0, q.limit);
  return { items: hydrate(db, page), nextCursor: rows.length > q.limit ? encode({ o: offset + q.limit }) : null };
}

/* ---- writing ---- */

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

function setTags(db: Executor, observationId: string, campaignId: string, names: string[], isNew = false) {
  const had = db.select({ id: observationTags.tagId }).from(observationTags).where(eq(observationTags.observationId, observationId)).all();
  const tagIds = resolveTags(db, campaignId, names, isNew ? 'new' : { kept: new Set(had.map((t) => t.id)) });
  db.delete(observationTags).where(eq(observationTags.observationId, observationId)).run();
  if (tagIds.length > 0)
    db.insert(observationTags)
      .values(tagIds.map((tagId) => ({ observationId, tagId })))
      .run();
}

type Typed = { depth?: number | null; lat?: number | null; lon?: number | null; temperature?: number | null };

/**
 * The depth, position and temperature an entry takes: what the person typed is `manual`;
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

/** The entry as history keeps it: everything but photos and custody, which have their own records. */
function snapshotOf(db: Executor, observation: Observation): Record<string, unknown> {
  const detail = getObservationDetail(db, observation.id, observation)!;
  const { photos: _photos, custody: _custody, ...rest } = detail;
  return rest;
}

function writeRevision(
  db: Executor,
  snapshot: Record<string, unknown> & { id: string },
  version: number,
  action: Revision['action'],
  actorId: string,
  at: Date,
) {
  db.insert(observationRevisions).values({ observationId: snapshot.id, version, action, snapshot, editedBy: actorId, editedAt: at }).run();
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
  if (!row) throw new ApiError(404, 'not_found', 'Not found');
  const observation = getObservation(db, id)!;
  writeRevision(db, { ...snapshotOf(db, observation), id }, row.version, action, actorId, at);
  return observation;
}

export function createObservation(
  db: Db,
  live: LiveHub,
  target: { diveId: string; campaignId: string; authorId: string },
  body: unknown,
  now = new Date(),
): { observation: Observation; repeated: boolean } {
  const input = observationCreateSchema.parse(body);
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
  const created = db.transaction((tx) => {
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
        clientRef: input.clientRef ?? null,
        createdAt: now,
        updatedAt: now,
      })
      .returning({ id: observations.id })
      .get();
    setTags(tx, row.id, target.campaignId, input.tags, true);
    const observation = getObservation(tx, row.id)!;
    // A new entry has no identification, find, photos or custody yet.
    writeRevision(tx, { ...observation, identificationDetail: null, find: null }, 1, 'created', target.authorId, now);
    return { observation, event: live.stage(tx, target.campaignId, target.diveId, 'observation.created', observation, now) };
  });
  live.emit(created.event);
  return { observation: created.observation, repeated: false };
}

/** Only the author and the campaign's leads change or retire an entry. */
export function assertMayEdit(row: Row, actor: Actor, what = 'edit this entry') {
  if (actor.role !== 'lead' && row.authorId !== actor.userId) {
    throw new ApiError(403, 'forbidden', `Only the author of this entry or a campaign lead may ${what}.`);
  }
}

/**
 * Refuses a write that started from an older state of the entry: every write that bumps the
 * version (edits, identifications, verifications, finds) carries the version its writer saw.
 */
export function assertCurrent(row: Row, version: number) {
  if (row.retired) throw conflict('retired', 'This entry has been retired. A lead can restore it.');
  if (row.version !== version) {
    throw new ApiError(
      409,
      'stale_version',
      `This entry was changed by someone else (it is at version ${row.version}, your edit started from version ${version}). Nothing was overwritten.`,
    );
  }
}

export function updateObservation(db: Db, live: LiveHub, id: string, actor: Actor, body: unknown, now = new Date()): Observation {
  const updated = db.transaction((tx) => {
    const row = getObservationRow(tx, id);
    if (!row) throw new ApiError(404, 'not_found', 'Not found');
    assertMayEdit(row, actor);
    const input = observationUpdateSchema.parse(body);
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
    });
    tx.update(observations)
      .set({
        observedAt,
        ...(input.kind ? { kind: input.kind } : {}),
        ...(input.title !== undefined ? { title: input.title } : {}),
        ...(input.note !== undefined ? { note: input.note } : {}),
        ...stamped,
      })
      .where(eq(observations.id, id))
      .run();
    if (input.tags) setTags(tx, id, row.campaignId, input.tags);
    return recordChange(tx, id, actor.userId, 'updated', now);
  });
  live.publish(updated.campaignId, updated.diveId, 'observation.updated', updated);
  return updated;
}

export function retireObservation(db: Db, live: LiveHub, id: string, actor: Actor, now = new Date()): Observation {
  const retired = db.transaction((tx) => {
    const row = getObservationRow(tx, id);
    if (!row) throw new ApiError(404, 'not_found', 'Not found');
    assertMayEdit(row, actor, 'retire this entry');
    if (row.retired) return getObservation(tx, id)!;
    tx.update(observations).set({ retired: true }).where(eq(observations.id, id)).run();
    return recordChange(tx, id, actor.userId, 'retired', now);
  });
  live.publish(retired.campaignId, retired.diveId, 'observation.retired', {
    id: retired.id,
    diveId: retired.diveId,
    version: retired.version,
  });
  return retired;
}

export function restoreObservation(db: Db, live: LiveHub, id: string, actor: Actor, now = new Date()): Observation {
  const restored = db.transaction((tx) => {
    const row = getObservationRow(tx, id);
    if (!row) throw new ApiError(404, 'not_found', 'Not found');
    if (!row.retired) return getObservation(tx, id)!;
    tx.update(observations).set({ retired: false }).where(eq(observations.id, id)).run();
    return recordChange(tx, id, actor.userId, 'restored', now);
  });
  live.publish(restored.campaignId, restored.diveId, 'observation.created', restored);
  return restored;
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
