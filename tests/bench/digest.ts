/**
 * Digest benchmark: 500 subscribers with varied filters over a campaign of 5,000 entries. The
 * database is written by this process; the server runs on it as `npm start` runs it (its bundle, in
 * a process of its own), and the lead's "send now" composes, queues and hands every digest to a
 * local SMTP server here (smtp-server, counting each message's bytes as received). Prints the time
 * from the request to the last mail received, the server's resident memory before and its peak while
 * composing and sending (read from /proc: the server's own process, not this generator), and the
 * largest and median digest, beside the targets (≤ 15 s, ≤ 300 MB peak, every digest ≤ 100 KB);
 * asserts nothing.
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import type { AddressInfo } from 'node:net';
import os, { tmpdir } from 'node:os';
import path from 'node:path';

import { hashPassword } from 'better-auth/crypto';
import { SMTPServer } from 'smtp-server';

import { migrateDatabase, openDatabase } from '@/db/client';
import { startServerProcess } from '../helpers/server-process';
import { memoryOf, signIn } from './process';

const ENTRIES = 5000;
const SUBSCRIBERS = Number(process.env.BENCH_DIGEST_SUBSCRIBERS ?? 500);
const DIVES = 8;
const TAGS = [
  'coral',
  'microbial-mat',
  'sponge',
  'amphora',
  'hull',
  'concretion',
  'fish',
  'sediment',
  'timber',
  'ceramic',
  'sample',
  'rope',
];
const KINDS = ['biology', 'archaeology', 'environment', 'operations'] as const;

/** A repeatable pseudo-random sequence (mulberry32), so every run composes the same digests. */
function random(seed: number) {
  return () => {
    seed = (seed + 0x6d2b79f5) | 0;
    let t = Math.imul(seed ^ (seed >>> 15), 1 | seed);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const LEAD_EMAIL = 'lead@bench.test';
const LEAD_PASSWORD = 'bench-lead-password';

/** Writes the campaign, its entries and its subscribers into a fresh database; gives the campaign's id. */
async function seed(file: string): Promise<string> {
  const drizzleDb = openDatabase(file);
  migrateDatabase(drizzleDb);
  const db = drizzleDb.$client;
  const passwordHash = await hashPassword(LEAD_PASSWORD);
  const rnd = random(2026);
  const now = Date.now();
  const campaignId = crypto.randomUUID();
  const lead = crypto.randomUUID();
  const diveIds: string[] = [];
  const tagIds = new Map<string, string>();
  db.transaction(() => {
    db.prepare(
      "insert into campaigns (id, name, site_name, datum_lat, datum_lon, time_zone, created_at, updated_at) values (?, 'Bench campaign', 'Bench slope', 36.1, -7.4, 'Europe/Lisbon', ?, ?)",
    ).run(campaignId, now, now);
    const author = crypto.randomUUID();
    const addUser = db.prepare(
      "insert into user (id, name, email, email_verified, created_at, updated_at, role) values (?, ?, ?, 1, ?, ?, 'user')",
    );
    const addMember = db.prepare('insert into memberships (campaign_id, user_id, role, created_at) values (?, ?, ?, ?)');
    addUser.run(author, 'Bench Author', 'author@bench.test', now, now);
    addMember.run(campaignId, author, 'scientist', now);
    addUser.run(lead, 'Bench Lead', LEAD_EMAIL, now, now);
    db.prepare(
      "insert into account (id, account_id, provider_id, user_id, password, created_at, updated_at) values (?, ?, 'credential', ?, ?, ?, ?)",
    ).run(crypto.randomUUID(), lead, lead, passwordHash, now, now);
    addMember.run(campaignId, lead, 'lead', now);
    for (let d = 0; d < DIVES; d++) {
      const id = crypto.randomUUID();
      diveIds.push(id);
      db.prepare(
        'insert into dives (id, campaign_id, number, launch_at, on_deck_at, created_at, updated_at) values (?, ?, ?, ?, ?, ?, ?)',
      ).run(
        id,
        campaignId,
        `BN-${String(d + 1).padStart(2, '0')}`,
        now - (DIVES - d) * 86_400_000,
        now - (DIVES - d) * 86_400_000 + 6 * 3600_000,
        now,
        now,
      );
    }
    for (const name of TAGS) {
      const id = crypto.randomUUID();
      tagIds.set(name, id);
      db.prepare('insert into tags (id, campaign_id, name, created_at) values (?, ?, ?, ?)').run(id, campaignId, name, now);
    }
    const addEntry = db.prepare(
      'insert into observations (id, dive_id, campaign_id, observed_at, kind, title, note, depth, author_id, created_at, updated_at) values (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)',
    );
    const addTag = db.prepare('insert or ignore into observation_tags (observation_id, tag_id) values (?, ?)');
    const addPhoto = db.prepare(
      "insert into photos (id, observation_id, campaign_id, sha256, mime, width, height, bytes, original_key, display_key, thumb_key, uploaded_by, created_at) values (?, ?, ?, 'x', 'image/jpeg', 1920, 1080, 1, 'o', 'd', 't', ?, ?)",
    );
    const addIdentification = db.prepare(
      'insert into identifications (observation_id, scientific_name, verification_status, identified_by, updated_at) values (?, ?, ?, ?, ?)',
    );
    for (let i = 0; i < ENTRIES; i++) {
      const id = crypto.randomUUID();
      const kind = KINDS[Math.floor(rnd() * KINDS.length)]!;
      const dive = diveIds[i % DIVES]!;
      addEntry.run(
        id,
        dive,
        campaignId,
        now - (ENTRIES - i) * 5000,
        kind,
        `Entry ${i}: ${kind} by the stern, seen at the ${['port', 'starboard'][i % 2]} side`,
        `Observed **near** the hull. ${'A note of some length about what was seen. '.repeat(1 + Math.floor(rnd() * 8))}`,
        400 + rnd() * 250,
        author,
        now - 1000,
        now - 1000,
      );
      for (let k = 0; k < 1 + Math.floor(rnd() * 3); k++) addTag.run(id, tagIds.get(TAGS[Math.floor(rnd() * TAGS.length)]!));
      if (rnd() < 0.3) addPhoto.run(crypto.randomUUID(), id, campaignId, author, now);
      if (kind === 'biology' && rnd() < 0.5)
        addIdentification.run(id, 'Desmophyllum pertusum', rnd() < 0.5 ? 'verified' : 'unverified', author, now);
    }
    const addSubscription = db.prepare(
      "insert into subscriptions (campaign_id, user_id, frequency, filters, unsubscribe_nonce, updated_at) values (?, ?, 'after-each-dive', ?, ?, ?)",
    );
    for (let s = 0; s < SUBSCRIBERS; s++) {
      const id = crypto.randomUUID();
      addUser.run(id, `Subscriber ${s}`, `subscriber-${s}@bench.test`, now, now);
      addMember.run(campaignId, id, 'guest', now);
      const filters: Record<string, unknown> = {};
      if (s % 2 === 0) filters.kinds = [KINDS[s % 4]];
      if (s % 3 === 0) filters.tags = [TAGS[s % TAGS.length], TAGS[(s + 5) % TAGS.length]];
      if (s % 7 === 0) filters.withPhotos = true;
      if (s % 11 === 0) filters.verifiedOnly = true;
      addSubscription.run(campaignId, id, JSON.stringify(filters), crypto.randomUUID(), now);
    }
  })();
  db.close();
  return campaignId;
}

/** CPU seconds a process has used so far (user and system), from /proc/<pid>/stat: a figure the machine's other load barely moves. */
function cpuSecondsOf(pid: number): number {
  const fields = readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1]!.split(' ');
  // utime and stime are fields 14 and 15 of stat(5), in clock ticks (100 a second on Linux).
  return (Number(fields[11]) + Number(fields[12])) / 100;
}

export async function benchDigest(): Promise<void> {
  const sizes: number[] = [];
  let received: () => void = () => undefined;
  const sink = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    logger: false,
    size: 10 * 1024 * 1024,
    onData(stream, _session, done) {
      let bytes = 0;
      stream.on('data', (chunk: Buffer) => (bytes += chunk.length));
      stream.on('end', () => {
        sizes.push(bytes);
        received();
        done();
      });
    },
  });
  await new Promise<void>((resolve) => sink.listen(0, '127.0.0.1', resolve));
  const port = (sink.server.address() as AddressInfo).port;
  const dir = mkdtempSync(path.join(tmpdir(), 'bathynote-bench-digest-'));
  const campaignId = await seed(path.join(dir, 'bathynote.db'));
  const server = await startServerProcess({ BATHYNOTE_DEMO: '0', LOG_LEVEL: 'error', SMTP_URL: `smtp://127.0.0.1:${port}` }, { dir });
  try {
    const pid = server.child.pid!;
    const cookie = await signIn(server.url, LEAD_EMAIL, LEAD_PASSWORD);
    await new Promise((r) => setTimeout(r, 2000));
    const before = memoryOf(pid);
    // From here the kernel's high-water mark counts only composing and sending (clear_refs, Linux ≥ 4.0).
    writeFileSync(`/proc/${pid}/clear_refs`, '5');
    const load = os.loadavg()[0]!;
    const cpu0 = cpuSecondsOf(pid);
    const t0 = performance.now();
    const res = await fetch(`${server.url}/api/campaigns/${campaignId}/digests`, {
      method: 'POST',
      headers: { cookie, origin: server.url, 'content-type': 'application/json' },
      body: '{}',
    });
    if (res.status !== 201) throw new Error(`send now: ${res.status} ${await res.text()}`);
    const answer = (await res.json()) as { queued: unknown[]; nothingNew: number };
    const composed = performance.now();
    const composedMem = memoryOf(pid);
    const cpuComposed = cpuSecondsOf(pid);
    const queued = answer.queued.length;
    await new Promise<void>((resolve, reject) => {
      const give = setTimeout(() => reject(new Error(`${sizes.length} of ${queued} digests arrived in 120 s`)), 120_000);
      received = () => {
        if (sizes.length < queued) return;
        clearTimeout(give);
        resolve();
      };
      received();
    });
    const sent = performance.now();
    const after = memoryOf(pid);
    const cpuSent = cpuSecondsOf(pid);

    const sorted = [...sizes].sort((a, b) => a - b);
    const kb = (n: number) => `${(n / 1024).toFixed(1)} KB`;
    const mb = (n: number) => `${n.toFixed(0)} MB`;
    const lines = [
      `${SUBSCRIBERS} subscribers, ${ENTRIES} entries on ${DIVES} dives, varied filters (kinds, tags, photos, verified); load ${load.toFixed(2)} on ${os.cpus().length} cores`,
      `digests: ${queued} composed and queued, ${answer.nothingNew} with nothing new; ${sizes.length} received by the SMTP server`,
      `time: ${((sent - t0) / 1000).toFixed(2)} s from "send now" to the last mail received (compose and queue ${((composed - t0) / 1000).toFixed(2)} s, send ${((sent - composed) / 1000).toFixed(2)} s)   target ≤ 15 s`,
      `server CPU time: ${(cpuSent - cpu0).toFixed(1)} s (compose and queue ${(cpuComposed - cpu0).toFixed(1)} s, send ${(cpuSent - cpuComposed).toFixed(1)} s): the time on an idle core`,
      `server peak memory while composing and sending: ${mb(after.peakMb)} (the server process as npm start runs it; ${mb(before.rssMb)} before, ${mb(composedMem.peakMb)} peak when composed, its peak since start ${mb(before.peakMb)}, ${mb(after.rssMb)} after)   target ≤ 300 MB`,
      `digest size as sent: largest ${kb(sorted[sorted.length - 1] ?? 0)}, median ${kb(sorted[Math.floor(sorted.length / 2)] ?? 0)}; over 100 KB: ${sizes.filter((n) => n > 100 * 1024).length}   target: every digest ≤ 100 KB`,
    ];
    process.stdout.write(`${lines.join('\n')}\n`);
  } finally {
    await server.stop();
    await new Promise<void>((resolve) => sink.close(() => resolve()));
    rmSync(dir, { recursive: true, force: true });
  }
}
