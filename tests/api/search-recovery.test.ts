/**
 * The search index is a file of its own beside the database, so it can fall behind the record
 * (SQLite does not commit across two WAL files at once) or go missing. These tests run the real
 * server (the bundle `npm start` runs), kill it with SIGKILL, put an older index file back or
 * delete it, and start it again on the same data: what the record holds is what search finds.
 */
import { copyFileSync, existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';

import { afterAll, describe, expect, it } from 'vitest';

import { searchPageSchema } from '@/lib/schemas/search';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';

const dir = mkdtempSync(path.join(tmpdir(), 'bathynote-search-'));
const indexFile = path.join(dir, 'bathynote.search.db');
const indexFiles = [indexFile, `${indexFile}-wal`, `${indexFile}-shm`];
let server: ServerProcess | undefined;

afterAll(async () => {
  if (server) await kill(server);
  rmSync(dir, { recursive: true, force: true });
});

async function kill(s: ServerProcess) {
  if (s.child.exitCode !== null || s.child.signalCode !== null) return;
  const exited = new Promise((r) => s.child.once('exit', r));
  s.child.kill('SIGKILL');
  await exited;
}

type Client = { url: string; cookie: string };

async function start(): Promise<Client> {
  server = await startServerProcess({ LOG_LEVEL: 'silent' }, { dir, keepDir: true });
  const login = await fetch(`${server.url}/api/auth/sign-in/email`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: server.url },
    body: JSON.stringify({ email: 'lead@bathynote.test', password: 'bathynote-demo' }),
  });
  expect(login.status).toBe(200);
  const cookie = login.headers
    .getSetCookie()
    .map((c) => c.split(';')[0])
    .join('; ');
  return { url: server.url, cookie };
}

const call = (c: Client, method: string, url: string, body?: unknown) =>
  fetch(`${c.url}${url}`, {
    method,
    headers: { cookie: c.cookie, origin: c.url, ...(body ? { 'content-type': 'application/json' } : {}) },
    body: body ? JSON.stringify(body) : undefined,
  });

async function firstDive(c: Client): Promise<string> {
  const campaigns = (await (await call(c, 'GET', '/api/campaigns')).json()) as { id: string }[];
  const dives = (await (await call(c, 'GET', `/api/campaigns/${campaigns[0]!.id}/dives`)).json()) as { id: string }[];
  return dives[0]!.id;
}

async function create(c: Client, diveId: string, title: string): Promise<string> {
  const res = await call(c, 'POST', `/api/dives/${diveId}/observations`, { kind: 'biology', title });
  expect(res.status).toBe(201);
  return ((await res.json()) as { id: string }).id;
}

async function found(c: Client, q: string): Promise<string[]> {
  const res = await call(c, 'GET', `/api/search?q=${encodeURIComponent(q)}&limit=50`);
  expect(res.status).toBe(200);
  return searchPageSchema
    .parse(await res.json())
    .items.map((i) => i.id)
    .sort();
}

describe('the search index after a crash', () => {
  const live = new Set<string>();
  let retired = '';
  let diveId = '';

  it('catches up with writes acknowledged just before the server was killed', async () => {
    let c = await start();
    diveId = await firstDive(c);
    live.add(await create(c, diveId, 'Pellucine anchor ring'));
    retired = await create(c, diveId, 'Pellucine rope coil');
    expect((await call(c, 'DELETE', `/api/observations/${retired}`)).status).toBeLessThan(300);

    // Twenty writes at once; the server is killed as soon as the first is acknowledged.
    let firstAck: () => void = () => undefined;
    const sawAck = new Promise<void>((r) => (firstAck = r));
    const writes = Array.from({ length: 20 }, async (_, i) => {
      try {
        const res = await call(c, 'POST', `/api/dives/${diveId}/observations`, { kind: 'biology', title: `Pellucine batch ${i}` });
        if (res.status === 201) {
          live.add(((await res.json()) as { id: string }).id);
          firstAck();
        }
      } catch {
        // The server died under this request: it was never acknowledged.
      }
    });
    await sawAck;
    await kill(server!);
    await Promise.all(writes);

    c = await start();
    const after = await found(c, 'pellucine');
    // Everything acknowledged is found (more may be: a write can commit as its answer is lost).
    for (const id of live) expect(after).toContain(id);
    expect(after).not.toContain(retired);
    for (const id of after) live.add(id);
  });

  it('indexes again what an older index file lacks, and forgets what was retired since', async () => {
    await kill(server!);
    const saved = indexFiles.map((f) => (existsSync(f) ? `${f}.saved` : null));
    indexFiles.forEach((f, i) => saved[i] && copyFileSync(f, saved[i]));

    let c = await start();
    const added = await create(c, diveId, 'Pellucine tide gauge');
    const gone = [...live][0]!;
    expect((await call(c, 'DELETE', `/api/observations/${gone}`)).status).toBeLessThan(300);
    live.add(added);
    live.delete(gone);
    await kill(server!);

    // The index as it was before those two changes.
    for (const [i, f] of indexFiles.entries()) {
      rmSync(f, { force: true });
      if (saved[i]) copyFileSync(saved[i], f);
    }
    c = await start();
    expect(await found(c, 'pellucine')).toEqual([...live].sort());
  });

  it('rebuilds a deleted index file from the record', async () => {
    await kill(server!);
    for (const f of indexFiles) rmSync(f, { force: true });
    const c = await start();
    expect(existsSync(indexFile)).toBe(true);
    expect(await found(c, 'pellucine')).toEqual([...live].sort());
    expect(await found(c, 'pellucne tide')).toHaveLength(1);
  });
});
