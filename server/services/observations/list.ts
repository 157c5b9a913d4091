import { and, asc, desc, eq, gt, lt, or, sql } from 'drizzle-orm';

import type { Db } from '../../../db/client';
import { observations, user } from '../../../db/schema';
import type { ObservationListQuery, ObservationPage } from '../../../lib/schemas';
import { cursorCodec, filtersFromQuery, observationFilters, offsetCursorSchema, timeCursorSchema } from './filters';
import { hydrate } from './hydrate';

/**
 * A dive's log. By time (the default) it is keyset-paginated on (observedAt, id), so pages never
 * overlap while entries arrive; other sorts page by offset.
 */
export function listObservations(db: Db, diveId: string, q: ObservationListQuery): ObservationPage {
  const conditions = observationFilters({ ...filtersFromQuery(q), diveId, retired: q.retired === 'only' });
  const ascending = (q.order ?? (q.sort === 'time' ? 'desc' : 'asc')) === 'asc';
  const dir = ascending ? asc : desc;

  if (q.sort === 'time') {
    if (q.cursor) {
      const c = cursorCodec.decode(timeCursorSchema, q.cursor);
      const at = new Date(c.t);
      const before = ascending ? gt : lt;
      conditions.push(or(before(observations.observedAt, at), and(eq(observations.observedAt, at), before(observations.id, c.id)))!);
    }
    const rows = db
      .select()
      .from(observations)
      .where(and(...conditions))
      .orderBy(dir(observations.observedAt), dir(observations.id))
      .limit(q.limit + 1)
      .all();
    const page = rows.slice(0, q.limit);
    const last = page[page.length - 1];
    return {
      items: hydrate(db, page),
      nextCursor: rows.length > q.limit && last ? cursorCodec.encode({ t: last.observedAt.getTime(), id: last.id }) : null,
    };
  }

  const offset = q.cursor ? cursorCodec.decode(offsetCursorSchema, q.cursor).o : 0;
  const key =
    q.sort === 'depth'
      ? [sql`${observations.depth} is null`, dir(observations.depth)]
      : q.sort === 'kind'
        ? [dir(observations.kind)]
        : [dir(sql`(select lower(name) from ${user} u where u.id = ${observations.authorId})`)];
  const rows = db
    .select()
    .from(observations)
    .where(and(...conditions))
    .orderBy(...key, desc(observations.observedAt), desc(observations.id))
    .limit(q.limit + 1)
    .offset(offset)
    .all();
  const page = rows.slice(0, q.limit);
  return { items: hydrate(db, page), nextCursor: rows.length > q.limit ? cursorCodec.encode({ o: offset + q.limit }) : null };
}
