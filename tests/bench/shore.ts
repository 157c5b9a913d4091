/**
 * `npm run bench -- shore`: fifty readers ashore following a finished six-hour dive (300 entries,
 * 100 photos, a 216,000-row telemetry log), once straight from the ship and once through the
 * shore mirror, with a byte-counting proxy standing for the satellite link (tests/bench/link-proxy.ts).
 *
 * The ship replicates by Litestream's SFTP and rsync to a local sshd (the shore machine) through
 * one proxy; the shore mirror reaches the ship's HTTP port through another. The dive is built and
 * the 50 readers read with the proxies unthrottled (the volume is what counts there: a six-hour
 * dive's replication spread over six hours fits the link many times over, and 50 readers through
 * 96 kbit/s would take hours); the live entry and the lag are then timed with both proxies
 * throttled to 96 kbit/s and a 650 ms round trip. The first snapshot (seeding, done in port) is
 * shown but not counted against the link.
 */
import { mkdtempSync, openAsBlob, rmSync, statSync } from 'node:fs';
import { loadavg, tmpdir, userInfo } from 'node:os';
import path from 'node:path';

import Database from 'better-sqlite3';

import { jpegWithExif } from '../fixtures/photos/make';
import { writeVehicleLog } from '../fixtures/telemetry/logs';
import { emails } from '../helpers/demo';
import { filesUnder, startShip } from '../helpers/replica';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';
import { openSse } from '../helpers/sse';
import { haveSshd, startSshd } from '../helpers/sshd';
import { SATELLITE, startLinkProxy, type LinkProxy } from './link-proxy';

const PASSWORD = 'bathynote-demo';
const READERS = 50;
const ENTRIES = 300;
const PHOTOS = 100;
const LIMITS = { AUTH_RATE_LIMIT: '100000', API_RATE_LIMIT: '10000000', STREAM_MAX_PER_PERSON: '1000', STREAM_MAX_PER_SESSION: '100' };
const MIRROR_KEY = 'bench-mirror-key-0123456789abcdef';

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const mb = (n: number) => `${(n / 1e6).toFixed(2)} MB`;
const pct = (xs: number[], p: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor((p / 100) * s.length))] ?? NaN;
};

type Json = Record<string, unknown>;

/** The origin a browser would send to each base: the ship's is its PUBLIC_URL (the address across the link). */
const originOf = new Map<string, string>();
const origin = (base: string) => originOf.get(base) ?? base;

async function signIn(base: string, email: string, password: string): Promise<string> {
  const res = await fetch(`${base}/api/auth/sign-in/email`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: origin(base) },
    body: JSON.stringify({ email, password }),
  });
  if (res.status !== 200) throw new Error(`sign-in ${email} at ${base}: ${res.status}`);
  return res.headers
    .getSetCookie()
    .map((c) => c.split(';')[0])
    .join('; ');
}

async function call<T = Json>(base: string, cookie: string, p: string, init: RequestInit = {}): Promise<T> {
  const res = await fetch(`${base}${p}`, { ...init, headers: { cookie, origin: origin(base), ...(init.headers ?? {}) } });
  const text = await res.text();
  if (!res.ok) throw new Error(`${init.method ?? 'GET'} ${p}: ${res.status} ${text.slice(0, 200)}`);
  return (text ? JSON.parse(text) : {}) as T;
}

/** Waits until the counter has not moved for `quietMs` (and `also` holds). */
async function settled(link: LinkProxy, quietMs: number, also: () => boolean = () => true, timeoutMs = 600_000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  let last = -1;
  let since = Date.now();
  while (Date.now() < deadline) {
    const now = link.bytes();
    if (now !== last) {
      last = now;
      since = Date.now();
    } else if (Date.now() - since >= quietMs && also()) return;
    await sleep(500);
  }
  throw new Error('the replication did not settle');
}

/** The dive the guest ashore follows, and its campaign. */
function guestDive(ship: ServerProcess): { diveId: string } {
  const db = new Database(path.join(ship.dir, 'bathynote.db'), { readonly: true });
  const row = db
    .prepare(
      `select dives.id as diveId from dives join memberships on memberships.campaign_id = dives.campaign_id
       join user on user.id = memberships.user_id where user.email = ? order by dives.number limit 1`,
    )
    .get(emails.guest) as { diveId: string };
  db.close();
  return row;
}

