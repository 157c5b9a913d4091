/**
 * The one read model of an entry: a stored row plus its tags, author's name, photo count,
 * identification, find number and sample, each fetched for a whole batch of rows in one query. Lists,
 * details, search, digests, exports and the live feed all read entries through here.
 */
import { and, count, eq, inArray } from 'drizzle-orm';

import type { Executor } from '../../../db/client';
import { finds, identifications, observations, observationTags, photos, samples, tags } from '../../../db/schema';
import type { Observation, Sample } from '../../../lib/schemas';
import { outsideDiveOf } from './dive-window';
import { namesOf, toObservation, type ObservationRow } from './map';

/** Each entry's tag names, in name order. */
export function tagsOf(db: Executor, ids: readonly string[]): Map<string, string[]> {
  const tagsBy = new Map<string, string[]>();
  if (ids.length === 0) return tagsBy;
  for (const t of db
    .select({ observationId: observationTags.observationId, name: tags.name })
    .from(observationTags)
    .innerJoin(tags, eq(tags.id, observationTags.tagId))
    .where(inArray(observationTags.observationId, [...ids]))
    .orderBy(tags.name)
    .all()) {
    const list = tagsBy.get(t.observationId);
    if (list) list.push(t.name);
    else tagsBy.set(t.observationId, [t.name]);
  }
  return tagsBy;
}

/** Each entry's find number, where it has a find. */
export function findNumbersOf(db: Executor, ids: readonly string[]): Map<string, string> {
  if (ids.length === 0) return new Map();
  return new Map(
    db
      .select({ id: finds.observationId, n: finds.findNumber })
      .from(finds)
      .where(inArray(finds.observationId, [...ids]))
      .all()
      .map((f) => [f.id, f.n]),
  );
}

/** The samples of entries by entry id, one query. */
export function samplesOf(db: Executor, ids: readonly string[]): Map<string, Sample> {
  if (ids.length === 0) return new Map();
  return new Map(
    db
      .select()
      .from(samples)
      .where(inArray(samples.observationId, [...ids]))
      .all()
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

function photoCountsOf(db: Executor, ids: readonly string[]): Map<string, number> {
  return new Map(
    db
      .select({ id: photos.observationId, n: count() })
      .from(photos)
      .where(and(inArray(photos.observationId, [...ids]), eq(photos.retired, false)))
      .groupBy(photos.observationId)
      .all()
      .map((p) => [p.id, p.n]),
  );
}

/** Tags, names, photo counts, identifications and find numbers for a batch of rows, a query each. */
export function hydrate(db: Executor, rows: ObservationRow[]): Observation[] {
  if (rows.length === 0) return [];
  const ids = rows.map((r) => r.id);
  const tagsBy = tagsOf(db, ids);
  const names = namesOf(
    db,
    rows.map((r) => r.authorId),
  );
  const photoCounts = photoCountsOf(db, ids);
  const idents = new Map(
    db
      .select()
      .from(identifications)
      .where(inArray(identifications.observationId, ids))
      .all()
      .map((i) => [i.observationId, i]),
  );
  const findNumbers = findNumbersOf(db, ids);
  const outside = outsideDiveOf(db, rows);
  const samplesBy = samplesOf(db, ids);
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
    });
  });
}

export function getObservationRow(db: Executor, id: string): ObservationRow | undefined {
  return db.select().from(observations).where(eq(observations.id, id)).get();
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
