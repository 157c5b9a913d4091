/**
 * Digest benchmark: 500 subscribers with varied filters over a campaign of 5,000 entries; every
 * digest composed, queued and handed to a local SMTP server (smtp-server, counting each message's
 * bytes as sent). Prints the time, the peak memory and the largest and median digest beside the
 * targets (≤ 15 s, ≤ 300 MB peak, every digest ≤ 100 KB); asserts nothing.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import path from 'node:path';

import { SMTPServer } from 'smtp-server';

import { closeContext, createContext } from '@/server/bootstrap';
import { loadEnv } from '@/server/env';
import { queueDigests } from '@/server/services/digests';

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

export async function benchDigest(): Promise<void> {
  const sizes: number[] = [];
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
        done();
      });
    },
  });
  await new Promise<void>((resolve) => sink.listen(0, '127.0.0.1', resolve));
  const port = (sink.server.address() as AddressInfo).port;
  const dir = mkdtempSync(path.join(tmpdir(), 'bathynote-bench-digest-'));
  const ctx = await createContext(
    loadEnv({
      NODE_ENV: 'test',
      DATABASE_PATH: path.join(dir, 'bathynote.db'),
      UPLOADS_DIR: path.join(dir, 'uploads'),
      PUBLIC_URL: 'http://127.0.0.1:8080',
      AUTH_SECRET: 'bench-secret-that-is-long-enough-for-better-auth',
      LOG_LEVEL: 'error',
      SMTP_URL: `smtp://127.0.0.1:${port}`,
    }),
  );
  try {
    const db = ctx.db.$client;
    const rnd = random(2026);
    const now = Date.now();
    const campaignId = crypto.randomUUID();
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

    const before = process.memoryUsage().rss;
    let peak = before;
    const sampler = setInterval(() => (peak = Math.max(peak, process.memoryUsage().rss)), 20);
    const t0 = performance.now();
    const { digestIds, nothingNew } = ctx.db.transaction((tx) =>
      queueDigests(tx, { publicUrl: ctx.env.PUBLIC_URL, secret: ctx.env.AUTH_SECRET }, campaignId, { trigger: 'manual' }),
    );
    const composed = performance.now();
    ctx.mail.kick();
    await ctx.mail.settled();
    const sent = performance.now();
    clearInterval(sampler);
    peak = Math.max(peak, process.memoryUsage().rss);

    const sorted = [...sizes].sort((a, b) => a - b);
    const kb = (n: number) => `${(n / 1024).toFixed(1)} KB`;
    const failed = db.prepare("select count(*) from mail_queue where state != 'sent'").pluck().get() as number;
    const lines = [
      `${SUBSCRIBERS} subscribers, ${ENTRIES} entries on ${DIVES} dives, varied filters (kinds, tags, photos, verified)`,
      `digests: ${digestIds.length} composed and queued, ${nothingNew} with nothing new; ${sizes.length} handed to the SMTP server, ${failed} not sent`,
      `time: ${((sent - t0) / 1000).toFixed(2)} s (compose and queue ${((composed - t0) / 1000).toFixed(2)} s, send ${((sent - composed) / 1000).toFixed(2)} s)   target ≤ 15 s`,
      `peak memory (this process, with the SMTP server and the seeded database open): ${(peak / 1024 / 1024).toFixed(0)} MB, ${(before / 1024 / 1024).toFixed(0)} MB before composing   target ≤ 300 MB`,
      `digest size as sent: largest ${kb(sorted[sorted.length - 1] ?? 0)}, median ${kb(sorted[Math.floor(sorted.length / 2)] ?? 0)}; over 100 KB: ${sizes.filter((n) => n > 100 * 1024).length}   target: every digest ≤ 100 KB`,
    ];
    process.stdout.write(`${lines.join('\n')}\n`);
  } finally {
    await closeContext(ctx);
    await new Promise<void>((resolve) => sink.close(() => resolve()));
    rmSync(dir, { recursive: true, force: true });
  }
}
