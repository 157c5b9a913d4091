import { createHash } from 'node:crypto';

import { and, asc, count, eq, inArray, max } from 'drizzle-orm';

import type { z } from 'zod';

import type { Db, Executor } from '../../db/client';
import { campaigns, observations, photos, user } from '../../db/schema';
import {
  type galleryQuerySchema,
  type photoUpdateSchema,
  type photoUploadFieldsSchema,
  type GalleryPage,
  type Photo,
  type PhotoSize,
  type PhotoUploadResult,
} from '../../lib/schemas';
import { fieldError, notFound } from '../errors';
import { assertCan, type CampaignAccess } from '../middleware/campaign-access';
import type { LiveHub, StageEvent } from './live';
import { reviseLengthAfterPhotoRetired } from './measurements';
import { observationFilters } from './observations/filters';
import { recordChange } from './observations/revisions';
import { getObservation, tagsOf } from './observations/hydrate';
import { processPhoto, type ProcessedPhoto } from './photo-processing';
import { newPhotoKey, type PhotoStorage } from './photo-storage';

type PhotoRow = typeof photos.$inferSelect;

export function toPhoto(row: PhotoRow): Photo {
  const url = (size: string) => `/api/photos/${row.id}?size=${size}`;
  return {
    id: row.id,
    observationId: row.observationId,
    mime: row.mime,
    width: row.width,
    height: row.height,
    bytes: row.bytes,
    caption: row.caption,
    credit: row.credit,
    capturedAt: row.capturedAt ? row.capturedAt.toISOString() : null,
    lat: row.lat,
    lon: row.lon,
    position: row.position,
    uploadedBy: row.uploadedBy,
    createdAt: row.createdAt.toISOString(),
    urls: { thumb: url('thumb'), display: url('display'), original: url('original') },
  };
}

/** The live (not retired) photos of some observations, in their order. */
export function photosOf(db: Db, observationIds: string[]): Map<string, Photo[]> {
  const out = new Map<string, Photo[]>();
  if (observationIds.length === 0) return out;
  const rows = db
    .select()
    .from(photos)
    .where(and(inArray(photos.observationId, observationIds), eq(photos.retired, false)))
    .orderBy(asc(photos.position), asc(photos.createdAt))
    .all();
  for (const r of rows) out.set(r.observationId, [...(out.get(r.observationId) ?? []), toPhoto(r)]);
  return out;
}

/* ---- who may change an entry's photos ---- */

/**
 * The entry's author and the campaign's lead may add, edit and retire its photos; any other
 * member gets a 403 that says so. A retired entry's photos are hidden with it, so it answers 404.
 */
export function requirePhotoEditor(db: Db, access: CampaignAccess, observationId: string) {
  const entry = db
    .select({ id: observations.id, authorId: observations.authorId, retired: observations.retired, diveId: observations.diveId })
    .from(observations)
    .where(eq(observations.id, observationId))
    .get();
  if (!entry || entry.retired) throw notFound();
  assertCan(access.role, 'photo.edit', { isAuthor: entry.authorId === access.userId });
  return entry;
}

/**
 * Tells the dive's readers, inside the change's transaction, that an entry's photos changed
 * (added, captioned, moved, retired), so counts, strips and galleries refresh.
 */
function stagePhotosChanged(tx: Executor, stage: StageEvent, observationId: string) {
  const observation = getObservation(tx, observationId);
  if (observation) stage(observation.campaignId, observation.diveId, 'observation.updated', observation);
}

export type PhotoUpdateInput = z.output<typeof photoUpdateSchema>;

/* ---- upload ---- */

export type UploadedFile = { buffer: Buffer; originalname: string };

const sha256 = (data: Buffer) => createHash('sha256').update(data).digest('hex');

type Prepared = { sha: string; name: string; processed: ProcessedPhoto };

/**
 * Adds files to an entry. Every file is checked and re-encoded before anything is written; then
 * the files are written (each one whole, under a generated key) and the rows inserted in one
 * transaction. If anything fails on the way, the files already written are removed again, so a
 * failed upload leaves neither a file nor a row. A file already on the entry is not stored twice.
 */
