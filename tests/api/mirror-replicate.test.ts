/**
 * The ship's side of the shore copy with a file replica: `npm start`'s entry with `REPLICATE_TO`
 * runs the server under Litestream, an entry logged through the API is in the copy that
 * `litestream restore` makes of the replica, photos arrive under `photos/` with the same keys,
 * the search index stays off the link, and a restart carries on in the same generation (no second
 * full snapshot across the link). Without `REPLICATE_TO` no Litestream runs.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';

import Database from 'better-sqlite3';
import { afterAll, describe, expect, it } from 'vitest';

import { filesUnder, logEntry, restoredWith, startShip } from '../helpers/replica';
import type { ServerProcess } from '../helpers/server-process';

const work = mkdtempSync(path.join(tmpdir(), 'bathynote-replica-'));
const servers: ServerProcess[] = [];
afterAll(async () => {
  for (const s of servers) await s.stop();
  rmSync(work, { recursive: true, force: true });
});

/** The processes started by `pid`, by command name. */
function childrenOf(pid: number): string[] {
  try {
    return execFileSync('ps', ['--ppid', String(pid), '-o', 'comm='], { encoding: 'utf8' })
      .split('\n')
      .map((s) => s.trim())
      .filter(Boolean);
  } catch {
    // ps exits with 1 when the process has no children.
    return [];
  }
}

describe('ship with a file replica', () => {
  const replica = path.join(work, 'shore');
  const shipDir = path.join(work, 'ship');
  const url = `file://${path.join(replica, 'db')}`;

  it('sends the record, then the photos, to the replica; the search index stays home', async () => {
    const ship = await startShip({ REPLICATE_TO: replica, REPLICATE_PHOTOS_INTERVAL: '1' }, { dir: shipDir });
    servers.push(ship);
    expect(childrenOf(ship.child.pid!)).toContain('litestream');

    const title = `Replicated crab ${Date.now()}`;
    const { photoId } = await logEntry(ship, title, true);
    const copy = await restoredWith(url, work, title, photoId);
    const restored = new Database(copy, { readonly: true });
    expect(restored.pragma('integrity_check', { simple: true })).toBe('ok');
    const keys = restored.prepare('select original_key as o, display_key as d, thumb_key as t from photos where id = ?').get(photoId) as {
      o: string;
      d: string;
      t: string;
    };
    restored.close();

    // Photos: every size of the new one arrives whole, under its own key.
    const deadline = Date.now() + 15_000;
    while (Date.now() < deadline && !filesUnder(path.join(replica, 'photos')).includes(keys.o))
      await new Promise((r) => setTimeout(r, 300));
    for (const key of [keys.t, keys.d, keys.o])
      expect(readFileSync(path.join(replica, 'photos', key)).equals(readFileSync(path.join(shipDir, 'uploads', key)))).toBe(true);

    // Only the database file travels: no search index, secret or Litestream state in the replica.
    const sent = filesUnder(replica);
    expect(sent.filter((f) => !f.startsWith('db/generations/') && !f.startsWith('photos/'))).toEqual([]);
    expect(sent.some((f) => /search|auth-secret|litestream/.test(f.replace(/^db\//, '')))).toBe(false);
    const config = readFileSync(path.join(shipDir, 'litestream.yml'), 'utf8');
    expect(config.match(/^\s+- path:/gm)).toHaveLength(1);
    expect(config).toContain(`path: ${JSON.stringify(path.join(shipDir, 'bathynote.db'))}`);
    await ship.stop();
  }, 90_000);

  it('after a restart carries on in the same generation, with no second snapshot', async () => {
    const generations = () => filesUnder(path.join(replica, 'db')).filter((f) => f.endsWith('.snapshot.lz4'));
    const before = generations();
    expect(before).toHaveLength(1);
    const ship = await startShip({ REPLICATE_TO: replica }, { dir: shipDir });
    servers.push(ship);
    const title = `After the restart ${Date.now()}`;
    await logEntry(ship, title);
    await restoredWith(url, work, title);
    expect(generations()).toEqual(before);
    await ship.stop();
  }, 90_000);
});

describe('ship without REPLICATE_TO', () => {
  it('runs the server in the same process as before, with no Litestream', async () => {
    const ship = await startShip({}, { dir: path.join(work, 'plain') });
    servers.push(ship);
    expect((await fetch(`${ship.url}/api/health`)).status).toBe(200);
    expect(childrenOf(ship.child.pid!)).not.toContain('litestream');
    expect(filesUnder(path.join(work, 'plain'))).not.toContain('litestream.yml');
  }, 60_000);
});

describe('ship whose photo originals wait for a quiet photo store', () => {
  it('sends thumbnails and display sizes at once and the originals only once no new photo came for REPLICATE_ORIGINALS_AFTER', async () => {
    const replica = path.join(work, 'shore-late');
    const shipDir = path.join(work, 'ship-late');
    const ship = await startShip(
      { REPLICATE_TO: replica, REPLICATE_PHOTOS_INTERVAL: '1', REPLICATE_ORIGINALS_AFTER: '15' },
      { dir: shipDir },
    );
    servers.push(ship);
    const { photoId } = await logEntry(ship, `Late original ${Date.now()}`, true);
    const uploadedAt = Date.now();
    const ashore = new Database(path.join(shipDir, 'bathynote.db'), { readonly: true });
    const keys = ashore.prepare('select original_key as o, display_key as d, thumb_key as t from photos where id = ?').get(photoId) as {
      o: string;
      d: string;
      t: string;
    };
    ashore.close();
    const present = () => filesUnder(path.join(replica, 'photos'));
    const waitFor = async (key: string, ms: number) => {
      const deadline = Date.now() + ms;
      while (Date.now() < deadline && !present().includes(key)) await new Promise((r) => setTimeout(r, 300));
      return present().includes(key);
    };
    expect(await waitFor(keys.d, 12_000)).toBe(true);
    expect(present()).toContain(keys.t);
    // Still within the quiet time: the original has not gone.
    expect(Date.now() - uploadedAt).toBeLessThan(15_000);
    expect(present()).not.toContain(keys.o);
    expect(await waitFor(keys.o, 40_000)).toBe(true);
    expect(Date.now() - uploadedAt).toBeGreaterThanOrEqual(14_000);
    expect(readFileSync(path.join(replica, 'photos', keys.o)).equals(readFileSync(path.join(shipDir, 'uploads', keys.o)))).toBe(true);
    await ship.stop();
  }, 90_000);
});
