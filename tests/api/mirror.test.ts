/**
 * The shore mirror with a file replica between two real servers on this machine: Litestream
 * replicates the ship's record into a folder, the shore (`MIRROR_OF`, `REPLICA`) restores it at
 * an interval and relays the ship's live events over one upstream stream. The ship's address the
 * shore uses runs through a small TCP relay of the test, so the link can be cut and restored.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { cpSync, existsSync, mkdtempSync, renameSync, rmSync } from 'node:fs';
import { createServer, connect, type Server, type Socket } from 'node:net';
import { tmpdir } from 'node:os';
import path from 'node:path';

import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { litestreamBinary } from '@/server/mirror/replicate';
import { jpegWithExif } from '../fixtures/photos/make';
import { freePort, startServerProcess, type ServerProcess } from '../helpers/server-process';
import { openSse } from '../helpers/sse';

const work = mkdtempSync(path.join(tmpdir(), 'bathynote-mirror-'));
const replica = path.join(work, 'replica');
const secrets = { AUTH_SECRET: 'mirror-test-secret-mirror-test-secret-0123', MIRROR_KEY: 'mirror-key-for-the-tests-0123' };
const RESTORE_MS = 2000;

let ship: ServerProcess;
let shore: ServerProcess;
let litestream: ChildProcess | undefined;
let link: { server: Server; sockets: Set<Socket>; port: number };
let shipPublicUrl = '';
let diveId = '';
let otherDiveId = '';

function startLitestream() {
  litestream = spawn(litestreamBinary(), ['replicate', path.join(ship.dir, 'bathynote.db'), `file://${path.join(replica, 'db')}`], {
    stdio: 'ignore',
  });
}

async function stopLitestream() {
  const child = litestream;
  if (!child || child.exitCode !== null) return;
  const exited = new Promise((r) => child.once('exit', r));
  child.kill('SIGTERM');
  await exited;
}

/** The link: a TCP relay from a port of its own to the ship, which the test can close and open. */
async function openLink(port: number) {
  const sockets = new Set<Socket>();
  const shipPort = Number(new URL(ship.url).port);
  const server = createServer((inbound) => {
    const outbound = connect(shipPort, '127.0.0.1');
    sockets.add(inbound).add(outbound);
    inbound.pipe(outbound).pipe(inbound);
    const end = () => {
      inbound.destroy();
      outbound.destroy();
      sockets.delete(inbound);
      sockets.delete(outbound);
    };
    inbound.on('error', end).on('close', end);
    outbound.on('error', end).on('close', end);
  });
  await new Promise<void>((r) => server.listen(port, '127.0.0.1', r));
  link = { server, sockets, port };
}

async function cutLink() {
  await new Promise<void>((r) => {
    link.server.close(() => r());
    for (const s of link.sockets) s.destroy();
  });
}

