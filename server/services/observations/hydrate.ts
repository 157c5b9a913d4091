/**
 * The one read model of an entry: a stored row plus its tags, author's name, photo count,
 * identification, find number and sample, each fetched for a whole batch of rows in one query. Lists,
 * details, search, digests, exports and the live feed all read entries through here.
 */
import { and, count, eq, inArray, sql } from 'drizzle-orm';

import type { Executor } from '../../../db/client';
import { inJsonList, preparedOn } from '../../../db/prepared';
import {
  finds,
  identifications,
  observations,
  observationSizes,
  observationTags,
  photos,
  samples,
  substrateClasses,
  tags,
} from '../../../db/schema';
import { sizeDimensions, type Observation, type Sample, type Size } from '../../../lib/schemas';
import { outsideDiveOf } from './dive-window';
import { namesOf, toObservation, type ObservationRow } from './map';

const tagsQuery = (db: Executor) =>
  db
    .select({ observationId: observationTags.observationId, name: tags.name })
    .from(observationTags)
    .innerJoin(tags, eq(tags.id, observationTags.tagId))
    .where(inJsonList(observationTags.observationId, 'ids'))
    .orderBy(tags.name)
    .prepare();

/** Each entry's tag names, in name order. */
export function tagsOf(db: Executor, ids: readonly string[]): Map<string, string[]> {
  const tagsBy = new Map<string, string[]>();
  if (ids.length === 0) return tagsBy;
  for (const t of preparedOn(db, tagsQuery).all({ ids: JSON.stringify(ids) })) {
    const list = tagsBy.get(t.observationId);
    if (list) list.push(t.name);
    else tagsBy.set(t.observationId, [t.name]);
  }
  return tagsBy;
}

const findNumbersQuery = (db: Executor) =>
  db.select({ id: finds.observationId, n: finds.findNumber }).from(finds).where(inJsonList(finds.observationId, 'ids')).prepare();

/** Each entry's find number, where it has a find. */
export function findNumbersOf(db: Executor, ids: readonly string[]): Map<string, string> {
  if (ids.length === 0) return new Map();
  return new Map(
    preparedOn(db, findNumbersQuery)
      .all({ ids: JSON.stringify(ids) })
      .map((f) => [f.id, f.n]),
  );
}

const samplesQuery = (db: Executor) => db.select().from(samples).where(inJsonList(samples.observationId, 'ids')).prepare();

/** The samples of entries by entry id, one query. */
export function samplesOf(db: Executor, ids: readonly string[]): Map<string, Sample> {
  if (ids.length === 0) return new Map();
  return new Map(
    preparedOn(db, samplesQuery)
      .all({ ids: JSON.stringify(ids) })
      .map((s) => [
        s.observationId,
        {
          sampleNumber: s.sampleNumber,
          sampleType: s.sampleType,
          gear: s.gear,
          container: s.container,
          preservation: s.preservation,
          parentSampleNumber: s.parentSampleNumber,
          lab: s.lab,
        },
      ]),
  );
}

const sizesQuery = (db: Executor) => db.select().from(observationSizes).where(inJsonList(observationSizes.observationId, 'ids')).prepare();

/** Each entry's sizes, length before width before height. */
export function sizesOf(db: Executor, ids: readonly string[]): Map<string, Size[]> {
  const by = new Map<string, Size[]>();
  if (ids.length === 0) return by;
  for (const s of preparedOn(db, sizesQuery).all({ ids: JSON.stringify(ids) })) {
    const list = by.get(s.observationId) ?? [];
    list.push({ dimension: s.dimension, valueCm: s.valueCm, method: s.method });
    by.set(s.observationId, list);
  }
  for (const list of by.values()) list.sort((a, b) => sizeDimensions.indexOf(a.dimension) - sizeDimensions.indexOf(b.dimension));
  return by;
}

const substrateNamesQuery = (db: Executor) =>
  db
    .select({ id: substrateClasses.id, name: substrateClasses.name })
    .from(substrateClasses)
    .where(inJsonList(substrateClasses.id, 'ids'))
    .prepare();

/** The substrate classes' names the rows point at, one query. */
function substrateNamesOf(db: Executor, rows: ObservationRow[]): Map<string, string> {
  const wanted = [...new Set(rows.map((r) => r.substrateId).filter((i): i is string => !!i))];
  if (wanted.length === 0) return new Map();
  return new Map(
    preparedOn(db, substrateNamesQuery)
      .all({ ids: JSON.stringify(wanted) })
      .map((c) => [c.id, c.name]),
  );
}

const photoCountsQuery = (db: Executor) =>
  db
    .select({ id: photos.observationId, n: count() })
    .from(photos)
    .where(and(inJsonList(photos.observationId, 'ids'), eq(photos.retired, false)))
    .groupBy(photos.observationId)
    .prepare();

function photoCountsOf(db: Executor, ids: readonly string[]): Map<string, number> {
  return new Map(
    preparedOn(db, photoCountsQuery)
      .all({ ids: JSON.stringify(ids) })
      .map((p) => [p.id, p.n]),
  );
}

const identificationsQuery = (db: Executor) =>
  db.select().from(identifications).where(inJsonList(identifications.observationId, 'ids')).prepare();

/**
 * Tags, names, photo counts, identifications and find numbers for a batch of rows, a query each.
 * `fresh`: the rows were created in this transaction, so they have no photo, identification,
 * find or sample yet, and those are not looked up.
 */
export function hydrate(db: Executor, rows: ObservationRow[], options: { fresh?: boolean } = {}): Observation[] {
  if (rows.length === 0) return [];
  const ids = rows.map((r) => r.id);
  const fresh = options.fresh === true;
  const tagsBy = tagsOf(db, ids);
  const names = namesOf(
    db,
    rows.map((r) => r.authorId),
  );
  const photoCounts = fresh ? new Map<string, number>() : photoCountsOf(db, ids);
  const idents = new Map(
    fresh
      ? []
      : preparedOn(db, identificationsQuery)
          .all({ ids: JSON.stringify(ids) })
          .map((i) => [i.observationId, i]),
  );
  const findNumbers = fresh ? new Map<string, string>() : findNumbersOf(db, ids);
  const outside = outsideDiveOf(db, rows);
  const samplesBy = fresh ? new Map<string, Sample>() : samplesOf(db, ids);
  const sizesBy = sizesOf(db, ids);
  const substrates = substrateNamesOf(db, rows);
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
      outsideDive: outside.get(r.id) ?? false,
      sample: samplesBy.get(r.id) ?? null,
      sizes: sizesBy.get(r.id) ?? [],
      substrate: r.substrateId ? (substrates.get(r.substrateId) ?? null) : null,
    });
  });
}

const rowQuery = (db: Executor) =>
  db
    .select()
    .from(observations)
    .where(eq(observations.id, sql.placeholder('id')))
    .prepare();

export function getObservationRow(db: Executor, id: string): ObservationRow | undefined {
  return preparedOn(db, rowQuery).get({ id });
}

export function getObservation(db: Executor, id: string): Observation | undefined {
  const row = getObservationRow(db, id);
  return row ? hydrate(db, [row])[0] : undefined;
}

/** Entries by id (in no particular order), for announcing a batch of changes. */
export function observationsByIds(db: Executor, ids: readonly string[]): Observation[] {
  if (ids.length === 0) return [];
  return hydrate(
    db,
    db
      .select()
      .from(observations)
      .where(inArray(observations.id, [...ids]))
      .all(),
  );
}
