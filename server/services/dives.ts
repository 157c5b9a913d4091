import { and, asc, count, eq, inArray, sql } from 'drizzle-orm';

import type { Db, Executor } from '../../db/client';
import { dives, observations } from '../../db/schema';
import { phaseSteps } from '../../lib/dive-phases';
import { FRAME_RATES } from '../../lib/timecode';
import type { z } from 'zod';

import type { diveCreateSchema, diveUpdateSchema, phaseInputSchema, Dive, DivePhase } from '../../lib/schemas';
import { conflict, fieldError, notFound } from '../errors';
import type { LiveHub } from './live';
import { restampDive } from './telemetry-stamp';

type DiveRow = typeof dives.$inferSelect;

const iso = (d: Date | null) => (d ? d.toISOString() : null);

export function toDive(row: DiveRow, observationCount: number): Dive {
  return {
    id: row.id,
    campaignId: row.campaignId,
    number: row.number,
    objectives: row.objectives,
    plannedMaxDepth: row.plannedMaxDepth,
    plannedStartAt: iso(row.plannedStartAt),
    phases: {
      launch: iso(row.launchAt),
      onBottom: iso(row.onBottomAt),
      offBottom: iso(row.offBottomAt),
      onDeck: iso(row.onDeckAt),
    },
    recording: { startAt: iso(row.recordingStartAt), frameRate: row.frameRate },
    telemetryGapS: row.telemetryGapS,
    laserSpacingCm: row.laserSpacingCm,
    observationCount,
    version: row.version,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  };
}

function observationCounts(db: Executor, diveIds: string[]) {
  if (diveIds.length === 0) return new Map<string, number>();
  const rows = db
    .select({ id: observations.diveId, n: count() })
    .from(observations)
    .where(and(inArray(observations.diveId, diveIds), eq(observations.retired, false)))
    .groupBy(observations.diveId)
    .all();
  return new Map(rows.map((r) => [r.id, r.n]));
}

export function listDives(db: Db, campaignId: string): Dive[] {
  const rows = db.select().from(dives).where(eq(dives.campaignId, campaignId)).orderBy(asc(dives.number)).all();
  const counts = observationCounts(
    db,
    rows.map((r) => r.id),
  );
  return rows.map((r) => toDive(r, counts.get(r.id) ?? 0));
}

export function getDive(db: Executor, diveId: string): Dive | undefined {
  const row = db.select().from(dives).where(eq(dives.id, diveId)).get();
  return row ? toDive(row, observationCounts(db, [row.id]).get(row.id) ?? 0) : undefined;
}

export type DiveCreateInput = z.output<typeof diveCreateSchema>;
export type DiveUpdateInput = z.output<typeof diveUpdateSchema>;
export type PhaseInput = z.output<typeof phaseInputSchema>;

export function createDive(db: Db, live: LiveHub, campaignId: string, input: DiveCreateInput): Dive {
  const clash = db
    .select({ id: dives.id })
    .from(dives)
    .where(and(eq(dives.campaignId, campaignId), eq(dives.number, input.number)))
    .get();
  if (clash) throw conflict('duplicate_dive_number', `This campaign already has a dive ${input.number}.`);
  return live.withEvents((tx, stage) => {
    const row = tx
      .insert(dives)
      .values({
        campaignId,
        number: input.number,
        objectives: input.objectives,
        plannedMaxDepth: input.plannedMaxDepth ?? null,
        plannedStartAt: input.plannedStartAt ? new Date(input.plannedStartAt) : null,
        laserSpacingCm: input.laserSpacingCm ?? null,
      })
      .returning()
      .get();
    const dive = toDive(row, 0);
    stage(campaignId, dive.id, 'dive.updated', dive);
    return dive;
  });
}

