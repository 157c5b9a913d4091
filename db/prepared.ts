import type Database from 'better-sqlite3';
import { sql, type SQL } from 'drizzle-orm';
import type { SQLiteColumn } from 'drizzle-orm/sqlite-core';

import type { Executor } from './client';

const built = new WeakMap<Database.Database, Map<unknown, unknown>>();

/** The connection under a database or one of its transactions: the query builder keeps it on its session. */
const connectionOf = (db: Executor) => (db as unknown as { session: { client: Database.Database } }).session.client;

/**
 * A query built once per connection instead of on every call. On the paths a write request takes
 * (creating an entry runs a dozen queries), the query builder spent longer assembling each
 * statement's SQL from its parts than SQLite spent running it. A query prepared on the database
 * runs inside a transaction on the same connection too, so `build` is looked up by the
 * connection, whichever of the two it is handed; it must not capture anything of one call.
 */
export function preparedOn<T>(db: Executor, build: (db: Executor) => T): T {
  const connection = connectionOf(db);
  let queries = built.get(connection);
  if (!queries) built.set(connection, (queries = new Map()));
  let query = queries.get(build) as T | undefined;
  if (query === undefined) {
    query = build(db);
    queries.set(build, query);
  }
  return query;
}

/**
 * `column in` the values of a JSON array given as the placeholder `name`: one prepared query then
 * serves a list of any length (`inArray` would spell out one parameter per value). Pass the list
 * as `JSON.stringify(values)`.
 */
export const inJsonList = (column: SQLiteColumn | SQL, name: string): SQL =>
  sql`${column} in (select value from json_each(${sql.placeholder(name)}))`;
