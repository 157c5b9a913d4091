/**
 * Re-stamping a dive's entries from its telemetry log, and telling the dive's live readers which
 * entries changed. Kept apart from telemetry.ts because the announcement needs the observation
 * service, which itself asks telemetry.ts for values.
 */
import type { Db } from '../../db/client';
import type { LiveHub, StageEvent } from './live';
import { diveFacts, stampDiveObservations, type StampResult } from './telemetry';
import { logOf } from './telemetry-series';

/**
 * Stages one `dive.restamped` event for entries stamped again from the log (however many), inside
 * the transaction that stamped them (see `LiveHub.withEvents`): readers fetch again what they
 * show of the dive, rather than taking one event per entry across the link.
 */
export function announceStamped(stage: StageEvent, campaignId: string, diveId: string, changed: StampResult['changed']): void {
  const updated = changed.filter((c) => !c.retired).length;
  if (updated > 0) stage(campaignId, diveId, 'dive.restamped', { diveId, updated });
}

/**
 * Stamps every entry of a dive again from its log (after its time or the dive's gap setting
 * changed) and announces the entries that changed.
 */
export function restampDive(db: Db, live: LiveHub, diveId: string): { updated: number; noTelemetry: number } {
  const facts = diveFacts(db, diveId);
  const { series } = logOf(db, diveId);
  return live.withEvents((_tx, stage) => {
    const result = stampDiveObservations(db, diveId, series, facts.gapMs);
    announceStamped(stage, facts.campaignId, diveId, result.changed);
    return { updated: result.changed.length, noTelemetry: result.noTelemetry };
  });
}
