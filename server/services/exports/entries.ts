/**
 * Reading a campaign's entries for an export: the ids in the file's order first (small), then
 * the entries themselves a batch at a time with everything a file needs, so that a campaign of
 * any size is never held in memory whole.
 */
import { and, asc, desc, eq, inArray, sql, type SQL } from 'drizzle-orm';

import type { Db } from '../../../db/client';
import { custodyEvents, dives, finds, identifications, observations, observationTags, photos, tags, user } from '../../../db/schema';
import { SAMPLE_TAG } from '../../../lib/schemas';

type Row = typeof observations.$inferSelect;

export type ExportEntry = Row & {
  diveNumber: string;
  authorName: string;
  tags: string[];
  photoIds: string[];
  identification: {
    scientificName: string;
    taxonRank: string | null;
    qualifier: string | null;
    taxonId: string | null;
    verificationStatus: string;
    identifiedByName: string;
  } | null;
  find: {
    findNumber: string;
    objectType: string | null;
    material: string | null;
    condition: string | null;
    state: 'in-situ' | 'recovered';
  } | null;
  custody: { holder: string; location: string; container: string | null }[];
};

export const BATCH = 500;

export type EntryOrder = { sort: 'time' | 'depth' | 'kind' | 'author'; ascending: boolean };

/** The ids of the entries matching `conditions`, in the file's order. */
export function entryIds(db: Db, conditions: SQL[], order: EntryOrder = { sort: 'time', ascending: true }): string[] {
  const dir = order.ascending ? asc : desc;
  const key =
    order.sort === 'time'
      ? []
      : order.sort === 'depth'
        ? [sql`${observations.depth} is null`, dir(observations.depth)]
        : order.sort === 'kind'
          ? [dir(observations.kind)]
          : [dir(sql`(select lower(name) from ${user} u where u.id = ${observations.authorId})`)];
  return db
    .select({ id: observations.id })
    .from(observations)
    .where(and(...conditions))
    .orderBy(...key, dir(observations.observedAt), dir(observations.id))
    .all()
    .map((r) => r.id);
}

/** The ids of a campaign's live finds, in find-number order is left to the caller (natural sort). */
export function findIds(db: Db, campaignId: string): { id: string; findNumber: string }[] {
  return db
    .select({ id: finds.observationId, findNumber: finds.findNumber })
    .from(finds)
    .innerJoin(observations, eq(observations.id, finds.observationId))
    .where(and(eq(finds.campaignId, campaignId), eq(observations.retired, false)))
    .all();
}

function groupBy<T, V>(items: T[], key: (t: T) => string, value: (t: T) => V): Map<string, V[]> {
  const out = new Map<string, V[]>();
  for (const item of items) {
    const k = key(item);
    const list = out.get(k);
    if (list) list.push(value(item));
    else out.set(k, [value(item)]);
  }
  return out;
}

/** Reads entries by id a batch at a time, keeping the names and dive numbers it has already looked up. */
export class EntryReader {
  private names = new Map<string, string>();
  private diveNumbers = new Map<string, string>();

  constructor(private db: Db) {}

  private nameOf(ids: string[]) {
    const wanted = [...new Set(ids)].filter((id) => !this.names.has(id));
    if (wanted.length > 0) {
      for (const u of this.db.select({ id: user.id, name: user.name }).from(user).where(inArray(user.id, wanted)).all()) {
        this.names.set(u.id, u.name);
      }
    }
    return (id: string) => this.names.get(id) ?? 'Unknown';
  }

  private diveOf(ids: string[]) {
    const wanted = [...new Set(ids)].filter((id) => !this.diveNumbers.has(id));
    if (wanted.length > 0) {
      for (const d of this.db.select({ id: dives.id, number: dives.number }).from(dives).where(inArray(dives.id, wanted)).all()) {
        this.diveNumbers.set(d.id, d.number);
      }
    }
    return (id: string) => this.diveNumbers.get(id) ?? '';
  }

  /** The entries of `ids`, in the order of `ids`. */
  read(ids: string[], parts: { custody?: boolean } = {}): ExportEntry[] {
    if (ids.length === 0) return [];
    const db = this.db;
    const rows = db.select().from(observations).where(inArray(observations.id, ids)).all();
    const tagRows = db
      .select({ id: observationTags.observationId, name: tags.name })
      .from(observationTags)
      .innerJoin(tags, eq(tags.id, observationTags.tagId))
      .where(inArray(observationTags.observationId, ids))
      .orderBy(tags.name)
      .all();
    const photoRows = db
      .select({ id: photos.id, observationId: photos.observationId })
      .from(photos)
      .where(and(inArray(photos.observationId, ids), eq(photos.retired, false)))
      .orderBy(photos.position, photos.createdAt)
      .all();
    const idents = db.select().from(identifications).where(inArray(identifications.observationId, ids)).all();
    const findRows = db.select().from(finds).where(inArray(finds.observationId, ids)).all();
    const custodyRows = parts.custody
      ? db
          .select({
            id: custodyEvents.observationId,
            holder: custodyEvents.holder,
            location: custodyEvents.location,
            container: custodyEvents.container,
          })
          .from(custodyEvents)
          .where(inArray(custodyEvents.observationId, ids))
          .orderBy(custodyEvents.since, custodyEvents.createdAt)
          .all()
      : [];
    const name = this.nameOf([...rows.map((r) => r.authorId), ...idents.map((i) => i.identifiedBy)]);
    const dive = this.diveOf(rows.map((r) => r.diveId));
    const tagsBy = groupBy(
      tagRows,
      (t) => t.id,
      (t) => t.name,
    );
    const photosBy = groupBy(
      photoRows,
      (p) => p.observationId,
      (p) => p.id,
    );
    const custodyBy = groupBy(
      custodyRows,
      (c) => c.id,
      (c) => ({ holder: c.holder, location: c.location, container: c.container }),
    );
    const identBy = new Map(idents.map((i) => [i.observationId, i]));
    const findBy = new Map(findRows.map((f) => [f.observationId, f]));
    const byId = new Map<string, ExportEntry>();
    for (const r of rows) {
      const ident = identBy.get(r.id);
      const find = findBy.get(r.id);
      byId.set(r.id, {
        ...r,
        diveNumber: dive(r.diveId),
        authorName: name(r.authorId),
        tags: tagsBy.get(r.id) ?? [],
        photoIds: photosBy.get(r.id) ?? [],
        identification: ident
          ? {
              scientificName: ident.scientificName,
              taxonRank: ident.taxonRank,
              qualifier: ident.qualifier,
              taxonId: ident.taxonId,
              verificationStatus: ident.verificationStatus,
              identifiedByName: name(ident.identifiedBy),
            }
          : null,
        find: find
          ? {
              findNumber: find.findNumber,
              objectType: find.objectType,
              material: find.material,
              condition: find.condition,
              state: find.state,
            }
          : null,
        custody: custodyBy.get(r.id) ?? [],
      });
    }
    return ids.map((id) => byId.get(id)).filter((e): e is ExportEntry => e !== undefined);
  }
}

/** Whether an entry records a sample taken (it carries the reserved sample tag). */
export const isSampled = (entry: ExportEntry) => entry.tags.some((t) => t.toLowerCase() === SAMPLE_TAG);

/** The live entries of a campaign, optionally of one kind. */
export function campaignConditions(campaignId: string, kind?: Row['kind']): SQL[] {
  return [eq(observations.campaignId, campaignId), eq(observations.retired, false), ...(kind ? [eq(observations.kind, kind)] : [])];
}
