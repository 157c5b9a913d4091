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
  return drizzle(sqlite, { schema });
}

export function migrateDatabase(db: Db): void {
  migrate(db, { migrationsFolder });
}
