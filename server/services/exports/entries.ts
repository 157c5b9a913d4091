/**
 * Reading a campaign's entries for an export: the ids in the file's order first (small), then
 * the entries themselves a batch at a time with everything a file needs, so that a campaign of
 * any size is never held in memory whole.
 */
import { and, asc, desc, eq, sql, type SQL } from 'drizzle-orm';

import type { Db } from '../../../db/client';
import { finds, observations, user } from '../../../db/schema';
import { SAMPLE_TAG, type DepthSource, type ObservationKind } from '../../../lib/schemas';

type Row = typeof observations.$inferSelect;

export type ExportEntry = Pick<
  Row,
  | 'id'
  | 'diveId'
  | 'campaignId'
  | 'observedAt'
  | 'kind'
  | 'title'
  | 'note'
  | 'depth'
  | 'depthSource'
  | 'lat'
  | 'lon'
  | 'positionSource'
  | 'temperature'
  | 'authorId'
  | 'version'
  | 'createdAt'
  | 'updatedAt'
> & {
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
  individualCount: number | null;
  organismQuantity: number | null;
  organismQuantityType: string | null;
  /** The substrate class's name. */
  substrate: string | null;
  sample: { sampleNumber: string; preservation: string | null } | null;
  sizes: { dimension: string; valueCm: number; method: string }[];
};

export const BATCH = 500;

export type EntryOrder = { sort: 'time' | 'depth' | 'kind' | 'author'; ascending: boolean };

