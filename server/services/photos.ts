import { and, asc, eq, inArray } from 'drizzle-orm';

import type { Db } from '../../db/client';
import { photos } from '../../db/schema';
import type { Photo } from '../../lib/schemas';

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