export async function uploadPhotos(
  db: Db,
  live: LiveHub,
  storage: PhotoStorage,
  target: { observationId: string; campaignId: string; userId: string },
  files: UploadedFile[],
  fields: z.output<typeof photoUploadFieldsSchema>,
): Promise<PhotoUploadResult & { created: number }> {
  if (files.length === 0) {
    throw fieldError('photo', 'No file was sent', 'Attach at least one photo in the field "photo".');
  }
  const campaign = db.select({ keep: campaigns.keepPhotoPositions }).from(campaigns).where(eq(campaigns.id, target.campaignId)).get();
  const keepPositions = campaign?.keep ?? false;

  const existing = db
    .select()
    .from(photos)
    .where(and(eq(photos.observationId, target.observationId), eq(photos.retired, false)))
    .all();
  const bySha = new Map(existing.map((r) => [r.sha256, r]));

  // One slot per file, in request order: an existing photo, or the index of a new one.
  const slots: ({ existing: PhotoRow } | { fresh: number })[] = [];
  const prepared: Prepared[] = [];
  const freshBySha = new Map<string, number>();
  for (const file of files) {
    const sha = sha256(file.buffer);
    const known = bySha.get(sha);
    if (known) {
      slots.push({ existing: known });
      continue;
    }
    const again = freshBySha.get(sha);
    if (again !== undefined) {
      slots.push({ fresh: again });
      continue;
    }
    const processed = await processPhoto(file.buffer, file.originalname, { keepPositions });
    freshBySha.set(sha, prepared.length);
    slots.push({ fresh: prepared.length });
    prepared.push({ sha, name: file.originalname, processed });
  }

  const written: string[] = [];
  const keyed = prepared.map((p) => ({
    ...p,
    keys: {
      original: newPhotoKey('original', p.processed.original.ext),
      display: newPhotoKey('display', p.processed.display.ext),
      thumb: newPhotoKey('thumb', p.processed.thumb.ext),
    },
  }));
  let inserted: PhotoRow[];
  try {
    for (const p of keyed) {
      for (const size of ['original', 'display', 'thumb'] as const) {
        await storage.put(p.keys[size], p.processed[size].data);
        written.push(p.keys[size]);
      }
    }
    inserted = live.withEvents((tx, stage) => {
      const top = tx
        .select({ n: max(photos.position) })
        .from(photos)
        .where(and(eq(photos.observationId, target.observationId), eq(photos.retired, false)))
        .get()?.n;
      let position = top === null || top === undefined ? 0 : top + 1;
      const now = new Date();
      const rows = keyed.map((p) =>
        tx
          .insert(photos)
          .values({
            observationId: target.observationId,
            campaignId: target.campaignId,
            sha256: p.sha,
            mime: p.processed.original.mime,
            width: p.processed.width,
            height: p.processed.height,
            bytes: p.processed.original.data.length,
            originalKey: p.keys.original,
            displayKey: p.keys.display,
            thumbKey: p.keys.thumb,
            originalName: p.name.slice(0, 255),
            caption: fields.caption || null,
            credit: fields.credit || null,
            capturedAt: p.processed.capturedAt,
            lat: p.processed.lat,
            lon: p.processed.lon,
            position: position++,
            uploadedBy: target.userId,
            createdAt: now,
          })
          .returning()
          .get(),
      );
      if (rows.length > 0) stagePhotosChanged(tx, stage, target.observationId);
      return rows;
    });
  } catch (err) {
    await Promise.all(written.map((key) => storage.delete(key).catch(() => undefined)));
    throw err;
  }

  const answered = slots.map((s) => ('existing' in s ? s.existing : inserted[s.fresh]!));
  const duplicates = [...new Set(slots.flatMap((s) => ('existing' in s ? [s.existing.id] : [])))];
  return { photos: answered.map(toPhoto), duplicates, created: inserted.length };
}

/* ---- edit and retire ---- */

export function photoRow(db: Db, photoId: string): PhotoRow | undefined {
  return db.select().from(photos).where(eq(photos.id, photoId)).get();
}

/** A photo that is live and whose entry is live; anything else is "not found". */
function livePhoto(db: Db, photoId: string): PhotoRow {
  const row = db
    .select({ photo: photos, entryRetired: observations.retired })
    .from(photos)
    .innerJoin(observations, eq(observations.id, photos.observationId))
    .where(eq(photos.id, photoId))
    .get();
  if (!row || row.photo.retired || row.entryRetired) throw notFound();
  return row.photo;
}