/** The six-hour dive: the telemetry log, 300 entries, 100 of them with a photo; logged by the lead. */
async function buildDive(ship: ServerProcess, diveId: string, work: string): Promise<void> {
  const cookie = await signIn(ship.url, emails.lead, PASSWORD);
  const dive = await call<{ phases?: { launch?: string | null } }>(ship.url, cookie, `/api/dives/${diveId}`);
  const start = dive.phases?.launch ? Date.parse(dive.phases.launch) : Date.UTC(2026, 4, 13, 17, 40);
  const file = path.join(work, 'six-hours.csv');
  await writeVehicleLog(file, start, 6, 10);
  const form = new FormData();
  form.set('mode', 'replace');
  form.set('file', await openAsBlob(file, { type: 'text/csv' }), 'six-hours.csv');
  await call(ship.url, cookie, `/api/dives/${diveId}/telemetry`, { method: 'POST', body: form });
  const photos = await Promise.all([0, 1, 2, 3].map((i) => jpegWithExif({}, { width: 1600 + i * 8, height: 1200 })));
  for (let i = 0; i < ENTRIES; i++) {
    const entry = await call<{ id: string }>(ship.url, cookie, `/api/dives/${diveId}/observations`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({
        kind: 'biology',
        title: `Six-hour dive entry ${i + 1}`,
        note: 'Seen on the frames near the sternpost; '.repeat(1 + (i % 5)),
        observedAt: new Date(start + Math.round(((i + 0.5) * 6 * 3600_000) / ENTRIES)).toISOString(),
      }),
    });
    if (i % (ENTRIES / PHOTOS) === 0) {
      const body = new FormData();
      body.set('photo', new Blob([new Uint8Array(photos[i % photos.length]!)]), `frame-${i}.jpg`);
      await call(ship.url, cookie, `/api/observations/${entry.id}/photos`, { method: 'POST', body });
    }
  }
}

type Observation = { photos?: { urls?: { thumb?: string; display?: string } }[] };

/** The web app as a first visit loads it: the page and the scripts and styles it names. */
async function loadApp(base: string): Promise<void> {
  const page = await (await fetch(`${base}/`, { headers: { 'accept-encoding': 'br, gzip' } })).text();
  const assets = [...page.matchAll(/(?:src|href)="(\/[^"]+\.(?:js|css))"/g)].map((m) => m[1]!);
  for (const asset of assets) await (await fetch(`${base}${asset}`, { headers: { 'accept-encoding': 'br, gzip' } })).arrayBuffer();
}

/** What one reader ashore fetches to follow the dive: the app, the dive, its log, its chart, its photos. */
async function readDive(base: string, diveId: string): Promise<void> {
  await loadApp(base);
  const cookie = await signIn(base, emails.guest, PASSWORD);
  await call(base, cookie, `/api/dives/${diveId}`);
  await call(base, cookie, `/api/dives/${diveId}/summary`);
  await call(base, cookie, `/api/dives/${diveId}/telemetry?points=400`);
  const entries: Observation[] = [];
  let cursor: string | null = null;
  do {
    const page: { items: Observation[]; nextCursor: string | null } = await call(
      base,
      cookie,
      `/api/dives/${diveId}/observations?limit=200${cursor ? `&cursor=${encodeURIComponent(cursor)}` : ''}`,
    );
    entries.push(...page.items);
    cursor = page.nextCursor;
  } while (cursor);
  const photos = entries.flatMap((e) => e.photos ?? []);
  for (const [i, p] of photos.entries()) {
    for (const url of [p.urls?.thumb, i < 10 ? p.urls?.display : undefined]) {
      if (!url) continue;
      const res = await fetch(new URL(url, base), { headers: { cookie } });
      await res.arrayBuffer();
    }
  }
}

async function readers(base: string, diveId: string): Promise<number> {
  const began = performance.now();
  for (let batch = 0; batch < READERS; batch += 10)
    await Promise.all(Array.from({ length: Math.min(10, READERS - batch) }, () => readDive(base, diveId)));
  return performance.now() - began;
}

