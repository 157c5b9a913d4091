/**
 * Search over every entry a person may read: the index file (store.ts), its words in memory for
 * typos (vocabulary.ts), the typed query made safe (query.ts), and the ranking: an exact find
 * number or scientific name first, then titles holding the typed words side by side, then FTS5's
 * bm25 with the title, tags, scientific name and find number weighted above the note. The entry filters are the dive log's own
 * (`observationFilters`), so a filter means the same everywhere.
 */
import { and, eq, inArray, sql, type SQL } from 'drizzle-orm';
import { integer, sqliteTable, SQLiteSyncDialect } from 'drizzle-orm/sqlite-core';
import type { Statement } from 'better-sqlite3';
import { z } from 'zod';

import type { Db } from '../../../db/client';
import { campaigns, dives, finds, identifications, observations, photos } from '../../../db/schema';
import type { Observation } from '../../../lib/schemas';
import type { SearchField, SearchPage, SearchQuery, SearchResult, TextSegment } from '../../../lib/schemas/search';
import { markMatches, tokenize } from '../../../lib/search-terms';
import { memberCampaignIds } from '../../middleware/campaign-access';
import { cursorCodec, filtersFromQuery, observationFilters, offsetCursorSchema } from '../observations/filters';
import { observationsByIds } from '../observations/hydrate';
import { groupsMatch, holdsPhrase, matcherOf, planQuery, quoted, type QueryPlan } from './query';
import { openIndexStore, scopeToken, type IndexStart } from './store';
import { Vocabulary } from './vocabulary';

/** The FTS5 table as a query builder sees it (it lives in the attached index file, not in db/schema.ts). */
const searchEntries = sqliteTable('search_entries', { rowid: integer('rowid') });

/** bm25 weights in the FTS table's column order: title, tags, scientific name, find number, note, scope. */
const score = sql<number>`bm25(search_entries, 10.0, 6.0, 8.0, 8.0, 1.0, 0.0)`;
/** Below this many entries holding it, a word always ranks (its rarity is cheap to count). */
const COMMON_FLOOR = 20_000;
/** How many of the best matches the phrase rule reorders. */
const PHRASE_REACH = 1000;
const entryRowid = sql`${observations}.rowid`;
const dialect = new SQLiteSyncDialect();

const searchCursorSchema = offsetCursorSchema.extend({ w: z.literal(1).optional() });

export type SearchCaller = { id: string; siteRole: string };

type RankedRow = { rowid: number; id: string; score: number };
type Ranking = { plan: QueryPlan; rows: RankedRow[]; exact: number[]; widened: boolean; total: number; depth: number };

/** The last few rankings, each valid for one state of the record. */
class RankingCache {
  private readonly entries = new Map<string, { state: number; ranking: Ranking }>();

  constructor(private readonly size: number) {}

  get(key: string, state: number): Ranking | undefined {
    const hit = this.entries.get(key);
    if (!hit) return undefined;
    this.entries.delete(key);
    if (hit.state !== state) return undefined;
    this.entries.set(key, hit);
    return hit.ranking;
  }

  set(key: string, state: number, ranking: Ranking) {
    this.entries.delete(key);
    this.entries.set(key, { state, ranking });
    if (this.entries.size > this.size) this.entries.delete(this.entries.keys().next().value!);
  }
}

export class SearchIndex {
  readonly vocabulary: Vocabulary;

  private constructor(
    private readonly db: Db,
    readonly start: IndexStart,
  ) {
    this.vocabulary = new Vocabulary(db);
  }

  private readonly statements = new Map<string, Statement>();
  private readonly rankings = new RankingCache(100);

  /**
   * Runs a query through a prepared statement kept by its text: a search asks the same few
   * shapes of query over and over, and preparing them anew each time costs as much as running them.
   */
  private all<T>(query: SQL): T[] {
    return this.statement(query, false).all() as T[];
  }

  /** The first column of every row. */
  private pluck<T>(query: SQL): T[] {
    return this.statement(query, true).all() as T[];
  }

  private statement(query: SQL, pluck: boolean): { all: () => unknown[] } {
    const { sql: text, params } = dialect.sqlToQuery(query);
    const key = `${pluck ? 'p' : 'a'}${text}`;
    let statement = this.statements.get(key);
    if (!statement) {
      if (this.statements.size >= 500) this.statements.clear();
      statement = this.db.$client.prepare(text).pluck(pluck);
      this.statements.set(key, statement);
    }
    const prepared = statement;
    return { all: () => prepared.all(...params) };
  }