async function until<T>(what: string, check: () => Promise<T | undefined> | T | undefined, timeoutMs: number): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const found = await check();
    if (found !== undefined) return found;
    if (Date.now() > deadline) throw new Error(`${what}: not within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

type Session = { cookie: string; call: <T = unknown>(path: string, method?: string, body?: unknown, expect?: number) => Promise<T> };

/** Signs in with the demo's password at `url`; the session's calls go to the same address. */
async function apiSignIn(url: string, email: string, origin = url): Promise<Session> {
  const res = await fetch(`${url}/api/auth/sign-in/email`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin },
    body: JSON.stringify({ email, password: 'bathynote-demo' }),
  });
  if (!res.ok) throw new Error(`sign-in as ${email} at ${url}: ${res.status} ${await res.text()}`);
  const cookie = res.headers
    .getSetCookie()
    .map((c) => c.split(';')[0]!)
    .filter((c) => !c.endsWith('='))
    .join('; ');
  return {
    cookie,
    call: async <T>(p: string, method = 'GET', body?: unknown, expect?: number) => {
      const answer = await fetch(`${url}${p}`, {
        method,
        headers: { cookie, origin, ...(body === undefined ? {} : { 'content-type': 'application/json' }) },
        ...(body === undefined ? {} : { body: JSON.stringify(body) }),
      });
      const text = await answer.text();
      if (expect === undefined ? !answer.ok : answer.status !== expect) throw new Error(`${method} ${p}: ${answer.status} ${text}`);
      return (text ? JSON.parse(text) : undefined) as T;
    },
  };
}

/** Reads the shore's own database file (what its restored copy holds). */
function shoreHolds(query: string, ...params: unknown[]): number {
  const db = new Database(path.join(shore.dir, 'bathynote.db'), { readonly: true });
  try {
    return (
      (db
        .prepare(query)
        .pluck()
        .get(...params) as number) ?? 0
    );
  } finally {
    db.close();
  }
}

const entryCount = (title: string) => shoreHolds('select count(*) from observations where title = ?', title);

/** Signs in through the shore and waits until the restored copy holds that session. */
async function shoreSession(email: string): Promise<Session> {
  const session = await apiSignIn(shore.url, email);
  const token = decodeURIComponent(/session_token=([^;]+)/.exec(session.cookie)![1]!).split('.')[0]!;
  await until(
    `session of ${email} in the shore copy`,
    () => (shoreHolds('select count(*) from session where token = ?', token) ? true : undefined),
    20_000,
  );
  return session;
}

async function health(url: string) {
  return (await (await fetch(`${url}/api/health`)).json()) as { ok: boolean; mirror?: { of: string; lagSeconds: number; link: string } };
}

beforeAll(async () => {
  // The ship's public address is the far end of the link, as a shore sees it.
  const linkPort = await freePort();
  shipPublicUrl = `http://127.0.0.1:${linkPort}`;
  // Every sign-in through a shore reaches the ship from the shore's one address (README: AUTH_RATE_LIMIT or TRUST_PROXY).
  ship = await startServerProcess({ ...secrets, PUBLIC_URL: shipPublicUrl, AUTH_RATE_LIMIT: '1000' });
  const db = new Database(path.join(ship.dir, 'bathynote.db'), { readonly: true });
  const diveOf = (campaign: string, number: string) =>
    db
      .prepare('select d.id from dives d join campaigns c on c.id = d.campaign_id where c.name = ? and d.number = ?')
      .pluck()
      .get(campaign, number) as string;
  diveId = diveOf('Varn Shoal 2026', 'VS-02');
  otherDiveId = diveOf('Varn Shoal 2024', 'VS24-01');
  db.close();
  startLitestream();
  await until('first snapshot in the replica', () => (existsSync(path.join(replica, 'db', 'generations')) ? true : undefined), 20_000);
  await openLink(linkPort);
  shore = await startServerProcess({
    ...secrets,
    MIRROR_OF: shipPublicUrl,
    REPLICA: replica,
    MIRROR_RESTORE_INTERVAL_MS: String(RESTORE_MS),
    // The mirror's default; named here because the test helper gives every server a folder of its own.
    UPLOADS_DIR: path.join(replica, 'photos'),
  });
}, 120_000);

afterAll(async () => {
  await stopLitestream();
  await shore?.stop();
  await ship?.stop();
  link?.server.close();
  rmSync(work, { recursive: true, force: true });
});