/** The ids of the entries matching `conditions`, in the file's order (the first `limit` of them, for a sample). */
export function entryIds(db: Db, conditions: SQL[], order: EntryOrder = { sort: 'time', ascending: true }, limit?: number): string[] {
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
    .limit(limit ?? -1)
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

type Statement = { all(...params: unknown[]): unknown[] };

type RawEntry = {
  id: string;
  dive_id: string;
  campaign_id: string;
  observed_at: number;
  kind: ObservationKind;
  title: string;
  note: string;
  depth: number | null;
  depth_source: DepthSource | null;
  lat: number | null;
  lon: number | null;
  position_source: DepthSource | null;
  temperature: number | null;
  individual_count: number | null;
  organism_quantity: number | null;
  organism_quantity_type: string | null;
  substrate: string | null;
  author_id: string;
  version: number;
  created_at: number;
  updated_at: number;
};

/** A batch's ids as one JSON parameter, so each statement is prepared once whatever the batch size. */
const IN_BATCH = 'in (select value from json_each(?))';

/**
 * Reads entries by id a batch at a time, keeping the names and dive numbers it has already looked
 * up. Plain prepared statements rather than the query builder: an export runs them thousands of
 * times, and building and preparing each query again cost more than running it.
 */
export class EntryReader {
  private names = new Map<string, string>();
  private diveNumbers = new Map<string, string>();
  private statements: Record<
    'entries' | 'tags' | 'photos' | 'identifications' | 'finds' | 'custody' | 'samples' | 'sizes' | 'names' | 'dives',
    Statement
  >;

  constructor(db: Db) {
    const prepare = (text: string) => db.$client.prepare(text) as unknown as Statement;
    this.statements = {
      entries: prepare(
        `select id, dive_id, campaign_id, observed_at, kind, title, note, depth, depth_source, lat, lon, position_source, temperature,
          individual_count, organism_quantity, organism_quantity_type,
          (select name from substrate_classes s where s.id = observations.substrate_id) as substrate,
          author_id, version, created_at, updated_at from observations where id ${IN_BATCH}`,
      ),
      tags: prepare(
        `select ot.observation_id as id, t.name as name from observation_tags ot join tags t on t.id = ot.tag_id
          where ot.observation_id ${IN_BATCH} order by t.name`,
      ),
      photos: prepare(
        `select id, observation_id from photos where retired = 0 and observation_id ${IN_BATCH} order by position, created_at`,
      ),
      identifications: prepare(
        `select observation_id, scientific_name, taxon_rank, qualifier, taxon_id, verification_status, identified_by
          from identifications where observation_id ${IN_BATCH}`,
      ),
      finds: prepare(
        `select observation_id, find_number, object_type, material, condition, state from finds where observation_id ${IN_BATCH}`,
      ),
      custody: prepare(
        `select observation_id as id, holder, location, container from custody_events where observation_id ${IN_BATCH} order by since, created_at`,
      ),
      samples: prepare(`select observation_id as id, sample_number, preservation from samples where observation_id ${IN_BATCH}`),
      sizes: prepare(`select observation_id as id, dimension, value_cm, method from observation_sizes where observation_id ${IN_BATCH}`),
      names: prepare(`select id, name from user where id ${IN_BATCH}`),
      dives: prepare(`select id, number from dives where id ${IN_BATCH}`),
    };
  }

  private lookUp(cache: Map<string, string>, statement: Statement, ids: string[]) {
    const wanted = [...new Set(ids)].filter((id) => !cache.has(id));
    if (wanted.length > 0) {
      for (const row of statement.all(JSON.stringify(wanted)) as { id: string; name?: string; number?: string }[]) {
        cache.set(row.id, row.name ?? row.number ?? '');
      }
    }
  }

  /** The entries of `ids`, in the order of `ids`. */
  read(ids: string[], parts: { custody?: boolean } = {}): ExportEntry[] {
    if (ids.length === 0) return [];
    const batch = JSON.stringify(ids);
    const st = this.statements;
    const rows = st.entries.all(batch) as RawEntry[];
    const tagRows = st.tags.all(batch) as { id: string; name: string }[];
    const photoRows = st.photos.all(batch) as { id: string; observation_id: string }[];
    const idents = st.identifications.all(batch) as {
      observation_id: string;
      scientific_name: string;
      taxon_rank: string | null;
      qualifier: string | null;
      taxon_id: string | null;
      verification_status: string;
      identified_by: string;
    }[];
    const findRows = st.finds.all(batch) as {
      observation_id: string;
      find_number: string;
      object_type: string | null;
      material: string | null;
      condition: string | null;
      state: 'in-situ' | 'recovered';
    }[];
    const custodyRows = parts.custody
      ? (st.custody.all(batch) as { id: string; holder: string; location: string; container: string | null }[])
      : [];
    const sampleBy = new Map(
      (st.samples.all(batch) as { id: string; sample_number: string; preservation: string | null }[]).map((r) => [
        r.id,
        { sampleNumber: r.sample_number, preservation: r.preservation },
      ]),
    );
    const sizesBy = groupBy(
      st.sizes.all(batch) as { id: string; dimension: string; value_cm: number; method: string }[],
      (r) => r.id,
      (r) => ({ dimension: r.dimension, valueCm: r.value_cm, method: r.method }),
    );
    this.lookUp(this.names, st.names, [...rows.map((r) => r.author_id), ...idents.map((i) => i.identified_by)]);
    this.lookUp(
      this.diveNumbers,
      st.dives,
      rows.map((r) => r.dive_id),
    );
    const name = (id: string) => this.names.get(id) ?? 'Unknown';
    const tagsBy = groupBy(
      tagRows,
      (t) => t.id,
      (t) => t.name,
    );
    const photosBy = groupBy(
      photoRows,
      (p) => p.observation_id,
      (p) => p.id,
    );
    const custodyBy = groupBy(
      custodyRows,
      (c) => c.id,
      (c) => ({ holder: c.holder, location: c.location, container: c.container }),
    );
    const identBy = new Map(idents.map((i) => [i.observation_id, i]));
    const findBy = new Map(findRows.map((f) => [f.observation_id, f]));
    const byId = new Map<string, ExportEntry>();
    for (const r of rows) {
      const ident = identBy.get(r.id);
      const find = findBy.get(r.id);
      byId.set(r.id, {
        id: r.id,
        diveId: r.dive_id,
        campaignId: r.campaign_id,
        observedAt: new Date(r.observed_at),
        kind: r.kind,
        title: r.title,
        note: r.note,
        depth: r.depth,
        depthSource: r.depth_source,
        lat: r.lat,
        lon: r.lon,
        positionSource: r.position_source,
        temperature: r.temperature,
        authorId: r.author_id,
        version: r.version,
        createdAt: new Date(r.created_at),
        updatedAt: new Date(r.updated_at),
        diveNumber: this.diveNumbers.get(r.dive_id) ?? '',
        authorName: name(r.author_id),
        tags: tagsBy.get(r.id) ?? [],
        photoIds: photosBy.get(r.id) ?? [],
        identification: ident
          ? {
              scientificName: ident.scientific_name,
              taxonRank: ident.taxon_rank,
              qualifier: ident.qualifier,
              taxonId: ident.taxon_id,
              verificationStatus: ident.verification_status,
              identifiedByName: name(ident.identified_by),
            }
          : null,
        find: find
          ? {
              findNumber: find.find_number,
              objectType: find.object_type,
              material: find.material,
              condition: find.condition,
              state: find.state,
            }
          : null,
        custody: custodyBy.get(r.id) ?? [],
        individualCount: r.individual_count,
        organismQuantity: r.organism_quantity,
        organismQuantityType: r.organism_quantity_type,
        substrate: r.substrate,
        sample: sampleBy.get(r.id) ?? null,
        sizes: sizesBy.get(r.id) ?? [],
      });
    }
    return ids.map((id) => byId.get(id)).filter((e): e is ExportEntry => e !== undefined);
  }
}

/** Whether an entry records a sample taken: it is in the sample register, or carries the reserved sample tag. */
export const isSampled = (entry: ExportEntry) => entry.sample !== null || entry.tags.some((t) => t.toLowerCase() === SAMPLE_TAG);

/** The live entries of a campaign, optionally of one kind. */
export function campaignConditions(campaignId: string, kind?: Row['kind']): SQL[] {
  return [eq(observations.campaignId, campaignId), eq(observations.retired, false), ...(kind ? [eq(observations.kind, kind)] : [])];
}
