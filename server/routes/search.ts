import { Router } from 'express';

import type { Db } from '../../db/client';
import { searchQuerySchema } from '../../lib/schemas/search';
import type { AppContext } from '../context';
import { requireSession, userOf } from '../middleware/session';
import { validate } from '../middleware/validate';
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

  // Any signed-in person may search; what they find is limited to their campaigns inside.
  r.get('/search', requireSession(auth), query, (req, res) => {
    res.set('cache-control', 'no-store').json(index.search(userOf(req), query.of(req)));
  });
  return r;
}
