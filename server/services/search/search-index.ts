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
import { matcherOf, planQuery, type QueryPlan } from './query';
import { openIndexStore, type IndexStart } from './store';
import { Vocabulary } from './vocabulary';

/** The FTS5 table as a query builder sees it (it lives in the attached index file, not in db/schema.ts). */
const searchEntries = sqliteTable('search_entries', { rowid: integer('rowid') });

/** bm25 weights in the FTS table's column order: title, tags, scientific name, find number, note. */
const score = sql<number>`bm25(search_entries, 10.0, 6.0, 8.0, 8.0, 1.0)`;
const entryRowid = sql`${observations}.rowid`;
const dialect = new SQLiteSyncDialect();

const searchCursorSchema = offsetCursorSchema.extend({ w: z.literal(1).optional() });

export type SearchCaller = { id: string; siteRole: string };

export class SearchIndex {
  readonly vocabulary: Vocabulary;

  private constructor(
    private readonly db: Db,
    readonly start: IndexStart,
  ) {
    this.vocabulary = new Vocabulary(db);
  }

  private readonly statements = new Map<string, Statement>();

  /**
   * Runs a query through a prepared statement kept by its text: a search asks the same few
   * shapes of query over and over, and preparing them anew each time costs as much as running them.
   */
  private all<T>(query: SQL): T[] {
    const { sql: text, params } = dialect.sqlToQuery(query);
    let statement = this.statements.get(text);
    if (!statement) {
      if (this.statements.size >= 500) this.statements.clear();
      statement = this.db.$client.prepare(text);
      this.statements.set(text, statement);
    }
    return statement.all(...params) as T[];
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
    const { plan, rows, exact, widened, filters } = found;
    const items = this.results(plan, rows.slice(0, q.limit), new Set(exact));
    const next = rows.length > q.limit ? cursorCodec.encode({ o: cursor.o + q.limit, ...(widened ? { w: 1 } : {}) }) : null;
    const total = rows[0]?.total ?? (cursor.o > 0 ? this.count(plan, filters) : 0);
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
    const strict = planQuery(q.q, this.vocabulary);
    if (!strict.match) return null;
    const filters = observationFilters({
      ...filtersFromQuery(q),
      campaignIds,
      ...(q.diveId ? { diveId: q.diveId } : {}),
      retired: false,
    });
    const exact = this.exactRowids(strict, filters);
    const phrased = this.phraseRowids(strict, filters);

    // A typo can make another real word, which is then not widened; when the words as typed find
    // nothing at all, every word is widened (and stays so on the following pages).
    let plan = strict;
    let widened = widenedBefore;
    let rows = widened ? [] : this.ranked(strict, filters, exact, phrased, limit, offset);
    if (!widened && offset === 0 && rows.length === 0 && strict.relaxable) widened = true;
    if (widened) {
      plan = planQuery(q.q, this.vocabulary, { relaxed: true });
      rows = this.ranked(plan, filters, exact, phrased, limit, offset);
    }
    return { plan, rows, exact, widened, filters };
  }

  private count(plan: QueryPlan, filters: SQL[]): number {
    const row = this.all<{ n: number }>(sql`
      select count(*) as n from ${searchEntries} join ${observations} on ${entryRowid} = ${searchEntries}.rowid
      where ${and(sql`${searchEntries} match ${plan.match}`, ...filters)}`)[0];
    return row?.n ?? 0;
  }

  /** Entries whose find number or scientific name is exactly what was typed. */
  private exactRowids(plan: QueryPlan, filters: SQL[]): number[] {
    if (!plan.exactMatch) return [];
    return this.all<{ rowid: number }>(
      sql`
      select ${entryRowid} as rowid
      from ${searchEntries} join ${observations} on ${entryRowid} = ${searchEntries}.rowid
        left join ${finds} on ${finds.observationId} = ${observations.id}
        left join ${identifications} on ${identifications.observationId} = ${observations.id}
      where ${and(
        sql`${searchEntries} match ${plan.exactMatch}`,
        sql`(lower(${finds.findNumber}) = ${plan.whole} or lower(${identifications.scientificName}) = ${plan.whole})`,
        ...filters,
      )}
      limit 50`,
    ).map((r) => r.rowid);
  }

  /**
   * Entries whose title holds the words in the order typed, side by side: someone who types a few
   * words of a title as they stand means that entry more than one with the words scattered.
   */
  private phraseRowids(plan: QueryPlan, filters: SQL[]): number[] {
    if (!plan.phraseMatch) return [];
    return this.all<{ rowid: number }>(
      sql`
      select ${entryRowid} as rowid
      from ${searchEntries} join ${observations} on ${entryRowid} = ${searchEntries}.rowid
      where ${and(sql`${searchEntries} match ${plan.phraseMatch}`, ...filters)}
      limit 200`,
    ).map((r) => r.rowid);
  }

  private ranked(plan: QueryPlan, filters: SQL[], exact: number[], phrased: number[], limit: number, offset: number) {
    const order: SQL[] = [];
    if (exact.length > 0) order.push(sql`rowid in (${sql.join(exact, sql`, `)}) desc`);
    if (phrased.length > 0) order.push(sql`rowid in (${sql.join(phrased, sql`, `)}) desc`);
    order.push(sql`score`, sql`at desc`, sql`id`);
    // bm25() cannot sit beside a window function, so the matches are gathered first and counted after.
    return this.all<{ rowid: number; id: string; score: number; total: number }>(sql`
      with hits as materialized (
        select ${entryRowid} as rowid, ${observations.id} as id, ${observations.observedAt} as at, ${score} as score
        from ${searchEntries} join ${observations} on ${entryRowid} = ${searchEntries}.rowid
        where ${and(sql`${searchEntries} match ${plan.match}`, ...filters)}
      )
      select rowid, id, score, count(*) over () as total from hits
      order by ${sql.join(order, sql`, `)}
      limit ${limit} offset ${offset}`);
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
