import { copyFileSync, existsSync, mkdirSync, renameSync, rmSync } from 'node:fs';
import path from 'node:path';

import Database from 'better-sqlite3';

import type { Db } from './client';

/** An online copy of the live database through SQLite's backup API, safe while the server writes. */
export async function backupDatabase(db: Db, destination: string): Promise<{ pages: number }> {
  mkdirSync(path.dirname(path.resolve(destination)), { recursive: true });
  const result = await db.$client.backup(destination);
  return { pages: result.totalPages };
}

/** Refuses a file that is not a whole, consistent Bathynote database. */
export function checkBackup(file: string): void {
  if (!existsSync(file)) throw new Error(`No backup at ${file}`);
  const db = new Database(file, { readonly: true, fileMustExist: true });
  try {
    const integrity = db.pragma('integrity_check', { simple: true });
    if (integrity !== 'ok') throw new Error(`The backup is damaged: ${String(integrity)}`);
    const tables = db.prepare("select name from sqlite_master where type = 'table' and name in ('campaigns', 'observations')").all();
    if (tables.length !== 2) throw new Error('That file is not a Bathynote database.');
  } finally {
    db.close();
  }
}

/**
 * Puts a backup in place of the database (with the server stopped). The database it replaces
 * is kept beside it, renamed, so a restore never loses anything either.
 */
export function restoreDatabase(backup: string, target: string, now = new Date()): { keptAs: string | null } {
  checkBackup(backup);
  mkdirSync(path.dirname(path.resolve(target)), { recursive: true });
  let keptAs: string | null = null;
  if (existsSync(target)) {
    keptAs = `${target}.before-restore-${now.toISOString().replace(/[:.]/g, '-')}`;
    renameSync(target, keptAs);
  }
  for (const suffix of ['-wal', '-shm']) {
    if (existsSync(target + suffix)) {
      if (keptAs) renameSync(target + suffix, keptAs + suffix);
      else rmSync(target + suffix);
    }
  }
  copyFileSync(backup, target);
  return { keptAs };
}
