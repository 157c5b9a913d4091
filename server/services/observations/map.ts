import type { Executor } from '../../../db/client';
import { inJsonList, preparedOn } from '../../../db/prepared';
import { type observations, user } from '../../../db/schema';
import type { Observation } from '../../../lib/schemas';

export type ObservationRow = typeof observations.$inferSelect;

export type Actor = { userId: string; role: string };

/** A stored row as the contract's observation, given what hangs off it. */
export function toObservation(
  row: ObservationRow,
  extra: Pick<
    Observation,
    'tags' | 'outsideDive' | 'authorName' | 'photoCount' | 'identification' | 'findNumber' | 'sample' | 'sizes' | 'substrate'
  >,
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
    heading: row.heading,
    headingSource: row.headingSource,
    altitude: row.altitude,
    altitudeSource: row.altitudeSource,
    individualCount: row.individualCount,
    organismQuantity: row.organismQuantity,
    organismQuantityType: row.organismQuantityType,
    ...extra,
    authorId: row.authorId,
    version: row.version,
    retired: row.retired,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  };
}

const namesQuery = (db: Executor) => db.select({ id: user.id, name: user.name }).from(user).where(inJsonList(user.id, 'ids')).prepare();

/** People's display names by id, one query. */
export function namesOf(db: Executor, ids: (string | null)[]): Map<string, string> {
  const wanted = [...new Set(ids.filter((i): i is string => !!i))];
  if (wanted.length === 0) return new Map();
  return new Map(
    preparedOn(db, namesQuery)
      .all({ ids: JSON.stringify(wanted) })
      .map((u) => [u.id, u.name]),
  );
}