  /** Opens (or builds) the index beside the database and keeps it current from now on. */
  static open(db: Db, databasePath: string): SearchIndex {
    const index = new SearchIndex(db, openIndexStore(db, databasePath));
    // The word list is read at start, so the first person to search does not wait for it.
    index.vocabulary.refresh();
    return index;
  }

  search(caller: SearchCaller, q: SearchQuery): SearchPage {
    const cursor = q.cursor ? cursorCodec.decode(searchCursorSchema, q.cursor) : { o: 0 };
    const found = this.find(caller, q, q.limit + 1, cursor.o, cursor.w === 1);
    if (!found) return { items: [], nextCursor: null, total: 0, terms: [], widened: false };
    const { plan, rows, exact, widened, total } = found;
    const items = this.results(plan, rows.slice(0, q.limit), new Set(exact));
    const next = rows.length > q.limit ? cursorCodec.encode({ o: cursor.o + q.limit, ...(widened ? { w: 1 } : {}) }) : null;
    return { items, nextCursor: next, total, terms: [...plan.terms], widened };
  }

  /** The ids of the best `max` matches in rank order, for a download of the results. */
  rankedIds(caller: SearchCaller, q: Omit<SearchQuery, 'cursor' | 'limit'>, max: number): string[] {
    return this.find(caller, q, max, 0, false)?.rows.map((r) => r.id) ?? [];
  }

  private find(caller: SearchCaller, q: Omit<SearchQuery, 'cursor' | 'limit'>, limit: number, offset: number, widenedBefore: boolean) {
    const member = memberCampaignIds(this.db, caller);
    const campaignIds = q.campaignId ? member.filter((id) => id === q.campaignId) : member;
    if (campaignIds.length === 0) return null;
    this.vocabulary.refresh();
    // The same search again (the next page, the back button, a query typed on) within the same
    // state of the record is answered from the ranking it made; any write makes a new state.
    const key = JSON.stringify([q.q, [...campaignIds].sort(), q.diveId ?? null, filtersFromQuery(q), widenedBefore, offset === 0]);
    const state = this.db.$client.prepare('select total_changes()').pluck().get() as number;
    const depth = offset + limit;
    let ranking = this.rankings.get(key, state);
    if (!ranking || (ranking.rows.length < depth && ranking.depth < depth)) {
      const fresh = this.rank(q, campaignIds, widenedBefore, offset === 0, Math.max(PHRASE_REACH, depth));
      if (!fresh) return null;
      this.rankings.set(key, state, fresh);
      ranking = fresh;
    }
    return { ...ranking, rows: ranking.rows.slice(offset, depth) };
  }

  /** The best `depth` matches of a search in rank order, with how many there are in all. */
  private rank(
    q: Omit<SearchQuery, 'cursor' | 'limit'>,
    campaignIds: string[],
    widenedBefore: boolean,
    first: boolean,
    depth: number,
  ): Ranking | null {
    const strict = planQuery(q.q, this.vocabulary);
    if (!strict.match) return null;
    const within = this.scopeOf(campaignIds, q.diveId);
    // The index holds live entries only, and the campaign and dive are in its scope column; the
    // other filters need the entry's row.
    const filters = observationFilters({ ...filtersFromQuery(q), retired: 'any' });

    // A typo can make another real word, which is then not widened; when the words as typed find
    // nothing at all, every word is widened (and stays so on the following pages).
    let plan = strict;
    let widened = widenedBefore;
    let matches = widened ? [] : this.matching(strict, within, filters);
    if (!widened && first && matches.length === 0 && strict.relaxable) widened = true;
    if (widened) {
      plan = planQuery(q.q, this.vocabulary, { relaxed: true });
      matches = this.matching(plan, within, filters);
    }
    const total = matches.length;
    if (total === 0) return { plan, rows: [], exact: [], widened, total, depth };
    const exact = this.exactRowids(strict, new Set(matches));
    const rows = this.ranked(plan, strict, matches, exact, depth);
    return { plan, rows, exact, widened, total, depth };
  }

