/**
 * Measurements on photos with the laser scale: kept with the photo and its entry (who, when), and
 * a length on a biology entry becomes the entry's measured length, so it counts among its sizes.
 */
import { and, asc, desc, eq } from 'drizzle-orm';

import type { Db, Executor } from '../../db/client';
import { observationSizes, observations, photoMeasurements, photos, user } from '../../db/schema';
import { decimalsFor, measure, MeasureError } from '../../lib/laser-scale';
import type { Measurement, MeasurementCreate } from '../../lib/schemas';
import { ApiError, notFound } from '../errors';
import { assertCan, type CampaignAccess } from '../middleware/campaign-access';
import type { LiveHub } from './live';
import { recordChange } from './observations/revisions';

type Row = typeof photoMeasurements.$inferSelect;

function toMeasurement(row: Row, createdByName: string): Measurement {
  return {
    id: row.id,
    photoId: row.photoId,
    observationId: row.observationId,
    kind: row.kind,
    spacingCm: row.spacingCm,
    laser: row.laser,
    points: row.points,
    placementPx: row.placementPx,
    value: row.value,
    unit: row.unit,
    uncertainty: row.uncertainty,
    createdBy: row.createdBy,
    createdByName,
    createdAt: row.createdAt.toISOString(),
  };
}

/** A live photo on a live entry, with the entry's author and kind; anything else is "not found". */
function livePhotoEntry(db: Executor, photoId: string) {
  const row = db
    .select({
      photo: photos,
      authorId: observations.authorId,
      entryRetired: observations.retired,
      kind: observations.kind,
    })
    .from(photos)
    .innerJoin(observations, eq(observations.id, photos.observationId))
    .where(eq(photos.id, photoId))
    .get();
  if (!row || row.photo.retired || row.entryRetired) throw notFound();
  return row;
}

/** Whoever may edit the entry may measure on its photos. */
function requireEntryEditor(access: CampaignAccess, authorId: string) {
  assertCan(access.role, 'entry.edit', { isAuthor: authorId === access.userId });
}

/** Refuses (404 or 403) a caller who may not measure on this photo; used before the body is read. */
export function requireMeasurer(db: Executor, access: CampaignAccess, photoId: string) {
  requireEntryEditor(access, livePhotoEntry(db, photoId).authorId);
}

/** A length goes into the entry's sizes as shown, to the figures its uncertainty allows. */
const sizeCm = (value: number, uncertainty: number) => Number(value.toFixed(decimalsFor(uncertainty)));

/** Makes a length measurement the entry's length, remembering which one it is; false when it is out of a size's range. */
function writeMeasuredLength(tx: Executor, observationId: string, m: Pick<Row, 'id' | 'value' | 'uncertainty'>): boolean {
  const valueCm = sizeCm(m.value, m.uncertainty);
  if (!(valueCm > 0 && valueCm <= 100_000)) return false;
  const set = { valueCm, method: 'measured' as const, measurementId: m.id };
  tx.insert(observationSizes)
    .values({ observationId, dimension: 'length', ...set })
    .onConflictDoUpdate({ target: [observationSizes.observationId, observationSizes.dimension], set })
    .run();
  return true;
}

/**
 * After a length measurement is removed: when the entry's length was taken from it, the latest
 * length still measured on the entry's photos takes its place, or the length goes when none is left.
 * A length a person gave, or one taken from another measurement, stays as it is. True when it changed.
 */
function reviseMeasuredLength(tx: Executor, observationId: string, removedId: string): boolean {
  const size = tx
    .select({ measurementId: observationSizes.measurementId })
    .from(observationSizes)
    .where(and(eq(observationSizes.observationId, observationId), eq(observationSizes.dimension, 'length')))
    .get();
  if (!size || size.measurementId !== removedId) return false;
  const remaining = tx
    .select({ id: photoMeasurements.id, value: photoMeasurements.value, uncertainty: photoMeasurements.uncertainty })
    .from(photoMeasurements)
    .innerJoin(photos, eq(photos.id, photoMeasurements.photoId))
    .where(
      and(
        eq(photoMeasurements.observationId, observationId),
        eq(photoMeasurements.kind, 'length'),
        eq(photoMeasurements.retired, false),
        eq(photos.retired, false),
      ),
    )
    .orderBy(desc(photoMeasurements.createdAt), desc(photoMeasurements.id))
    .all();
  for (const m of remaining) if (writeMeasuredLength(tx, observationId, m)) return true;
  tx.delete(observationSizes)
    .where(and(eq(observationSizes.observationId, observationId), eq(observationSizes.dimension, 'length')))
    .run();
  return true;
}

/**
 * After a photo is retired: an entry length taken from one of its measurements is taken again from
 * the measurements left on the entry's other photos, or cleared. True when the length changed.
 */