/** Seconds from the ship storing an entry to a reader's stream (at `base`) delivering it. */
async function liveDelay(readerBase: string, ship: ServerProcess, diveId: string, rounds: number): Promise<number[]> {
  const readerCookie = await signIn(readerBase, emails.guest, PASSWORD);
  const writer = await signIn(ship.url, emails.lead, PASSWORD);
  const stream = openSse(`${readerBase}/api/dives/${diveId}/stream`, { cookie: readerCookie });
  await stream.status;
  await sleep(2000);
  const delays: number[] = [];
  for (let i = 0; i < rounds; i++) {
    const title = `Live entry ${Date.now()}-${i}`;
    const seen = stream.next((e) => e.data.includes(title), 60_000);
    await call(ship.url, writer, `/api/dives/${diveId}/observations`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ kind: 'biology', title }),
    });
    const stored = performance.now();
    await seen;
    delays.push((performance.now() - stored) / 1000);
    await sleep(1500);
  }
  stream.close();
  return delays;
}

export async function benchShore(): Promise<void> {
  if (!haveSshd) {
    process.stdout.write('skipped: /usr/sbin/sshd is missing (.ci/run installs openssh-server)\n');
    return;
  }
  const work = mkdtempSync(path.join(tmpdir(), 'bathynote-bench-shore-'));
  const shoreDir = path.join(work, 'shore');
  const sshd = await startSshd(path.join(work, 'keys'));
  const replLink = await startLinkProxy(sshd.port);
  const started: ServerProcess[] = [];
  const links: LinkProxy[] = [replLink];
  try {
    // The ship's HTTP port as seen from ashore; the ship's public address is this side of the link.
    let shipPort = 0;
    const shipLink = await startLinkProxy(() => shipPort);
    links.push(shipLink);
    const shipOverLink = `http://127.0.0.1:${shipLink.port}`;
    const ship = await startShip({
      ...LIMITS,
      PUBLIC_URL: shipOverLink,
      MIRROR_KEY,
      REPLICATE_TO: `sftp://${encodeURIComponent(userInfo().username)}@127.0.0.1:${replLink.port}${shoreDir}`,
      REPLICATE_SSH_KEY: sshd.shipKey,
      REPLICATE_KNOWN_HOSTS: sshd.knownHosts,
      REPLICATE_PHOTOS_INTERVAL: '5',
    });
    started.push(ship);
    shipPort = Number(new URL(ship.url).port);
    originOf.set(ship.url, shipOverLink);
    const { diveId } = guestDive(ship);
    await settled(replLink, 8000, () => filesUnder(path.join(shoreDir, 'db')).some((f) => f.endsWith('.snapshot.lz4')));
    const seedBytes = replLink.bytes();
    replLink.reset();

    const buildStart = performance.now();
    await buildDive(ship, diveId, work);
    const buildS = (performance.now() - buildStart) / 1000;
    await settled(replLink, 12_000, () => filesUnder(path.join(shoreDir, 'photos')).length >= PHOTOS * 3);
    const diveBytes = replLink.bytes();
    const photoBytes = filesUnder(path.join(shoreDir, 'photos')).reduce((n, f) => n + statSync(path.join(shoreDir, 'photos', f)).size, 0);

    // Straight from the ship: every reader's requests cross the link.
    shipLink.reset();
    const straightMs = await readers(shipOverLink, diveId);
    const straightBytes = shipLink.bytes();

    // Through the mirror: the readers read ashore; the link carries the replication (above) and
    // whatever the mirror itself asks of the ship (sign-ins, its one live stream).
    let mirror: { bytes: number; ms: number; replBytes: number } | string;
    let shore: ServerProcess | undefined;
    try {
      shore = await startServerProcess({
        ...LIMITS,
        MIRROR_OF: shipOverLink,
        REPLICA: shoreDir,
        // The test helper sets its own photo folder; the shore's photos are the replica's.
        UPLOADS_DIR: path.join(shoreDir, 'photos'),
        MIRROR_KEY,
        BATHYNOTE_DEMO: '0',
      });
      started.push(shore);
      const deadline = Date.now() + 120_000;
      for (;;) {
        const health = (await (await fetch(`${shore.url}/api/health`)).json()) as { mirror?: { lagSeconds?: number } };
        if (typeof health.mirror?.lagSeconds === 'number' && health.mirror.lagSeconds < 60) break;
        if (Date.now() > deadline) throw new Error(`the mirror did not restore: ${JSON.stringify(health)}`);
        await sleep(1000);
      }
      shipLink.reset();
      replLink.reset();
      const ms = await readers(shore.url, diveId);
      mirror = { bytes: shipLink.bytes() + replLink.bytes(), replBytes: replLink.bytes(), ms };
    } catch (err) {
      mirror = `not measured: ${err instanceof Error ? err.message.split('\n')[0] : String(err)}`;
    }

    // Timing over the throttled link.
    shipLink.shape(SATELLITE);
    replLink.shape(SATELLITE);
    const straightLive = await liveDelay(shipOverLink, ship, diveId, 5);
    let shoreLive: number[] = [];
    const lags: number[] = [];
    if (shore && typeof mirror !== 'string') {
      shoreLive = await liveDelay(shore.url, ship, diveId, 5);
      // Entries keep coming on the ship every 4 s for two minutes; the shore's lag is sampled each second.
      const writer = await signIn(ship.url, emails.lead, PASSWORD);
      const until = Date.now() + 120_000;
      let next = 0;
      while (Date.now() < until) {
        if (Date.now() >= next) {
          next = Date.now() + 4000;
          await call(ship.url, writer, `/api/dives/${diveId}/observations`, {
            method: 'POST',
            headers: { 'content-type': 'application/json' },
            body: JSON.stringify({ kind: 'biology', title: `Lag entry ${Date.now()}` }),
          });
        }
        const health = (await (await fetch(`${shore.url}/api/health`)).json()) as { mirror?: { lagSeconds?: number } };
        if (typeof health.mirror?.lagSeconds === 'number') lags.push(health.mirror.lagSeconds);
        await sleep(1000);
      }
    }

    const line = (figure: string, value: string, target = '') => `${figure.padEnd(52)}${value.padStart(22)}${target.padStart(22)}\n`;
    let out = `load average ${loadavg()
      .map((l) => l.toFixed(2))
      .join(' ')}; dive built in ${buildS.toFixed(0)} s\n`;
    out += line('figure', 'measured', 'target');
    out += line('seeding in port (first snapshot, not counted)', mb(seedBytes));
    out += line('the dive replicated once (record + photos)', mb(diveBytes));
    out += line('  of which photo files (all sizes, as stored)', mb(photoBytes));
    out += line(`${READERS} readers straight from the ship: bytes on link`, mb(straightBytes));
    if (typeof mirror === 'string') out += line(`${READERS} readers through the mirror`, mirror);
    else {
      const total = diveBytes + mirror.bytes;
      out += line(`${READERS} readers through the mirror: bytes on link`, `${mb(total)}`);
      out += line('  of which during the readers (forwarded, live)', mb(mirror.bytes));
      out += line('fewer bytes across the link', `${(straightBytes / total).toFixed(1)}×`, '≥ 20×');
      out += line(
        'readers’ wall time straight / through mirror',
        `${(straightMs / 1000).toFixed(1)} s / ${(mirror.ms / 1000).toFixed(1)} s`,
      );
    }
    out += line(
      'live entry to a reader, straight (p50, max)',
      `${pct(straightLive, 50).toFixed(2)} s, ${Math.max(...straightLive).toFixed(2)} s`,
    );
    if (shoreLive.length)
      out += line(
        'live entry to a shore reader (p50, max)',
        `${pct(shoreLive, 50).toFixed(2)} s, ${Math.max(...shoreLive).toFixed(2)} s`,
        '≤ 3 s',
      );
    if (lags.length) out += line('mirror lag p50 / p95', `${pct(lags, 50).toFixed(0)} s / ${pct(lags, 95).toFixed(0)} s`, 'p95 ≤ 120 s');
    process.stdout.write(out);
  } finally {
    // Litestream's last sync on the way out need not crawl through the throttled link.
    for (const l of links) l.shape(null);
    for (const s of started.reverse()) {
      await s.stop().catch(() => undefined);
      rmSync(s.dir, { recursive: true, force: true });
    }
    for (const l of links) await l.close();
    sshd.stop();
    rmSync(work, { recursive: true, force: true });
  }
}