/** Caption, credit, or a new place in the entry's order (the others close up around it). */
export function updatePhoto(db: Db, live: LiveHub, photoId: string, input: PhotoUpdateInput): Photo {
  const row = livePhoto(db, photoId);
  live.withEvents((tx, stage) => {
    const text: Partial<PhotoRow> = {};
    if (input.caption !== undefined) text.caption = input.caption || null;
    if (input.credit !== undefined) text.credit = input.credit || null;
    if (Object.keys(text).length > 0) tx.update(photos).set(text).where(eq(photos.id, photoId)).run();
    if (input.position !== undefined) {
      const order = tx
        .select({ id: photos.id })
        .from(photos)
        .where(and(eq(photos.observationId, row.observationId), eq(photos.retired, false)))
        .orderBy(asc(photos.position), asc(photos.createdAt))
        .all()
        .map((p) => p.id)
        .filter((id) => id !== photoId);
      order.splice(Math.min(input.position, order.length), 0, photoId);
      order.forEach((id, position) => tx.update(photos).set({ position }).where(eq(photos.id, id)).run());
    }
    stagePhotosChanged(tx, stage, row.observationId);
  });
  return toPhoto(photoRow(db, photoId)!);
}

/** Retires a photo: hidden everywhere, its files kept (nothing is hard-deleted); `actorId` is who retired it. */
export function retirePhoto(db: Db, live: LiveHub, photoId: string, actorId: string): PhotoRow {
  const row = livePhoto(db, photoId);
  live.withEvents((tx, stage) => {
    tx.update(photos).set({ retired: true }).where(eq(photos.id, photoId)).run();
    stagePhotosChanged(tx, stage, row.observationId);
    // A length measured on this photo no longer stands on a photo anyone can see.
    if (reviseLengthAfterPhotoRetired(tx, row.observationId, photoId)) {
      const updated = recordChange(tx, row.observationId, actorId, 'updated');
      stage(updated.campaignId, updated.diveId, 'observation.updated', updated);
    }
  });
  return row;
}

/* ---- serving ---- */

export type PhotoFile = { key: string; mime: string; ext: string; etag: string };

/** Which stored file answers a size, or 404 when the photo or its entry is retired. */
export function photoFile(db: Db, photoId: string, size: PhotoSize): PhotoFile {
  const row = livePhoto(db, photoId);
  const key = size === 'thumb' ? row.thumbKey : size === 'display' ? row.displayKey : row.originalKey;
  const mime = size === 'original' ? row.mime : 'image/webp';
  const ext = key.slice(key.lastIndexOf('.') + 1);
  // Stored files never change under a key, so the key itself makes a strong validator.
  const etag = `"${createHash('sha256').update(key).digest('base64url').slice(0, 27)}"`;
  return { key, mime, ext, etag };
}

/* ---- the dive's gallery ---- */

const decodeCursor = (cursor: string | undefined): number => {
  if (cursor === undefined) return 0;
  if (!/^\d{1,9}$/.test(cursor)) {
    throw fieldError('cursor', 'Use the nextCursor of an earlier page', 'The cursor is not valid.');
  }
  return Number(cursor);
};

/** A dive's photos in the order of its entries (oldest first), then each entry's own order. */
export function galleryOf(db: Db, diveId: string, q: z.output<typeof galleryQuerySchema>): GalleryPage {
  const offset = decodeCursor(q.cursor);
  const where = and(
    ...observationFilters({ diveId, ...(q.kind ? { kinds: [q.kind] } : {}), ...(q.tag ? { tags: [q.tag] } : {}) }),
    eq(photos.retired, false),
  );
  const total = db
    .select({ n: count() })
    .from(photos)
    .innerJoin(observations, eq(observations.id, photos.observationId))
    .where(where)
    .get()!.n;
  const rows = db
    .select({ photo: photos, entry: observations, authorName: user.name })
    .from(photos)
    .innerJoin(observations, eq(observations.id, photos.observationId))
    .innerJoin(user, eq(user.id, observations.authorId))
    .where(where)
    .orderBy(asc(observations.observedAt), asc(observations.id), asc(photos.position), asc(photos.createdAt))
    .limit(q.limit)
    .offset(offset)
    .all();
  const tagsBy = tagsOf(db, [...new Set(rows.map((r) => r.entry.id))]);
  const next = offset + rows.length;
  return {
    items: rows.map((r) => ({
      ...toPhoto(r.photo),
      observation: {
        id: r.entry.id,
        title: r.entry.title,
        kind: r.entry.kind,
        observedAt: r.entry.observedAt.toISOString(),
        tags: tagsBy.get(r.entry.id) ?? [],
        authorName: r.authorName,
      },
    })),
    nextCursor: next < total ? String(next) : null,
    total,
  };
}
