import { execFile } from 'node:child_process';
import { existsSync, readdirSync, renameSync, rmSync, statSync } from 'node:fs';
import path from 'node:path';

import Database from 'better-sqlite3';

import { litestreamBinary, REPLICA_DB_DIR } from './replicate';

/** What one restore brought: the copy's newest live event (id and time), or why it was refused. */
export type RestoredCopy = { file: string; lastEventId: number; lastEventAt: number };

export class RefusedCopy extends Error {}

/** Where Litestream's replica of the record lies under the replica directory. */
export function replicaUrl(replicaDir: string): string {
  return `file://${path.join(path.resolve(replicaDir), REPLICA_DB_DIR)}`;
}

/**
 * Restores the replica into a new file beside the live database with Litestream and checks it
 * with `PRAGMA integrity_check`; a copy that fails either is deleted and refused. Resolves null
 * when the replica holds nothing yet.
 */
export async function restoreCopy(replicaDir: string, databasePath: string): Promise<RestoredCopy | null> {
  const file = `${path.resolve(databasePath)}.restoring`;
  removeDatabaseFiles(file);
  if (!existsSync(path.join(path.resolve(replicaDir), REPLICA_DB_DIR))) throw new RefusedCopy(`no replica at ${replicaDir}`);
  await new Promise<void>((resolve, reject) => {
    execFile(
      litestreamBinary(),
      ['restore', '-if-replica-exists', '-o', file, replicaUrl(replicaDir)],
      { timeout: 120_000 },
      (err, _out, stderr) => (err ? reject(new RefusedCopy(`litestream restore failed: ${stderr.trim() || err.message}`)) : resolve()),
    );
  });
  if (!existsSync(file)) return null;
  try {
    return { file, ...checkCopy(file) };
  } catch (err) {
    removeDatabaseFiles(file);
    throw err;
  }
}

/** Integrity check of a restored file, and its newest live event. */
export function checkCopy(file: string): { lastEventId: number; lastEventAt: number } {
  let db: Database.Database | undefined;
  try {
    db = new Database(file, { readonly: true, fileMustExist: true });
    const verdict = db.pragma('integrity_check', { simple: true });
    if (verdict !== 'ok') throw new RefusedCopy(`restored copy failed integrity_check: ${String(verdict)}`);
    const last = db.prepare('select id, at from live_events order by id desc limit 1').get() as { id: number; at: number } | undefined;
    return { lastEventId: last?.id ?? 0, lastEventAt: last?.at ?? 0 };
  } catch (err) {
    if (err instanceof RefusedCopy) throw err;
    throw new RefusedCopy(`restored copy unreadable: ${err instanceof Error ? err.message : String(err)}`);
  } finally {
    db?.close();
  }
}

/**
 * Puts a checked copy in place. With no live file yet it is renamed into place. Otherwise SQLite's
 * backup API writes it into the live file as one write transaction: readers on the server's own
 * connection keep reading the previous state until it commits and then see the new one whole, and
 * that connection (with its attached search index) stays the same object.
 */
export async function swapIn(copy: RestoredCopy, databasePath: string): Promise<void> {
  const live = path.resolve(databasePath);
  try {
    if (!existsSync(live)) {
      removeDatabaseFiles(live);
      renameSync(copy.file, live);
      return;
    }
    const source = new Database(copy.file, { readonly: true, fileMustExist: true });
    try {
      // After the first step of 100 pages, the rest in one step: the destination's write lock is
      // held either way, and fewer steps mean fewer turns of the event loop holding it.
      await source.backup(live, { progress: () => 1_000_000 });
    } finally {
      source.close();
    }
  } finally {
    removeDatabaseFiles(copy.file);
  }
}

/** The replica's files with their sizes, as one string; null when it cannot be read. */
export function replicaFingerprint(replicaDir: string): string | null {
  const dir = path.join(path.resolve(replicaDir), REPLICA_DB_DIR);
  try {
    return readdirSync(dir, { recursive: true, withFileTypes: true })
      .filter((e) => e.isFile())
      .map((e) => {
        const file = path.join(e.parentPath, e.name);
        return `${path.relative(dir, file)}:${statSync(file).size}`;
      })
      .sort()
      .join('\n');
  } catch {
    return null;
  }
}

export function removeDatabaseFiles(file: string): void {
  // Litestream restores into `<file>.tmp` (with its own WAL files) and renames it when done.
  for (const f of [file, `${file}-wal`, `${file}-shm`, `${file}.tmp`, `${file}.tmp-wal`, `${file}.tmp-shm`]) rmSync(f, { force: true });
}
