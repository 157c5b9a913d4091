/**
 * `npm run bench -- shore`: a six-hour dive (300 entries, 100 photos, a 216,000-row telemetry log)
 * followed by fifty guests ashore straight from the ship and, at the same time, by fifty guests
 * through the shore mirror, each group behind a byte-counting proxy standing for the satellite link
 * (tests/bench/link-proxy.ts). Both groups do the same: open the app, sign in, open the dive and its
 * log, keep its live stream open for the whole dive, and every half hour look at the newest entries,
 * the dive profile and the photos that arrived since (thumbnail and display size).
 *
 * The ship replicates by Litestream's SFTP and rsync to a local sshd (the shore machine) through one
 * proxy; the shore mirror reaches the ship's HTTP port through another; the straight readers through
 * a third. The mirror's bytes are the first two: the record's WAL segments, every photo file (all
 * sizes, originals included, which the ship holds back until the dive's photos stop), and what the mirror asks of the ship (its one live stream, forwarded
 * sign-ins, one check of each new session). The first snapshot is seeded in port as the README says
 * and is shown but not counted. The half hours are compressed in time (the volume is what counts:
 * six hours of it fit the link); the live entry and the lag are then timed with the proxies
 * throttled to 96 kbit/s and a 650 ms round trip.
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
import { openSse, type SseClient } from '../helpers/sse';
import { haveSshd, startSshd } from '../helpers/sshd';
import { SATELLITE, startLinkProxy, type LinkProxy } from './link-proxy';

const PASSWORD = 'bathynote-demo';
const READERS = 50;
const ENTRIES = 300;
const PHOTOS = 100;
/** The readers look again every half hour of the six. */
const LOOKS = 12;
/** Seconds with no new photo before the ship sends originals; a gap in the compressed dive longer than this lets some go early. */
const ORIGINALS_AFTER_S = 300;
const LIMITS = { AUTH_RATE_LIMIT: '100000', API_RATE_LIMIT: '10000000', STREAM_MAX_PER_PERSON: '1000', STREAM_MAX_PER_SESSION: '100' };
const MIRROR_KEY = 'bench-mirror-key-0123456789abcdef';
/** Ship and shore sign sessions with the same secret (README), so a session works on both. */
const AUTH_SECRET = 'bench-shore-auth-secret-0123456789abcdef';

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const mb = (n: number) => `${(n / 1e6).toFixed(2)} MB`;
const pct = (xs: number[], p: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor((p / 100) * s.length))] ?? NaN;
};

type Json = Record<string, unknown>;

/** Bytes of the record's WAL segments in the replica, LZ4-compressed as Litestream wrote and sent them. */
const segmentBytes = (shoreDir: string) => {
  const dir = path.join(shoreDir, 'db');
  return filesUnder(dir)
    .filter((f) => f.endsWith('.wal.lz4'))
    .reduce((sum, f) => sum + statSync(path.join(dir, f)).size, 0);
};

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

async function until(what: string, timeoutMs: number, check: () => boolean | Promise<boolean>): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (!(await check())) {
    if (Date.now() > deadline) throw new Error(`${what}: not within ${timeoutMs / 1000} s`);
    await sleep(500);
  }
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

type Observation = { id: string; photos?: { id: string; urls?: { thumb?: string; display?: string } }[] };

/** The six-hour dive's telemetry log, imported by the lead as the dive starts. */
async function importTelemetry(ship: ServerProcess, cookie: string, diveId: string, work: string): Promise<number> {
  const dive = await call<{ phases?: { launch?: string | null } }>(ship.url, cookie, `/api/dives/${diveId}`);
  const start = dive.phases?.launch ? Date.parse(dive.phases.launch) : Date.UTC(2026, 4, 13, 17, 40);
  const file = path.join(work, 'six-hours.csv');
  await writeVehicleLog(file, start, 6, 10);
  const form = new FormData();
  form.set('mode', 'replace');
  form.set('file', await openAsBlob(file, { type: 'text/csv' }), 'six-hours.csv');
  await call(ship.url, cookie, `/api/dives/${diveId}/telemetry`, { method: 'POST', body: form });
  return start;
}

