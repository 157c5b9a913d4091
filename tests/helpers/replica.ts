/**
 * For the shore-copy tests: a ship server started as `npm start` starts it (scripts/start.ts, so
 * with `REPLICATE_TO` it runs under Litestream), an entry with a photo logged through the API, and
 * the record read back from the replica by `litestream restore`, as the shore does.
 */
import { execFile } from 'node:child_process';
import { existsSync, readdirSync } from 'node:fs';
import path from 'node:path';
import { promisify } from 'node:util';

import Database from 'better-sqlite3';

import { buildServer } from '../../scripts/build-server';
import { litestreamBinary } from '../../server/mirror/replicate';
import { jpegWithExif } from '../fixtures/photos/make';
import { apiSignIn } from './e2e-fixtures';
import { startServerProcess, type ServerProcess } from './server-process';

const run = promisify(execFile);

export async function startShip(env: Record<string, string>, options: { dir?: string } = {}): Promise<ServerProcess> {
  buildServer();
  return startServerProcess(env, { script: path.join('scripts', 'start.ts'), keepDir: true, ...options });
}

/** Logs an entry (and, when asked, one photo on it) as the demo's biologist; answers its id and the photo's. */
export async function logEntry(ship: ServerProcess, title: string, withPhoto = false): Promise<{ id: string; photoId?: string }> {
  const db = new Database(path.join(ship.dir, 'bathynote.db'), { readonly: true });
  const diveId = (
    db
      .prepare(
        `select dives.id from dives join memberships on memberships.campaign_id = dives.campaign_id
         join user on user.id = memberships.user_id where user.email = 'biologist@bathynote.test' limit 1`,
      )
      .get() as { id: string }
  ).id;
  db.close();
  const biologist = await apiSignIn(ship.url, 'biologist@bathynote.test');
  const entry = await biologist.call<{ id: string }>(`/api/dives/${diveId}/observations`, 'POST', { kind: 'biology', title }, 201);
  if (!withPhoto) return { id: entry.id };
  const photo = await jpegWithExif({}, { width: 1600, height: 1200 });
  const after = await biologist.upload<{ photos: { id: string }[] }>(
    `/api/observations/${entry.id}/photos`,
    'photo',
    'grab.jpg',
    photo,
    201,
  );
  return { id: entry.id, photoId: after.photos.at(-1)?.id };
}

/** Restores the replica at `replicaUrl` (file:// or sftp://) into `out`, as the shore does. */
export async function restore(replicaUrl: string, out: string, extraArgs: string[] = []): Promise<void> {
  await run(litestreamBinary(), ['restore', ...extraArgs, '-o', out, replicaUrl]);
}

/** Restores until the copy holds an entry with this title (and the photo, when given); answers the copy's path. */
export async function restoredWith(
  replicaUrl: string,
  workDir: string,
  title: string,
  photoId?: string,
  timeoutMs = 20_000,
): Promise<string> {
  const deadline = Date.now() + timeoutMs;
  for (let attempt = 0; ; attempt++) {
    const out = path.join(workDir, `restored-${attempt}.db`);
    try {
      await restore(replicaUrl, out);
      const db = new Database(out, { readonly: true });
      const found = db.prepare('select count(*) as n from observations where title = ?').get(title) as { n: number };
      const photo = photoId ? (db.prepare('select count(*) as n from photos where id = ?').get(photoId) as { n: number }).n : 1;
      db.close();
      if (found.n === 1 && photo === 1) return out;
    } catch (err) {
      if (Date.now() > deadline) throw err;
    }
    if (Date.now() > deadline) throw new Error(`no entry "${title}" (or its photo) in the restored copy after ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 1000));
  }
}

/** Every file under a folder, as paths relative to it. */
export function filesUnder(dir: string): string[] {
  if (!existsSync(dir)) return [];
  return readdirSync(dir, { recursive: true, withFileTypes: true })
    .filter((e) => e.isFile())
    .map((e) => path.relative(dir, path.join(e.parentPath, e.name)));
}
