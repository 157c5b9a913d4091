/**
 * WAL checkpoints on a worker thread. SQLite's automatic checkpoint runs inside the commit that
 * takes the WAL past 1000 pages, on the connection that committed: here the server's only one,
 * and better-sqlite3 is synchronous, so copying the pages back and flushing the database file to
 * disk held up every request for tens of milliseconds. The server's connection turns it off and a
 * worker with its own connections to the same files runs PASSIVE checkpoints instead, the kind
 * the automatic one is: they never wait on the writer nor make it wait, and Litestream, which
 * follows the WAL, sees what it saw before (its documentation advises turning the automatic one
 * off under a heavy write load).
 *
 * The worker starts with the first sizeable writes, not with the server. If it stops unexpectedly
 * the connection goes back to automatic checkpoints, so the WAL cannot grow without bound.
 */
import { statSync } from 'node:fs';
import path from 'node:path';
import { Worker } from 'node:worker_threads';

import type { Db } from '../../db/client';
import type { Logger } from './logger';
import { indexFileFor } from './search/store';

/** How often the worker checkpoints what was written since its last turn. */
export const CHECKPOINT_INTERVAL_MS = 1000;
/** SQLite's default, restored when the worker is gone. */
const AUTOCHECKPOINT_PAGES = 1000;

/**
 * The worker (plain CommonJS, run with `eval`, so the bundled server needs no file of its own).
 * Each turn it checkpoints the database and the search index beside it, each only once its WAL
 * exists; a file replaced under it (the index rebuilt) is opened again. A checkpoint is attempted
 * and leaves the WAL as it is when nothing is new.
 */
const WORKER_SOURCE = `
const { parentPort, workerData } = require('node:worker_threads');
const { existsSync, statSync } = require('node:fs');
const Database = require(workerData.sqlite);
const open = new Map();
function turn() {
  for (const file of workerData.files) {
    let held = open.get(file);
    let inode;
    try {
      if (!existsSync(file + '-wal')) continue;
      inode = statSync(file).ino;
    } catch {
      continue;
    }
    if (held && held.inode !== inode) {
      held.db.close();
      open.delete(file);
      held = undefined;
    }
    if (!held) {
      held = { db: new Database(file, { fileMustExist: true }), inode };
      open.set(file, held);
    }
    held.db.pragma('wal_checkpoint(PASSIVE)');
  }
}
const timer = setInterval(turn, workerData.intervalMs);
parentPort.on('message', (m) => {
  if (m !== 'stop') return;
  clearInterval(timer);
  for (const held of open.values()) held.db.close();
  parentPort.close();
});
`;

/**
 * The worker starts once the database's or the search index's WAL passes this size: a server
 * nobody writes to holds no thread for it (about 9 MB resident), and until then SQLite's own
 * automatic checkpoint, at 1000 pages, keeps the WAL short.
 */
export const START_AFTER_WAL_BYTES = 1024 * 1024;

export type Checkpointer = {
  /** The worker thread, once writes have started it (never for an in-memory database). */
  readonly worker: Worker | undefined;
  stop(): Promise<void>;
};

const running = new WeakMap<Db, Checkpointer>();

const walBytes = (file: string): number => {
  try {
    return statSync(`${file}-wal`).size;
  } catch {
    return 0;
  }
};

/**
 * Watches the WALs of `databasePath` and its search index, and once writes have grown one past
 * `START_AFTER_WAL_BYTES`, turns the connection's automatic checkpoints off and starts the
 * worker (nothing for an in-memory database). Stop it before the connection closes.
 */
export function startCheckpointer(db: Db, databasePath: string, log: Logger): Checkpointer {
  if (databasePath === ':memory:' || databasePath === '') return { worker: undefined, stop: () => Promise.resolve() };
  const main = path.resolve(databasePath);
  const files = [main, indexFileFor(main)];
  let worker: Worker | undefined;
  let exited = Promise.resolve();
  let stopping = false;
  const fallBack = (reason: string) => {
    if (stopping) return;
    stopping = true;
    if (db.$client.open) db.$client.pragma(`wal_autocheckpoint = ${AUTOCHECKPOINT_PAGES}`);
    log.error('checkpoint worker stopped; the database checkpoints itself again', { reason });
  };
  const start = () => {
    const started = new Worker(WORKER_SOURCE, {
      eval: true,
      workerData: { sqlite: require.resolve('better-sqlite3'), files, intervalMs: CHECKPOINT_INTERVAL_MS },
      // A few MB of heap: it holds two connections and a timer.
      resourceLimits: { maxOldGenerationSizeMb: 16, maxYoungGenerationSizeMb: 2 },
    });
    started.unref();
    started.on('error', (err) => fallBack(err instanceof Error ? err.message : String(err)));
    exited = new Promise<void>((resolve) =>
      started.once('exit', (code) => {
        fallBack(`exit code ${code}`);
        resolve();
      }),
    );
    db.$client.pragma('wal_autocheckpoint = 0');
    worker = started;
  };
  const watch = setInterval(() => {
    if (worker || stopping || !files.some((f) => walBytes(f) >= START_AFTER_WAL_BYTES)) return;
    clearInterval(watch);
    start();
  }, CHECKPOINT_INTERVAL_MS);
  watch.unref();
  const checkpointer: Checkpointer = {
    get worker() {
      return worker;
    },
    async stop() {
      clearInterval(watch);
      if (worker && !stopping) {
        stopping = true;
        worker.postMessage('stop');
        // A worker that does not stop (stuck in a checkpoint on a dead disk) is ended after a while.
        const cut = setTimeout(() => void worker?.terminate(), 5000);
        await exited;
        clearTimeout(cut);
      } else {
        stopping = true;
        await exited;
      }
      running.delete(db);
    },
  };
  running.set(db, checkpointer);
  return checkpointer;
}

/** The checkpointer started for this connection, if any. */
export function checkpointerOf(db: Db): Checkpointer | undefined {
  return running.get(db);
}
