/**
 * A shore copy is swapped in only when it passes `PRAGMA integrity_check`: a replica of a damaged
 * record, or a replica whose snapshot was garbled on the way, never replaces the good copy in use;
 * a sound replica does (so the check can fail).
 */
import { execFileSync, spawn } from 'node:child_process';
import { existsSync, mkdtempSync, openSync, readdirSync, rmSync, writeSync, closeSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';

import Database from 'better-sqlite3';
import { afterAll, describe, expect, it } from 'vitest';

import { Mirror } from '@/server/mirror/mirror';
import { litestreamBinary } from '@/server/mirror/replicate';

const work = mkdtempSync(path.join(tmpdir(), 'bathynote-mirror-integrity-'));
afterAll(() => rmSync(work, { recursive: true, force: true }));

/** A small record: live events and enough rows in another table to span many pages. */
function makeRecord(file: string, events: number) {
  const db = new Database(file);
  db.pragma('journal_mode = WAL');
  db.exec('create table live_events (id integer primary key, at integer not null); create table notes (id integer primary key, body text)');
  const add = db.prepare('insert into live_events (at) values (?)');
  for (let i = 0; i < events; i++) add.run(Date.UTC(2026, 11, 3, 1, 0, i));
  const note = db.prepare('insert into notes (body) values (?)');
  for (let i = 0; i < 400; i++) note.run(`note ${i} ${'x'.repeat(300)}`);
  db.pragma('wal_checkpoint(TRUNCATE)');
  db.close();
}

/** Overwrites part of page `page` (1-based, 4096-byte pages) with bytes that are no b-tree page. */
function damagePage(file: string, page: number) {
  const fd = openSync(file, 'r+');
  writeSync(fd, Buffer.alloc(512, 0xa5), 0, 512, (page - 1) * 4096 + 8);
  closeSync(fd);
}

/** Replicates `file` into `replica/db` with Litestream until its first snapshot is there. */
async function replicate(file: string, replica: string) {
  const child = spawn(litestreamBinary(), ['replicate', file, `file://${path.join(replica, 'db')}`], { stdio: 'ignore' });
  const deadline = Date.now() + 20_000;
  const snapshots = () => {
    const generations = path.join(replica, 'db', 'generations');
    if (!existsSync(generations)) return [];
    return readdirSync(generations, { recursive: true })
      .map(String)
      .filter((f) => f.endsWith('.snapshot.lz4'));
  };
  while (snapshots().length === 0 && Date.now() < deadline) await new Promise((r) => setTimeout(r, 100));
  // A moment for the snapshot file to be complete and the WAL position written.
  await new Promise((r) => setTimeout(r, 1500));
  const exited = new Promise((r) => child.once('exit', r));
  child.kill('SIGTERM');
  await exited;
  return snapshots().map((f) => path.join(replica, 'db', 'generations', f));
}

function liveState(file: string) {
  const db = new Database(file, { readonly: true });
  try {
    return {
      check: db.pragma('integrity_check', { simple: true }),
      events: db.prepare('select count(*) from live_events').pluck().get() as number,
    };
  } finally {
    db.close();
  }
}

function shoreWith(replica: string, databasePath: string) {
  return new Mirror({ of: 'http://127.0.0.1:9', replica, databasePath, intervalMs: 1000 });
}

describe('a restored copy that fails its check', () => {
  const live = path.join(work, 'shore', 'bathynote.db');

  it('is never swapped in, and a sound one is', async () => {
    execFileSync('mkdir', ['-p', path.dirname(live)]);
    makeRecord(live, 3);
    expect(liveState(live)).toEqual({ check: 'ok', events: 3 });

    // A record damaged on the ship (a page of its notes overwritten), replicated faithfully.
    const damaged = path.join(work, 'damaged.db');
    makeRecord(damaged, 9);
    damagePage(damaged, 5);
    const damagedReplica = path.join(work, 'replica-damaged');
    await replicate(damaged, damagedReplica);
    const refusing = shoreWith(damagedReplica, live);
    expect(await refusing.restoreNow()).toBe(false);
    expect(refusing.lastRefusal).toMatch(/integrity_check|unreadable/);
    expect(liveState(live)).toEqual({ check: 'ok', events: 3 });

    // A sound record whose snapshot is garbled in the replica.
    const sound = path.join(work, 'sound.db');
    makeRecord(sound, 12);
    const garbledReplica = path.join(work, 'replica-garbled');
    const [snapshot] = await replicate(sound, garbledReplica);
    expect(snapshot).toBeDefined();
    damagePage(snapshot!, 1);
    const garbled = shoreWith(garbledReplica, live);
    expect(await garbled.restoreNow()).toBe(false);
    expect(garbled.lastRefusal).not.toBeNull();
    expect(liveState(live)).toEqual({ check: 'ok', events: 3 });

    // The same sound record, replicated intact, is swapped in.
    const soundReplica = path.join(work, 'replica-sound');
    await replicate(sound, soundReplica);
    expect(await shoreWith(soundReplica, live).restoreNow()).toBe(true);
    expect(liveState(live)).toEqual({ check: 'ok', events: 12 });
    // Nothing of the refused restores is left beside the live file.
    expect(readdirSync(path.dirname(live)).filter((f) => f.includes('restoring'))).toEqual([]);
  }, 120_000);
});