  /**
   * The FTS5 expression that keeps a search to these campaigns (and a dive), or null when it
   * would keep everything (the caller sees every campaign).
   */
  private scopeOf(campaignIds: readonly string[], diveId: string | undefined): string | null {
    const parts: string[] = [];
    const all = this.all<{ n: number }>(sql`select count(*) as n from ${campaigns}`)[0]?.n ?? 0;
    if (campaignIds.length < all) parts.push(`{scope} : (${campaignIds.map((id) => quoted(scopeToken('c', id))).join(' OR ')})`);
    if (diveId) parts.push(`{scope} : ${quoted(scopeToken('d', diveId))}`);
    return parts.length > 0 ? parts.join(' AND ') : null;
  }

  /**
   * The rowids of every entry the plan matches within the scope and the filters: read once, they
   * give the count and the candidates to rank. Only filters beyond campaign and dive look the
   * matches up in the record.
   */
  private matching(plan: QueryPlan, within: string | null, filters: SQL[]): number[] {
    const full = within ? `${plan.match!} AND ${within}` : plan.match!;
    const query =
      filters.length === 0
        ? sql`select rowid from search_entries(${full})`
        : sql`select ${entryRowid} from search_entries(${full}) as s join ${observations} on ${entryRowid} = s.rowid where ${and(...filters)}`;
    return this.pluck<number>(query);
  }

  /** Entries whose find number or scientific name is exactly what was typed, of the candidates. */
  private exactRowids(plan: QueryPlan, candidates: Set<number>): number[] {
    if (!plan.exactMatch) return [];
    return this.pluck<number>(
      sql`
      select ${entryRowid}
      from search_entries(${plan.exactMatch}) as m join ${observations} on ${entryRowid} = m.rowid
        left join ${finds} on ${finds.observationId} = ${observations.id}
        left join ${identifications} on ${identifications.observationId} = ${observations.id}
      where lower(${finds.findNumber}) = ${plan.whole} or lower(${identifications.scientificName}) = ${plan.whole}
      limit 50`,
    ).filter((rowid) => candidates.has(rowid));
  }

  /**
   * The best `depth` matches in rank order: the exact ones, then (among the best `PHRASE_REACH`)
   * those whose title holds the typed words side by side, then by bm25.
   *
   * bm25 weighs every word by how rare it is, and FTS5 counts that by reading every entry that
   * holds the word, on every query: for a word most entries hold, that costs far more than the
   * rest of the search, and buys almost nothing (such a word barely tells entries apart). So
   * words held by more than a tenth of the entries (and more than `COMMON_FLOOR`) only have to
   * match (they are in the candidates); the rarer ones rank. When every word is that common, the
   * rarest one ranks.
   */
  private ranked(plan: QueryPlan, strict: QueryPlan, candidates: number[], exact: number[], depth: number): RankedRow[] {
    const common = Math.max(COMMON_FLOOR, this.vocabulary.documents / 10);
    const sized = plan.groups.map((g) => ({ g, docs: this.vocabulary.docsOf(g) }));
    let ranking = sized.filter((x) => x.docs <= common);
    if (ranking.length === 0) ranking = [sized.reduce((a, b) => (b.docs < a.docs ? b : a))];
    const order: SQL[] = [];
    if (exact.length > 0) order.push(sql`rowid in (${sql.join(exact, sql`, `)}) desc`);
    order.push(sql`score`, sql`rowid desc`);
    // `+rowid`: the ranking words' matches are read once and checked against the candidates,
    // rather than each candidate looked up on its own.
    const rows = this.all<{ rowid: number; score: number }>(sql`
      select rowid, ${score} as score from ${searchEntries}
      where ${searchEntries} match ${groupsMatch(ranking.map((x) => x.g))}
        and +rowid in (select value from json_each(${JSON.stringify(candidates)}))
      order by ${sql.join(order, sql`, `)}
      limit ${depth}`);
    const entries = new Map(
      this.all<{ rowid: number; id: string; title: string }>(
        sql`select ${entryRowid} as rowid, ${observations.id} as id, ${observations.title} as title from ${observations}
          where ${entryRowid} in (select value from json_each(${JSON.stringify(rows.map((r) => r.rowid))}))`,
      ).map((r) => [r.rowid, r]),
    );
    // Of the best few, the exact ones stay first, then come titles holding the typed words side by side.
    const firsts = new Set(exact);
    const tier = (rowid: number) => (firsts.has(rowid) ? 0 : holdsPhrase(strict, entries.get(rowid)?.title ?? '') ? 1 : 2);
    const head = rows
      .slice(0, PHRASE_REACH)
      .map((r, i) => ({ r, i, t: tier(r.rowid) }))
      .sort((a, b) => a.t - b.t || a.i - b.i)
      .map((x) => x.r);
    return [...head, ...rows.slice(PHRASE_REACH)].flatMap((r) => {
      const e = entries.get(r.rowid);
      return e ? [{ rowid: r.rowid, score: r.score, id: e.id }] : [];
    });
  }

