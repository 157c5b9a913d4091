import type { Executor } from '../../../db/client';
import { inJsonList, preparedOn } from '../../../db/prepared';
import { dives } from '../../../db/schema';
import { isOutsideDive } from '../../../lib/dive-window';
import type { ObservationRow } from './map';

const iso = (d: Date | null) => (d ? d.toISOString() : null);

const timingQuery = (db: Executor) =>
  db
    .select({ id: dives.id, launchAt: dives.launchAt, onDeckAt: dives.onDeckAt, plannedStartAt: dives.plannedStartAt })
    .from(dives)
    .where(inJsonList(dives.id, 'ids'))
    .prepare();

/**
 * Which entries lie outside their dive's window (an hour either side of launch and on deck, or a
 * day either side of a planned start): taken as logged, but marked, so a wrong date or a clock in
 * local time shows. One query for the batch's dives.
 */
export function outsideDiveOf(db: Executor, rows: readonly ObservationRow[]): Map<string, boolean> {
  const diveIds = [...new Set(rows.map((r) => r.diveId))];
  if (diveIds.length === 0) return new Map();
  const timing = new Map(
    preparedOn(db, timingQuery)
      .all({ ids: JSON.stringify(diveIds) })
      .map((d) => [
        d.id,
        {
          phases: { launch: iso(d.launchAt), onBottom: null, offBottom: null, onDeck: iso(d.onDeckAt) },
          plannedStartAt: iso(d.plannedStartAt),
        },
      ]),
  );
  return new Map(
    rows.map((r) => {
      const dive = timing.get(r.diveId);
      return [r.id, dive ? isOutsideDive(dive, r.observedAt.toISOString()) : false];
    }),
  );
}