describe('shore mirror', () => {
  it('says on /api/health that it is a mirror, of which ship, and how far behind', async () => {
    // The stream from the ship opens a moment after the shore starts.
    const answer = await until(
      'link up',
      async () => {
        const h = await health(shore.url);
        return h.mirror?.link === 'up' ? h : undefined;
      },
      10_000,
    );
    expect(answer.ok).toBe(true);
    expect(answer.mirror).toMatchObject({ of: shipPublicUrl, link: 'up' });
    expect(answer.mirror!.lagSeconds).toBeGreaterThanOrEqual(0);
    expect(answer.mirror!.lagSeconds).toBeLessThan(30);
    expect((await health(ship.url)).mirror).toBeUndefined();
  });

  it('relays an entry logged on the ship to every shore reader within 2 s, keeps it on refetch, then holds it in the restored copy', async () => {
    const reader = await shoreSession('archaeologist@bathynote.test');
    const streams = [0, 1].map(() => openSse(`${shore.url}/api/dives/${diveId}/stream`, { cookie: reader.cookie }));
    for (const s of streams) await s.next((e) => e.event === 'ready', 10_000);
    const lead = await apiSignIn(ship.url, 'lead@bathynote.test', shipPublicUrl);
    // A word of letters only, so the search below finds this entry alone.
    const word = `relayed${Array.from({ length: 8 }, () => String.fromCharCode(97 + Math.floor(Math.random() * 26))).join('')}`;
    const title = `Seen live ${word}`;
    const sentAt = Date.now();
    const entry = await lead.call<{ id: string }>(`/api/dives/${diveId}/observations`, 'POST', { kind: 'biology', title }, 201);
    for (const s of streams) {
      const e = await s.next((x) => x.event === 'observation.created' && x.data.includes(title), 2000);
      expect(JSON.parse(e.data)).toMatchObject({ id: entry.id, title });
    }
    expect(Date.now() - sentAt).toBeLessThan(2000);
    // A refetch right after the live event shows the entry, whether or not the copy holds it yet.
    const page = await reader.call<{ items: { id: string }[] }>(`/api/dives/${diveId}/observations`);
    expect(page.items.map((i) => i.id)).toContain(entry.id);
    await until('entry in the restored copy', () => (entryCount(title) === 1 ? true : undefined), RESTORE_MS * 2 + 8000);
    // The search index caught up with the swapped-in copy.
    const found = await until(
      'entry found by search on the shore',
      async () => {
        const r = await reader.call<{ items: { id: string }[] }>(`/api/search?q=${word}`);
        return r.items.length > 0 ? r : undefined;
      },
      5000,
    );
    expect(found.items.map((i) => i.id)).toEqual([entry.id]);
    for (const s of streams) s.close();
  }, 60_000);

  it('lets a guest sign in and log an entry through the shore, and shows it to them at once', async () => {
    const guest = await apiSignIn(shore.url, 'guest@bathynote.test');
    const title = `From ashore ${Date.now()}`;
    const entry = await guest.call<{ id: string; title: string }>(
      `/api/dives/${diveId}/observations`,
      'POST',
      { kind: 'biology', title },
      201,
    );
    expect(entry.title).toBe(title);
    const page = await guest.call<{ items: { id: string }[] }>(`/api/dives/${diveId}/observations`);
    expect(page.items.map((i) => i.id)).toContain(entry.id);
    // It went to the ship, and comes back in the copy.
    const onShip = await (
      await apiSignIn(ship.url, 'lead@bathynote.test', shipPublicUrl)
    ).call<{ title: string }>(`/api/observations/${entry.id}`);
    expect(onShip.title).toBe(title);
    await until('guest entry in the restored copy', () => (entryCount(title) === 1 ? true : undefined), RESTORE_MS * 2 + 8000);
  }, 60_000);

  it('serves a photo from the photos the ship sends ashore, the same bytes as the ship', async () => {
    const lead = await apiSignIn(ship.url, 'lead@bathynote.test', shipPublicUrl);
    const entry = await lead.call<{ id: string }>(
      `/api/dives/${diveId}/observations`,
      'POST',
      { kind: 'biology', title: 'With a photo' },
      201,
    );
    const form = new FormData();
    form.append('photo', new Blob([new Uint8Array(await jpegWithExif({}, { width: 800, height: 600 }))]), 'grab.jpg');
    const upload = await fetch(`${ship.url}/api/observations/${entry.id}/photos`, {
      method: 'POST',
      headers: { cookie: lead.cookie, origin: shipPublicUrl },
      body: form,
    });
    expect(upload.status).toBe(201);
    const photoId = ((await upload.json()) as { photos: { id: string }[] }).photos.at(-1)!.id;
    const onShip = await until(
      'thumbnail on the ship',
      async () => {
        const r = await fetch(`${ship.url}/api/photos/${photoId}?size=thumb`, { headers: { cookie: lead.cookie } });
        return r.status === 200 ? Buffer.from(await r.arrayBuffer()) : undefined;
      },
      20_000,
    );
    // What the ship's rsync pass does: the photo store's files under the same keys.
    cpSync(path.join(ship.dir, 'uploads'), path.join(replica, 'photos'), { recursive: true });
    const reader = await shoreSession('archaeologist@bathynote.test');
    await until(
      'photo in the shore copy',
      () => (shoreHolds('select count(*) from photos where id = ?', photoId) ? true : undefined),
      20_000,
    );
    const onShore = await fetch(`${shore.url}/api/photos/${photoId}?size=thumb`, { headers: { cookie: reader.cookie } });
    expect(onShore.status).toBe(200);
    expect(Buffer.from(await onShore.arrayBuffer()).equals(onShip)).toBe(true);
  }, 60_000);

  it('answers an outsider 404 on the shore exactly as the ship does', async () => {
    const outsider = await shoreSession('outsider@bathynote.test');
    const onShore = await fetch(`${shore.url}/api/dives/${otherDiveId}`, { headers: { cookie: outsider.cookie } });
    const onShip = await fetch(`${ship.url}/api/dives/${otherDiveId}`, { headers: { cookie: outsider.cookie } });
    expect(onShore.status).toBe(404);
    expect(onShip.status).toBe(404);
    expect(await onShore.json()).toEqual(await onShip.json());
  }, 60_000);

  it('keeps serving through a cut link, says so, refuses writes plainly, and catches up with no entry lost', async () => {
    const reader = await shoreSession('pilot@bathynote.test');
    const lead = await apiSignIn(ship.url, 'lead@bathynote.test', shipPublicUrl);
    const hidden = path.join(work, 'replica-away');
    await stopLitestream();
    renameSync(replica, hidden);
    await cutLink();
    const titles: string[] = [];
    for (let i = 0; i < 3; i++) {
      const title = `During the outage ${i} ${Date.now()}`;
      await lead.call(`/api/dives/${diveId}/observations`, 'POST', { kind: 'biology', title }, 201);
      titles.push(title);
    }
    await new Promise((r) => setTimeout(r, 4000));
    const down = await health(shore.url);
    expect(down.mirror!.link).toBe('down');
    expect(down.mirror!.lagSeconds).toBeGreaterThanOrEqual(3);
    // Reads are served from the copy; a write fails plainly, and nothing is queued.
    const page = await reader.call<{ items: { title: string }[] }>(`/api/dives/${diveId}/observations`);
    expect(page.items.length).toBeGreaterThan(0);
    const refused = await fetch(`${shore.url}/api/dives/${diveId}/observations`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', cookie: reader.cookie, origin: shore.url },
      body: JSON.stringify({ kind: 'biology', title: 'never stored' }),
    });
    expect(refused.status).toBe(502);
    expect(((await refused.json()) as { error: { code: string } }).error.code).toBe('ship_unreachable');
    for (const t of titles) expect(entryCount(t)).toBe(0);

    renameSync(hidden, replica);
    startLitestream();
    await openLink(link.port);
    for (const t of titles) await until(`"${t}" in the copy after the outage`, () => (entryCount(t) === 1 ? true : undefined), 30_000);
    expect(entryCount('never stored')).toBe(0);
    const up = await until(
      'link up and lag small again',
      async () => {
        const h = await health(shore.url);
        return h.mirror!.link === 'up' && h.mirror!.lagSeconds <= RESTORE_MS / 1000 + 5 ? h : undefined;
      },
      30_000,
    );
    expect(up.mirror!.link).toBe('up');
  }, 120_000);
});