export function updateDive(db: Db, live: LiveHub, diveId: string, input: DiveUpdateInput): Dive {
  if (input.frameRate != null && !(input.frameRate in FRAME_RATES)) {
    throw fieldError('frameRate', `One of ${Object.keys(FRAME_RATES).join(', ')}`, 'Unknown frame rate.');
  }
  const date = (v: string | null | undefined) => (v === undefined ? undefined : v === null ? null : new Date(v));
  return live.withEvents((tx, stage) => {
    const row = tx
      .update(dives)
      .set({
        ...(input.objectives !== undefined ? { objectives: input.objectives } : {}),
        ...(input.plannedMaxDepth !== undefined ? { plannedMaxDepth: input.plannedMaxDepth } : {}),
        ...(input.plannedStartAt !== undefined ? { plannedStartAt: date(input.plannedStartAt) } : {}),
        ...(input.recordingStartAt !== undefined ? { recordingStartAt: date(input.recordingStartAt) } : {}),
        ...(input.frameRate !== undefined ? { frameRate: input.frameRate } : {}),
        ...(input.telemetryGapS !== undefined ? { telemetryGapS: input.telemetryGapS } : {}),
        ...(input.laserSpacingCm !== undefined ? { laserSpacingCm: input.laserSpacingCm } : {}),
        version: sql`${dives.version} + 1`,
        updatedAt: new Date(),
      })
      .where(and(eq(dives.id, diveId), eq(dives.version, input.version)))
      .returning()
      .get();
    if (!row) {
      const current = db.select({ v: dives.version }).from(dives).where(eq(dives.id, diveId)).get();
      if (!current) throw notFound();
      throw conflict('stale_version', `This dive was changed by someone else (it is at version ${current.v}). Nothing was overwritten.`);
    }
    // A new gap threshold changes which entries fall in a gap of the log.
    if (input.telemetryGapS !== undefined) restampDive(db, live, diveId);
    const dive = getDive(tx, diveId)!;
    stage(dive.campaignId, dive.id, 'dive.updated', dive);
    return dive;
  });
}

type PhaseColumn = 'launchAt' | 'onBottomAt' | 'offBottomAt' | 'onDeckAt';
/** Each phase's column: the dive's field with "At" (launch → launchAt, on-bottom → onBottomAt). */
const phaseColumn = Object.fromEntries(phaseSteps.map((s) => [s.phase, `${s.key}At` as PhaseColumn])) as Record<DivePhase, PhaseColumn>;
const order: DivePhase[] = phaseSteps.map((s) => s.phase);

/**
 * Marks a dive phase (now, or at a given time). Phases must follow each other in time.
 * `onDeck` runs inside the same transaction when the dive first comes on deck (the after-dive digests).
 */
export function setPhase(
  db: Db,
  live: LiveHub,
  diveId: string,
  input: PhaseInput,
  now = new Date(),
  onDeck?: (tx: Executor, dive: Dive) => void,
): Dive {
  const at = input.at === null ? null : input.at ? new Date(input.at) : now;
  const row = db.select().from(dives).where(eq(dives.id, diveId)).get();
  if (!row) throw notFound();
  if (at) {
    const index = order.indexOf(input.phase);
    for (const [i, phase] of order.entries()) {
      const other = row[phaseColumn[phase]];
      if (!other || i === index) continue;
      if ((i < index && other > at) || (i > index && other < at)) {
        throw fieldError(
          'at',
          `${input.phase} cannot be ${i < index ? 'before' : 'after'} ${phase} (${other.toISOString()})`,
          'Dive phases follow each other in time.',
        );
      }
    }
  }
  return live.withEvents((tx, stage) => {
    tx.update(dives)
      .set({ [phaseColumn[input.phase]]: at, version: sql`${dives.version} + 1`, updatedAt: now })
      .where(eq(dives.id, diveId))
      .run();
    const dive = getDive(tx, diveId)!;
    stage(dive.campaignId, dive.id, 'dive.updated', dive);
    if (input.phase === 'on-deck' && at && !row.onDeckAt) onDeck?.(tx, dive);
    return dive;
  });
}
