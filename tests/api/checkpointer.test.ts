/**
 * WAL checkpoints run on a worker thread, not inside a request's commit: a server nobody writes to
 * has no worker and SQLite's own checkpoints; once writes pass a megabyte of WAL the worker starts,
 * the server's connection has automatic checkpoints off, yet the WAL still goes back to its start
 * after writes; a worker
 * that dies hands checkpoints back to the connection; closing stops the worker first, so the
 * server's connection is the last to close and takes the WAL away (SQLite's last-close checkpoint).
 */
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';

import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { closeContext, createContext } from '@/server/bootstrap';
import type { AppContext } from '@/server/context';
import { loadEnv } from '@/server/env';
import { CHECKPOINT_INTERVAL_MS, START_AFTER_WAL_BYTES, checkpointerOf } from '@/server/services/checkpointer';

/** The WAL header's first salt: SQLite changes it each time a writer starts the WAL again from its first frame (https://www.sqlite.org/fileformat.html#wal_file_format). */
const walSalt = (file: string) => readFileSync(`${file}-wal`).readUInt32BE(16);

describe('checkpoints off the event loop', () => {
  let dir: string;
  let file: string;
  let ctx: AppContext;
  beforeAll(async () => {
    dir = mkdtempSync(path.join(tmpdir(), 'bathynote-checkpoint-'));
    file = path.join(dir, 'bathynote.db');
    ctx = await createContext(
      loadEnv({
        NODE_ENV: 'test',
        DATABASE_PATH: file,
        UPLOADS_DIR: path.join(dir, 'uploads'),
        PUBLIC_URL: 'http://127.0.0.1:1',
        AUTH_SECRET: 'test-secret-that-is-long-enough-for-better-auth',
        LOG_LEVEL: 'silent',
      }),
    );
    ctx.db.$client.exec('create table scratch (body blob)');
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  const write = (rows: number) => {
    const insert = ctx.db.$client.prepare('insert into scratch (body) values (randomblob(3000))');
    for (let i = 0; i < rows; i++) insert.run();
  };

  /** Writes until the worker has started (it looks once per interval). */
  async function startWorker(on: AppContext, insert: () => void) {
    const until = Date.now() + 4 * CHECKPOINT_INTERVAL_MS;
    while (!checkpointerOf(on.db)!.worker && Date.now() < until) {
      insert();
      await new Promise((r) => setTimeout(r, 100));
    }
    expect(checkpointerOf(on.db)!.worker).toBeDefined();
  }

  it('starts no worker for a server nobody writes to, and leaves checkpoints to SQLite meanwhile', async () => {
    write(5);
    await new Promise((r) => setTimeout(r, 2 * CHECKPOINT_INTERVAL_MS));
    expect(checkpointerOf(ctx.db)!.worker).toBeUndefined();
    expect(ctx.db.$client.pragma('wal_autocheckpoint', { simple: true })).toBe(1000);
  });

  it('the worker checkpoints a WAL the connection no longer checkpoints itself', async () => {
    // A megabyte of WAL: 3000-byte rows, a page or so each.
    await startWorker(ctx, () => write(Math.ceil(START_AFTER_WAL_BYTES / 4096 / 4)));
    expect(ctx.db.$client.pragma('wal_autocheckpoint', { simple: true })).toBe(0);
    write(50);
    const before = walSalt(file);
    // Each write after the worker's checkpoint may restart the WAL; without the worker none does.
    const until = Date.now() + 4 * CHECKPOINT_INTERVAL_MS;
    while (walSalt(file) === before && Date.now() < until) {
      await new Promise((r) => setTimeout(r, 100));
      write(1);
    }
    expect(walSalt(file)).not.toBe(before);
  });

  it('a worker that dies hands checkpoints back to the connection', async () => {
    const probe = await createContext(
      loadEnv({
        NODE_ENV: 'test',
        DATABASE_PATH: path.join(dir, 'probe.db'),
        UPLOADS_DIR: path.join(dir, 'uploads'),
        PUBLIC_URL: 'http://127.0.0.1:1',
        AUTH_SECRET: 'test-secret-that-is-long-enough-for-better-auth',
        LOG_LEVEL: 'silent',
      }),
    );
    probe.db.$client.exec('create table scratch (body blob)');
    const insert = probe.db.$client.prepare('insert into scratch (body) values (randomblob(3000))');
    await startWorker(probe, () => {
      for (let i = 0; i < 80; i++) insert.run();
    });
    expect(probe.db.$client.pragma('wal_autocheckpoint', { simple: true })).toBe(0);
    await checkpointerOf(probe.db)!.worker!.terminate();
    expect(probe.db.$client.pragma('wal_autocheckpoint', { simple: true })).toBe(1000);
    await closeContext(probe);
  });

  it('closing stops the worker before the connection, which closes last', async () => {
    write(20);
    const worker = checkpointerOf(ctx.db)!.worker!;
    let exited = false;
    worker.once('exit', () => (exited = true));
    expect(existsSync(`${file}-wal`)).toBe(true);
    await closeContext(ctx);
    expect(exited).toBe(true);
    expect(ctx.db.$client.open).toBe(false);
    expect(checkpointerOf(ctx.db)).toBeUndefined();
    expect(existsSync(`${file}-wal`)).toBe(false);
  });
});