describe('shore mirror between two restores', () => {
  it('keeps relayed entries in the log and replays them to a reader who reconnects, before any copy holds them', async () => {
    // A reader whose session is in the replica before this shore makes its first and only copy.
    const reader = await apiSignIn(ship.url, 'biologist@bathynote.test', shipPublicUrl);
    await new Promise((r) => setTimeout(r, 3000));
    const slow = await startServerProcess({
      ...secrets,
      MIRROR_OF: shipPublicUrl,
      REPLICA: replica,
      MIRROR_RESTORE_INTERVAL_MS: '600000',
      UPLOADS_DIR: path.join(replica, 'photos'),
    });
    try {
      const slowHolds = (title: string) => {
        const db = new Database(path.join(slow.dir, 'bathynote.db'), { readonly: true });
        try {
          return db.prepare('select count(*) from observations where title = ?').pluck().get(title) as number;
        } finally {
          db.close();
        }
      };
      await until('link up', async () => ((await health(slow.url)).mirror?.link === 'up' ? true : undefined), 10_000);
      const first = openSse(`${slow.url}/api/dives/${diveId}/stream`, { cookie: reader.cookie });
      await first.next((e) => e.event === 'ready', 10_000);
      const lead = await apiSignIn(ship.url, 'lead@bathynote.test', shipPublicUrl);
      const one = `Between copies one ${Date.now()}`;
      const entry = await lead.call<{ id: string }>(`/api/dives/${diveId}/observations`, 'POST', { kind: 'biology', title: one }, 201);
      const seen = await first.next((e) => e.event === 'observation.created' && e.data.includes(one), 2000);
      // The copy does not hold it, yet the reader's refetch of the log still shows it.
      expect(slowHolds(one)).toBe(0);
      const page = await fetch(`${slow.url}/api/dives/${diveId}/observations`, { headers: { cookie: reader.cookie } });
      expect(((await page.json()) as { items: { id: string }[] }).items.map((i) => i.id)).toContain(entry.id);

      // A reader who was away while the next entry arrived is replayed it on reconnecting.
      first.close();
      const two = `Between copies two ${Date.now()}`;
      await lead.call(`/api/dives/${diveId}/observations`, 'POST', { kind: 'biology', title: two }, 201);
      await new Promise((r) => setTimeout(r, 1000));
      const again = openSse(`${slow.url}/api/dives/${diveId}/stream`, { cookie: reader.cookie, 'last-event-id': seen.id! });
      await again.next((e) => e.event === 'observation.created' && e.data.includes(two), 3000);
      expect(slowHolds(two)).toBe(0);
      again.close();
    } finally {
      await slow.stop();
    }
  }, 90_000);
});