/** One half hour of the dive: its share of the 300 entries, one in three with a photo; logged by the lead. */
async function logHalfHour(
  ship: ServerProcess,
  cookie: string,
  diveId: string,
  start: number,
  from: number,
  photos: Buffer[],
): Promise<void> {
  for (let i = from; i < from + ENTRIES / LOOKS; i++) {
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

/** The web app as a first visit loads it: the page and the scripts and styles it names. */
async function loadApp(base: string): Promise<void> {
  const get = async (p: string) => {
    try {
      const res = await fetch(`${base}${p}`, { headers: { 'accept-encoding': 'br, gzip' } });
      return await res.text();
    } catch (err) {
      throw new Error(`GET ${base}${p}: ${err instanceof Error ? `${err.message} ${String(err.cause)}` : String(err)}`);
    }
  };
  const page = await get('/');
  const assets = [...page.matchAll(/(?:src|href)="(\/[^"]+\.(?:js|css))"/g)].map((m) => m[1]!);
  for (const asset of assets) await get(asset);
}

/**
 * A guest ashore following the dive for its six hours: opens the app once, signs in, opens the
 * dive and its log, and keeps the dive's live stream open (every new entry arrives on it); every
 * half hour they look again: the newest page of the log, the dive's profile, and each photo that
 * arrived since, as its thumbnail in the log and opened at display size. Photo originals are not
 * opened (the app shows display sizes; an original is for download).
 */
class Reader {
  cookie = '';
  private stream: SseClient | null = null;
  private readonly seenPhotos = new Set<string>();
  constructor(
    readonly base: string,
    readonly diveId: string,
  ) {}

  async open(): Promise<void> {
    await loadApp(this.base);
    this.cookie = await signIn(this.base, emails.guest, PASSWORD);
    await call(this.base, this.cookie, `/api/dives/${this.diveId}`);
    this.stream = openSse(`${this.base}/api/dives/${this.diveId}/stream`, { cookie: this.cookie });
    if ((await this.stream.status) !== 200) throw new Error(`the live stream at ${this.base} was refused`);
    await this.look();
  }

  get liveEntries(): number {
    return this.stream?.events.filter((e) => e.event === 'observation.created').length ?? 0;
  }

  async look(): Promise<void> {
    await call(this.base, this.cookie, `/api/dives/${this.diveId}/summary`);
    await call(this.base, this.cookie, `/api/dives/${this.diveId}/telemetry?points=400`);
    const page = await call<{ items: Observation[] }>(this.base, this.cookie, `/api/dives/${this.diveId}/observations?limit=50`);
    for (const photo of page.items.flatMap((e) => e.photos ?? [])) {
      if (this.seenPhotos.has(photo.id)) continue;
      this.seenPhotos.add(photo.id);
      for (const url of [photo.urls?.thumb, photo.urls?.display]) {
        if (!url) continue;
        const res = await fetch(new URL(url, this.base), { headers: { cookie: this.cookie } });
        await res.arrayBuffer();
        if (!res.ok) throw new Error(`photo ${url} at ${this.base}: ${res.status}`);
      }
    }
  }

  close(): void {
    this.stream?.close();
  }
}

/** Every reader of a group does the same, ten at a time. */
async function each(readers: Reader[], what: (r: Reader) => Promise<void>): Promise<void> {
  for (let i = 0; i < readers.length; i += 10) await Promise.all(readers.slice(i, i + 10).map(what));
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
      AUTH_SECRET,
      REPLICATE_TO: `sftp://${encodeURIComponent(userInfo().username)}@127.0.0.1:${replLink.port}${shoreDir}`,
      REPLICATE_SSH_KEY: sshd.shipKey,
      REPLICATE_KNOWN_HOSTS: sshd.knownHosts,
      REPLICATE_PHOTOS_INTERVAL: '5',
      // Originals wait until the photo store is quiet (README): after the dive, not during it.
      REPLICATE_ORIGINALS_AFTER: String(ORIGINALS_AFTER_S),
    });
    started.push(ship);
    shipPort = Number(new URL(ship.url).port);
    originOf.set(ship.url, shipOverLink);
    // The straight arm's readers reach the ship through a link of their own, counted apart.
    const straightLink = await startLinkProxy(shipPort);
    links.push(straightLink);
    const straightBase = `http://127.0.0.1:${straightLink.port}`;
    originOf.set(straightBase, shipOverLink);
    const { diveId } = guestDive(ship);
    // Seeding in port (README): the first snapshot reaches the shore before sailing, off the link.
    await settled(replLink, 8000, () => filesUnder(path.join(shoreDir, 'db')).some((f) => f.endsWith('.snapshot.lz4')));
    const seedBytes = replLink.bytes();

    const shore = await startServerProcess({
      ...LIMITS,
      MIRROR_OF: shipOverLink,
      REPLICA: shoreDir,
      // The test helper sets its own photo folder; the shore's photos are the replica's.
      UPLOADS_DIR: path.join(shoreDir, 'photos'),
      MIRROR_KEY,
      AUTH_SECRET,
      BATHYNOTE_DEMO: '0',
    });
    started.push(shore);
    await until('the shore restored its seeded copy and follows the ship', 120_000, async () => {
      const health = (await (await fetch(`${shore.url}/api/health`)).json()) as { mirror?: { lagSeconds?: number; link?: string } };
      return health.mirror?.link === 'up' && (health.mirror.lagSeconds ?? 99) < 60;
    });

    // From here on everything that crosses either link is the dive's.
    const segmentsSeeded = segmentBytes(shoreDir);
    replLink.reset();
    shipLink.reset();
    straightLink.reset();
    const straight = Array.from({ length: READERS }, () => new Reader(straightBase, diveId));
    const ashore = Array.from({ length: READERS }, () => new Reader(shore.url, diveId));
    const lead = await signIn(ship.url, emails.lead, PASSWORD);
    const buildStart = performance.now();
    const start = await importTelemetry(ship, lead, diveId, work);
    await each(straight, (r) => r.open());
    await each(ashore, (r) => r.open());
    const photos = await Promise.all([0, 1, 2, 3].map((i) => jpegWithExif({}, { width: 1600 + i * 8, height: 1200 })));
    let readMs = 0;
    const originalsByLook: number[] = [];
    for (let look = 0; look < LOOKS; look++) {
      await logHalfHour(ship, lead, diveId, start, look * (ENTRIES / LOOKS), photos);
      // Half an hour is many photo passes and restores: what the ship holds is ashore by the next look.
      const photosSoFar = Math.floor(((look + 1) * (ENTRIES / LOOKS) - 1) / (ENTRIES / PHOTOS)) + 1;
      await until(
        'the half hour ashore',
        300_000,
        () => filesUnder(path.join(shoreDir, 'photos')).filter((f) => f.includes('-display.')).length >= photosSoFar,
      );
      await until('the copy caught up', 120_000, async () => {
        const health = (await (await fetch(`${shore.url}/api/health`)).json()) as { mirror?: { lagSeconds?: number } };
        return (health.mirror?.lagSeconds ?? 99) < 20;
      });
      const began = performance.now();
      await each(straight, (r) => r.look());
      await each(ashore, (r) => r.look());
      readMs += performance.now() - began;
      originalsByLook.push(filesUnder(path.join(shoreDir, 'photos')).filter((f) => f.includes('-original.')).length);
    }
    const buildS = (performance.now() - buildStart) / 1000;
    const during = { repl: replLink.bytes(), http: shipLink.bytes(), straight: straightLink.bytes() };
    const originalsDuring = filesUnder(path.join(shoreDir, 'photos')).filter((f) => f.includes('-original.')).length;
    // The originals go once the photo store is quiet; they cross the link too, and count.
    await settled(replLink, 12_000, () => filesUnder(path.join(shoreDir, 'photos')).length >= PHOTOS * 3, 900_000);
    const live = { straight: straight.map((r) => r.liveEntries), ashore: ashore.map((r) => r.liveEntries) };
    for (const r of [...straight, ...ashore]) r.close();
    await sleep(1000);
    const sizes = { thumb: 0, display: 0, original: 0 };
    for (const f of filesUnder(path.join(shoreDir, 'photos'))) {
      const kind = /-(thumb|display|original)\./.exec(f)?.[1] as keyof typeof sizes | undefined;
      if (kind) sizes[kind] += statSync(path.join(shoreDir, 'photos', f)).size;
    }
    const mirror = { repl: replLink.bytes(), http: shipLink.bytes() };
    const record = segmentBytes(shoreDir) - segmentsSeeded;
    const straightBytes = straightLink.bytes();

    // Timing over the throttled link.
    shipLink.shape(SATELLITE);
    replLink.shape(SATELLITE);
    const straightLive = await liveDelay(shipOverLink, ship, diveId, 5);
    let shoreLive: number[] = [];
    const lags: number[] = [];
    {
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
    const mirrorTotal = mirror.repl + mirror.http;
    out += line('seeding in port (first snapshot, not counted)', mb(seedBytes));
    out += line(`${READERS} readers straight from the ship: bytes on link`, mb(straightBytes));
    out += line(`${READERS} readers through the mirror: bytes on link`, mb(mirrorTotal));
    out += line('  replication (Litestream SFTP + rsync over SSH)', mb(mirror.repl));
    out += line('    photo files as stored: thumbnails', mb(sizes.thumb));
    out += line('    photo files as stored: display sizes', mb(sizes.display));
    out += line('    photo files as stored: originals', mb(sizes.original));
    out += line('    the record: Litestream WAL segments as stored', mb(record));
    out += line('    the rest (SSH, SFTP and rsync framing)', mb(mirror.repl - record - sizes.thumb - sizes.display - sizes.original));
    out += line('  the shore to the ship (stream, sign-ins, checks)', mb(mirror.http));
    out += line('  of it while the guests followed the dive', mb(during.repl + during.http));
    out += line('  of it after the dive', mb(mirrorTotal - during.repl - during.http));
    out += line('  originals ashore when the dive ended', `${originalsDuring} of ${PHOTOS}`);
    out += line('  originals ashore after each look', originalsByLook.join(' '));
    out += line('fewer bytes across the link, all counted', `${(straightBytes / mirrorTotal).toFixed(1)}×`, '≥ 20×');
    out += line('  during the dive only', `${(during.straight / (during.repl + during.http)).toFixed(1)}×`);
    // The dive's photos are four images over and over, and rsync's compression finds each repeat within a pass.
    out += line(
      '  the originals counted at their stored size',
      `${(straightBytes / (during.repl + during.http + sizes.original)).toFixed(1)}×`,
    );
    out += line(
      'live entries each reader received, straight / ashore',
      `${Math.min(...live.straight)} / ${Math.min(...live.ashore)}`,
      `${ENTRIES}`,
    );
    out += line('readers’ looks, all 100 readers, wall time', `${(readMs / 1000).toFixed(1)} s`);
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
