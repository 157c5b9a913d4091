import { Router } from 'express';

import type { Db } from '../../db/client';
import { CSV_BOM } from '../../lib/csv';
import { SEARCH_EXPORT_MAX, searchExportQuerySchema, searchQuerySchema } from '../../lib/schemas/search';
import type { AppContext } from '../context';
import { requireSession, userOf } from '../middleware/session';
import { validate } from '../middleware/validate';
import { inBatches } from '../services/exports';
import { EntryReader } from '../services/exports/entries';
import { entryCsvHeader, entryCsvText } from '../services/exports/formats';
import { startDownload, streamExport, TextSink } from '../services/exports/sink';
import { SearchIndex } from '../services/search/search-index';

const indexes = new WeakMap<Db, SearchIndex>();

/**
 * The search index of a database, opened when the app is built: after the demo is seeded and
 * before the first request, so from then on every change reaches it in its own transaction.
 */
export function searchIndexOf(db: Db, databasePath: string): SearchIndex {
  let index = indexes.get(db);
  if (!index) {
    index = SearchIndex.open(db, databasePath);
    indexes.set(db, index);
  }
  return index;
}

export function searchRoutes({ db, auth, env, log }: AppContext): Router {
  const index = searchIndexOf(db, env.DATABASE_PATH);
  if (index.start.rebuilt || index.start.caughtUp > 0) {
    log.info('search index ready', { ...index.start, ms: Math.round(index.start.ms) });
  }
  const r = Router();
  const query = validate(searchQuerySchema, 'query');
  const exportQuery = validate(searchExportQuerySchema, 'query');

  // Any signed-in person may search; what they find is limited to their campaigns inside.
  r.get('/search', requireSession(auth), query, (req, res) => {
    res.set('cache-control', 'no-store').json(index.search(userOf(req), query.of(req)));
  });

  // The same results as CSV, best first, in the columns of a campaign's entry export.
  r.get('/search/export.csv', requireSession(auth), exportQuery, async (req, res) => {
    const ids = index.rankedIds(userOf(req), exportQuery.of(req), SEARCH_EXPORT_MAX);
    startDownload(res, 'text/csv; charset=utf-8', `bathynote-search-${new Date().toISOString().slice(0, 10)}.csv`);
    await streamExport(res, async () => {
      const sink = new TextSink(res);
      await sink.push(CSV_BOM + entryCsvHeader());
      for await (const batch of inBatches(new EntryReader(db), ids)) {
        for (const entry of batch) await sink.push(entryCsvText(entry));
      }
      await sink.end();
    });
  });
  return r;
}