  /** The page's entries, read through the one read model, with what a result list shows. */
  private results(plan: QueryPlan, rows: { rowid: number; id: string; score: number }[], exact: Set<number>): SearchResult[] {
    if (rows.length === 0) return [];
    const ids = rows.map((r) => r.id);
    const entries = new Map(observationsByIds(this.db, ids).map((o) => [o.id, o]));
    const diveIds = [...new Set([...entries.values()].map((o) => o.diveId))];
    const diveRows = this.all<{ id: string; number: string; campaignName: string }>(sql`
      select ${dives.id} as id, ${dives.number} as number, ${campaigns.name} as campaignName
      from ${dives} join ${campaigns} on ${campaigns.id} = ${dives.campaignId}
      where ${inArray(dives.id, diveIds)}`);
    const diveOf = new Map(diveRows.map((d) => [d.id, d]));
    // The first photo by position (the query lists them last-first, so the first one stays).
    const thumbs = new Map<string, string>();
    for (const p of this.all<{ observationId: string; id: string }>(sql`
      select ${photos.observationId} as observationId, ${photos.id} as id from ${photos}
      where ${and(inArray(photos.observationId, ids), eq(photos.retired, false))}
      order by ${photos.position} desc, ${photos.createdAt} desc`)) {
      thumbs.set(p.observationId, p.id);
    }
    const matches = matcherOf(plan);
    const out: SearchResult[] = [];
    for (const r of rows) {
      const o = entries.get(r.id);
      const dive = o && diveOf.get(o.diveId);
      if (!o || !dive) continue;
      out.push({
        ...o,
        score: Math.round(-r.score * 1000) / 1000,
        matchedFields: matchedFields(o, matches),
        exact: exact.has(r.rowid),
        campaignName: dive.campaignName,
        diveNumber: dive.number,
        titleParts: markMatches(o.title, matches),
        snippet: snippetOf(o.note, matches),
        thumbnailId: thumbs.get(o.id) ?? null,
      });
    }
    return out;
  }
}

function matchedFields(o: Observation, matches: (term: string) => boolean): SearchField[] {
  const fields: Record<SearchField, string> = {
    title: o.title,
    tags: o.tags.join(' '),
    scientificName: o.identification?.scientificName ?? '',
    findNumber: o.findNumber ?? '',
    note: o.note,
  };
  return (Object.keys(fields) as SearchField[]).filter((f) => tokenize(fields[f]).some((t) => matches(t.term)));
}

/** Markdown reduced to its words for a one-line snippet: marks, link targets and code fences go. */
function plainNote(note: string): string {
  return note
    .replace(/```[^\n]*\n?/g, ' ')
    .replace(/!?\[([^\]]*)\]\([^)]*\)/g, '$1')
    .replace(/<[^>]*>/g, ' ')
    .replace(/[*_`#>~|]+/g, ' ')
    .replace(/\s+/g, ' ')
    .trim();
}

const SNIPPET_BEFORE = 60;
const SNIPPET_LENGTH = 200;

/** About 200 characters of the note around its first match, cut at word boundaries. */
export function snippetOf(note: string, matches: (term: string) => boolean): TextSegment[] {
  const text = plainNote(note);
  if (!text) return [];
  const hit = tokenize(text).find((t) => matches(t.term));
  let start = hit ? Math.max(0, hit.start - SNIPPET_BEFORE) : 0;
  if (start > 0) {
    const space = text.indexOf(' ', start);
    start = space >= 0 && space < (hit?.start ?? start) ? space + 1 : start;
  }
  let end = Math.min(text.length, start + SNIPPET_LENGTH);
  if (end < text.length) {
    const space = text.lastIndexOf(' ', end);
    if (space > start) end = space;
  }
  const parts = markMatches(text.slice(start, end), matches);
  if (start > 0) parts.unshift({ text: '…', match: false });
  if (end < text.length) parts.push({ text: '…', match: false });
  return parts;
}