export function reviseLengthAfterPhotoRetired(tx: Executor, observationId: string, photoId: string): boolean {
  const source = tx
    .select({ id: photoMeasurements.id })
    .from(observationSizes)
    .innerJoin(photoMeasurements, eq(photoMeasurements.id, observationSizes.measurementId))
    .where(
      and(
        eq(observationSizes.observationId, observationId),
        eq(observationSizes.dimension, 'length'),
        eq(photoMeasurements.photoId, photoId),
      ),
    )
    .get();
  return source ? reviseMeasuredLength(tx, observationId, source.id) : false;
}

export function createMeasurement(db: Db, live: LiveHub, access: CampaignAccess, photoId: string, input: MeasurementCreate): Measurement {
  const entry = livePhotoEntry(db, photoId);
  requireEntryEditor(access, entry.authorId);
  let result;
  try {
    result = measure({ ...input, image: { width: entry.photo.width, height: entry.photo.height } });
  } catch (err) {
    if (err instanceof MeasureError) throw new ApiError(400, 'validation_failed', err.message, [{ path: err.path, message: err.message }]);
    throw err;
  }
  const now = new Date();
  const row = live.withEvents((tx, stage) => {
    const inserted = tx
      .insert(photoMeasurements)
      .values({
        photoId,
        observationId: entry.photo.observationId,
        kind: input.kind,
        spacingCm: input.spacingCm,
        laser: input.laser.map((p) => [p[0], p[1]] as [number, number]),
        points: input.points.map((p) => [p[0], p[1]] as [number, number]),
        placementPx: input.placementPx ?? 2,
        value: result.value,
        unit: result.unit,
        uncertainty: result.uncertainty,
        createdBy: access.userId,
        createdAt: now,
      })
      .returning()
      .get();
    // Sizes belong to biology entries; there the newest length measured is the entry's length.
    if (input.kind === 'length' && entry.kind === 'biology' && writeMeasuredLength(tx, entry.photo.observationId, inserted)) {
      const updated = recordChange(tx, entry.photo.observationId, access.userId, 'updated', now);
      stage(updated.campaignId, updated.diveId, 'observation.updated', updated);
    }
    return inserted;
  });
  return toMeasurement(row, nameOf(db, access.userId));
}

function nameOf(db: Executor, userId: string): string {
  return db.select({ name: user.name }).from(user).where(eq(user.id, userId)).get()?.name ?? '';
}

function listWhere(db: Executor, where: ReturnType<typeof and>): Measurement[] {
  return db
    .select({ m: photoMeasurements, name: user.name })
    .from(photoMeasurements)
    .innerJoin(user, eq(user.id, photoMeasurements.createdBy))
    .innerJoin(photos, eq(photos.id, photoMeasurements.photoId))
    .where(and(where, eq(photoMeasurements.retired, false), eq(photos.retired, false)))
    .orderBy(asc(photoMeasurements.createdAt), asc(photoMeasurements.id))
    .all()
    .map((r) => toMeasurement(r.m, r.name));
}

/** A photo's measurements, oldest first. */
export function photoMeasurementsOf(db: Db, photoId: string): Measurement[] {
  livePhotoEntry(db, photoId);
  return listWhere(db, eq(photoMeasurements.photoId, photoId));
}

/** Every measurement on an entry's live photos, oldest first. */
export function entryMeasurementsOf(db: Db, observationId: string): Measurement[] {
  const entry = db.select({ retired: observations.retired }).from(observations).where(eq(observations.id, observationId)).get();
  if (!entry || entry.retired) throw notFound();
  return listWhere(db, eq(photoMeasurements.observationId, observationId));
}

/**
 * Retires a measurement (kept, no longer shown): its maker while they may still edit the entry, or
 * a lead. An entry length taken from it is taken again from the measurements left (see above).
 */
export function retireMeasurement(db: Db, live: LiveHub, access: CampaignAccess, measurementId: string) {
  const row = db
    .select({ m: photoMeasurements, authorId: observations.authorId, entryRetired: observations.retired })
    .from(photoMeasurements)
    .innerJoin(observations, eq(observations.id, photoMeasurements.observationId))
    .where(eq(photoMeasurements.id, measurementId))
    .get();
  if (!row || row.m.retired || row.entryRetired) throw notFound();
  requireEntryEditor(access, row.authorId);
  if (access.role !== 'lead' && row.m.createdBy !== access.userId) {
    throw new ApiError(403, 'forbidden', 'Only the person who made a measurement or a campaign lead may remove it.');
  }
  live.withEvents((tx, stage) => {
    tx.update(photoMeasurements).set({ retired: true }).where(eq(photoMeasurements.id, measurementId)).run();
    if (row.m.kind === 'length' && reviseMeasuredLength(tx, row.m.observationId, measurementId)) {
      const updated = recordChange(tx, row.m.observationId, access.userId, 'updated');
      stage(updated.campaignId, updated.diveId, 'observation.updated', updated);
    }
  });
}

export const measurementCampaignOf = (db: Executor, measurementId: string): string | undefined =>
  db
    .select({ c: observations.campaignId })
    .from(photoMeasurements)
    .innerJoin(observations, eq(observations.id, photoMeasurements.observationId))
    .where(eq(photoMeasurements.id, measurementId))
    .get()?.c;
