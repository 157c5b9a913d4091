/**
 * Re-stamping a dive's entries from its telemetry log, and telling the dive's live readers which
 * entries changed. Kept apart from telemetry.ts because the announcement needs the observation
 * service, which itself asks telemetry.ts for values.
 */
import type { Db, Executor } from '../../db/client';
import type { LiveHub, StageEvent } from './live';
import { observationsByIds } from './observations';
import { diveFacts, stampDiveObservations, type StampResult } from './telemetry';
import { logOf } from './telemetry-series';

/** Entries read back per query when announcing; far below SQLite's limit on parameters. */
const ANNOUNCE_BATCH = 500;

/**
 * Stages re-stamped entries as `observation.updated`, one event each, inside the transaction that
 * re-stamped them (see `LiveHub.withEvents`).
 */
export function announceStamped(
  tx: Executor,
  stage: StageEvent,
  campaignId: string,
  diveId: string,
  changed: StampResult['changed'],
): void {
  const visible = changed.filter((c) => !c.retired).map((c) => c.id);
  for (let i = 0; i < visible.length; i += ANNOUNCE_BATCH) {
    for (const observation of observationsByIds(tx, visible.slice(i, i + ANNOUNCE_BATCH))) {
      stage(campaignId, diveId, 'observation.updated', observation);
    }
  }
}

/**
 * Stamps every entry of a dive again from its log (after its time or the dive's gap setting
 * changed) and announces the entries that changed.
 */
export function restampDive(db: Db, live: LiveHub, diveId: string): { updated: number; noTelemetry: number } {
  const facts = diveFacts(db, diveId);
  const { series } = logOf(db, diveId);
  return live.withEvents((tx, stage) => {
    const result = stampDiveObservations(db, diveId, series, facts.gapMs);
    announceStamped(tx, stage, facts.campaignId, diveId, result.changed);
    return { updated: result.changed.length, noTelemetry: result.noTelemetry };
  });
}