describe('shore mirror, sessions its copy does not hold yet', () => {
  let slow: ServerProcess;
  let held: Session;
  const slowHolds = (query: string, ...params: unknown[]) => {
    const db = new Database(path.join(slow.dir, 'bathynote.db'), { readonly: true });
    try {
      return db
        .prepare(query)
        .pluck()
        .get(...params) as number;
    } finally {
      db.close();
    }
  };
  const tokenOf = (s: Session) => decodeURIComponent(/session_token=([^;]+)/.exec(s.cookie)![1]!).split('.')[0]!;
  const get = (url: string, s: Session, p: string) => fetch(`${url}${p}`, { headers: { cookie: s.cookie } });

  beforeAll(async () => {
    // A session in the replica before this shore makes its copy.
    held = await apiSignIn(ship.url, 'pilot@bathynote.test', shipPublicUrl);
    await new Promise((r) => setTimeout(r, 3000));
    // One copy at the start and no other during these tests: every session signed in below is new to it.
    slow = await startServerProcess({
      ...secrets,
      MIRROR_OF: shipPublicUrl,
      REPLICA: replica,
      MIRROR_RESTORE_INTERVAL_MS: '600000',
      UPLOADS_DIR: path.join(replica, 'photos'),
    });
    await until('link up', async () => ((await health(slow.url)).mirror?.link === 'up' ? true : undefined), 10_000);
  }, 60_000);

  afterAll(async () => {
    await slow?.stop();
  });

  it('checks a new session once with the ship and then serves its reads from the copy, with the ship’s access', async () => {
    const guest = await apiSignIn(slow.url, 'guest@bathynote.test');
    const outsider = await apiSignIn(slow.url, 'outsider@bathynote.test');
    expect(slowHolds('select count(*) from session where token in (?, ?)', tokenOf(guest), tokenOf(outsider))).toBe(0);
    expect((await get(slow.url, guest, `/api/dives/${diveId}`)).status).toBe(200);
    const outsiderOnShore = await get(slow.url, outsider, `/api/dives/${otherDiveId}`);
    const outsiderOnShip = await get(ship.url, outsider, `/api/dives/${otherDiveId}`);
    expect(outsiderOnShore.status).toBe(404);
    expect(outsiderOnShip.status).toBe(404);
    expect(await outsiderOnShore.json()).toEqual(await outsiderOnShip.json());
    expect((await get(slow.url, guest, `/api/dives/${otherDiveId}`)).status).toBe(
      (await get(ship.url, guest, `/api/dives/${otherDiveId}`)).status,
    );
    // With the link cut, the checked session still reads: its reads are the copy's, not the ship's.
    await cutLink();
    try {
      const page = await get(slow.url, guest, `/api/dives/${diveId}/observations`);
      expect(page.status).toBe(200);
      expect(((await page.json()) as { items: unknown[] }).items.length).toBeGreaterThan(0);
      expect((await get(slow.url, outsider, `/api/dives/${diveId}`)).status).toBe(404);
      // A session never checked cannot be vouched for and is not served from the copy.
      const unknownCookie = guest.cookie.replace(/session_token=[^.;]+/, 'session_token=notasessiontoken');
      expect((await fetch(`${slow.url}/api/dives/${diveId}`, { headers: { cookie: unknownCookie } })).status).not.toBe(200);
    } finally {
      await openLink(link.port);
      await until('link up again', async () => ((await health(slow.url)).mirror?.link === 'up' ? true : undefined), 15_000);
    }
  }, 60_000);

  it('refuses a session the ship signed out on its next request, before any copy brings the change', async () => {
    const fresh = await apiSignIn(slow.url, 'guest@bathynote.test');
    expect(slowHolds('select count(*) from session where token = ?', tokenOf(held))).toBe(1);
    expect((await get(slow.url, fresh, `/api/dives/${diveId}`)).status).toBe(200);
    expect((await get(slow.url, held, `/api/dives/${diveId}`)).status).toBe(200);
    const stream = openSse(`${slow.url}/api/dives/${diveId}/stream`, { cookie: fresh.cookie });
    await stream.next((e) => e.event === 'ready', 10_000);
    for (const s of [fresh, held]) {
      const out = await fetch(`${ship.url}/api/auth/sign-out`, { method: 'POST', headers: { cookie: s.cookie, origin: shipPublicUrl } });
      expect(out.status).toBe(200);
    }
    const refused = await until(
      'the shore refuses the signed-out session',
      async () => {
        const r = await get(slow.url, fresh, `/api/dives/${diveId}`);
        return r.status === 401 ? r : undefined;
      },
      2000,
    );
    expect(((await refused.json()) as { error: { code: string } }).error.code).toBe('unauthorized');
    expect((await get(slow.url, fresh, `/api/me`)).status).toBe(401);
    // The live stream of the ended session closes too.
    await Promise.race([stream.ended, new Promise((_, no) => setTimeout(() => no(new Error('stream still open')), 3000))]);
    stream.close();
    const heldAnswer = await get(slow.url, held, `/api/dives/${diveId}`);
    expect(heldAnswer.status).toBe(401);
  }, 60_000);

  it('answers one entry seen live, or changed live, before the copy holds it; an outsider still gets 404', async () => {
    const reader = await apiSignIn(slow.url, 'archaeologist@bathynote.test');
    const outsider = await apiSignIn(slow.url, 'outsider@bathynote.test');
    const stream = openSse(`${slow.url}/api/dives/${diveId}/stream`, { cookie: reader.cookie });
    await stream.next((e) => e.event === 'ready', 10_000);
    const lead = await apiSignIn(ship.url, 'lead@bathynote.test', shipPublicUrl);
    const title = `One entry live ${Date.now()}`;
    const entry = await lead.call<{ id: string; version: number }>(
      `/api/dives/${diveId}/observations`,
      'POST',
      { kind: 'biology', title },
      201,
    );
    await stream.next((e) => e.event === 'observation.created' && e.data.includes(title), 3000);
    expect(slowHolds('select count(*) from observations where id = ?', entry.id)).toBe(0);
    const one = await get(slow.url, reader, `/api/observations/${entry.id}`);
    expect(one.status).toBe(200);
    expect(await one.json()).toMatchObject({ id: entry.id, title });
    expect((await get(slow.url, outsider, `/api/observations/${entry.id}`)).status).toBe(404);

    // An entry the copy holds in an older state: the relayed edit is what a reader opens.
    const older = await until(
      'an entry of the dive in the copy',
      () =>
        (slowHolds('select id from observations where dive_id = ? and retired = 0 order by observed_at limit 1', diveId) as unknown as
          string | undefined) ?? undefined,
      1000,
    );
    const current = await lead.call<{ version: number; title: string }>(`/api/observations/${older}`);
    const edited = `${current.title} (edited live)`;
    await lead.call(`/api/observations/${older}`, 'PATCH', { version: current.version, title: edited });
    await stream.next((e) => e.event.startsWith('observation.') && e.data.includes('(edited live)'), 3000);
    const reopened = (await (await get(slow.url, reader, `/api/observations/${older}`)).json()) as { title: string; version: number };
    expect(reopened).toMatchObject({ title: edited, version: current.version + 1 });
    stream.close();
  }, 60_000);
  it('sends the reads of a session whose memberships the copy does not match yet to the ship: a member removed there gets its 404', async () => {
    const db = new Database(path.join(ship.dir, 'bathynote.db'), { readonly: true });
    const { campaignId, userId } = db
      .prepare(
        `select d.campaign_id as campaignId, u.id as userId from dives d, user u where d.id = ? and u.email = 'guest@bathynote.test'`,
      )
      .get(diveId) as { campaignId: string; userId: string };
    db.close();
    expect(slowHolds('select count(*) from memberships where campaign_id = ? and user_id = ?', campaignId, userId)).toBe(1);
    const lead = await apiSignIn(ship.url, 'lead@bathynote.test', shipPublicUrl);
    await lead.call(`/api/campaigns/${campaignId}/members/${userId}`, 'DELETE', undefined, 200);
    // The copy still says member; the ship, asked about this new session, says not.
    const guest = await apiSignIn(slow.url, 'guest@bathynote.test');
    const onShore = await get(slow.url, guest, `/api/dives/${diveId}`);
    const onShip = await get(ship.url, guest, `/api/dives/${diveId}`);
    expect(onShip.status).toBe(404);
    expect(onShore.status).toBe(404);
    expect(await onShore.json()).toEqual(await onShip.json());
    expect((await get(slow.url, guest, `/api/campaigns/${campaignId}`)).status).toBe(404);
  }, 60_000);
  it('fetches a photo file the ship has not sent ashore yet from the ship, for a member only', async () => {
    const reader = await apiSignIn(slow.url, 'biologist@bathynote.test');
    const outsider = await apiSignIn(slow.url, 'outsider@bathynote.test');
    const lead = await apiSignIn(ship.url, 'lead@bathynote.test', shipPublicUrl);
    const entry = await lead.call<{ id: string }>(
      `/api/dives/${diveId}/observations`,
      'POST',
      { kind: 'biology', title: 'Original on demand' },
      201,
    );
    const form = new FormData();
    form.append('photo', new Blob([new Uint8Array(await jpegWithExif({}, { width: 640, height: 480 }))]), 'late.jpg');
    const upload = await fetch(`${ship.url}/api/observations/${entry.id}/photos`, {
      method: 'POST',
      headers: { cookie: lead.cookie, origin: shipPublicUrl },
      body: form,
    });
    expect(upload.status).toBe(201);
    const photoId = ((await upload.json()) as { photos: { id: string }[] }).photos.at(-1)!.id;
    expect(slowHolds('select count(*) from photos where id = ?', photoId)).toBe(0);
    const onShip = Buffer.from(await (await get(ship.url, lead, `/api/photos/${photoId}?size=original`)).arrayBuffer());
    const onShore = await get(slow.url, reader, `/api/photos/${photoId}?size=original`);
    expect(onShore.status).toBe(200);
    expect(Buffer.from(await onShore.arrayBuffer()).equals(onShip)).toBe(true);
    expect((await get(slow.url, outsider, `/api/photos/${photoId}?size=original`)).status).toBe(404);
  }, 60_000);
});
