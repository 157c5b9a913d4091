import { mkdirSync } from 'node:fs';
import path from 'node:path';

import Database from 'better-sqlite3';
import { drizzle, type BetterSQLite3Database } from 'drizzle-orm/better-sqlite3';
import type { BaseSQLiteDatabase } from 'drizzle-orm/sqlite-core';
import { migrate } from 'drizzle-orm/better-sqlite3/migrator';

import * as schema from './schema';
import { projectRoot } from './root';

export type Db = BetterSQLite3Database<typeof schema> & { $client: Database.Database };
/** The database or a transaction on it: what a service needs to read and write. */
export type Executor = BaseSQLiteDatabase<'sync', Database.RunResult, typeof schema>;

const migrationsFolder = path.join(projectRoot, 'db', 'migrations');

/**
 * Opens the database with the pragmas the notebook relies on: WAL so readers never block the
 * writer, foreign keys enforced, a generous busy timeout for concurrent writers, and
 * `synchronous=FULL` so that an entry acknowledged with 201 survives a power cut, not only a
 * process crash.
 */
export function openDatabase(file: string): Db {
  if (file !== ':memory:') mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
  const sqlite = new Database(file);
  sqlite.pragma('journal_mode = WAL');
  sqlite.pragma('foreign_keys = ON');
  sqlite.pragma('busy_timeout = 5000');
  sqlite.pragma('synchronous = FULL');
  const db = drizzle(sqlite, { schema });
  (db as unknown as { session: { client: Database.Database } }).session.client = reusingStatements(sqlite);
  return db;
}

/** Statements the query builder keeps prepared, the least recently used dropped first. */
const REUSED_STATEMENTS = 500;

/**
 * The connection as the query builder sees it: the same one, except that a statement it prepares
 * is kept and handed out again for the same SQL. Preparing compiles the statement and every
 * trigger on its table, which cost more than running most of them; a write request runs a dozen.
 * Only the query builder's own statements are kept (`db.$client` prepares afresh), and each is
 * handed out in the default row mode, which the builder switches per call.
 */
function reusingStatements(sqlite: Database.Database): Database.Database {
  const kept = new Map<string, Database.Statement>();
  const prepare = (source: string) => {
    let stmt = kept.get(source);
    if (stmt) {
      kept.delete(source);
      if (stmt.reader) stmt.raw(false);
    } else {
      stmt = sqlite.prepare(source);
      if (kept.size >= REUSED_STATEMENTS) kept.delete(kept.keys().next().value!);
    }
    kept.set(source, stmt);
    return stmt;
  };
  const bound = new Map<PropertyKey, unknown>();
  return new Proxy(sqlite, {
    get(target, key) {
      if (key === 'prepare') return prepare;
      const value: unknown = Reflect.get(target, key, target);
      if (typeof value !== 'function') return value;
      let fn = bound.get(key);
      if (!fn) bound.set(key, (fn = (value as (...args: unknown[]) => unknown).bind(target)));
      return fn;
    },
  });
}

export function migrateDatabase(db: Db): void {
  migrate(db, { migrationsFolder });
}
