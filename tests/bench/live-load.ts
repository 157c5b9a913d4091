import { spawn } from 'node:child_process';
import os from 'node:os';
import path from 'node:path';

import autocannon from 'autocannon';
import { hashPassword } from 'better-auth/crypto';
import Database from 'better-sqlite3';

import { startServerProcess } from '../helpers/server-process';
import { memoryOf, signIn } from './process';

const WRITERS = 20;
const READERS = 200;
const STEADY_S = 40;
const BURST_S = 20;

function percentile(values: number[], p: number): number {
  if (values.length === 0) return NaN;
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))]!;
}

/**
 * 20 people log one dive (one entry each per 5 s, then a burst at ten times that) while 200
 * readers ashore follow its live stream. The server runs in its own process, as in production.
 */
export async function benchLiveLoad(): Promise<void> {
  const server = await startServerProcess({ LOG_LEVEL: 'silent', AUTH_RATE_LIMIT: '10000', API_RATE_LIMIT: '10000000' });
  let readers: ReturnType<typeof spawn> | undefined;
  try {
    const db = new Database(path.join(server.dir, 'bathynote.db'));
    const campaignId = (db.prepare("select id from campaigns where name = 'Varn Shoal 2026'").get() as { id: string }).id;
    const diveId = (db.prepare("select id from dives where number = 'VS-04'").get() as { id: string }).id;
    const password = 'bench-writer-password';
    const hash = await hashPassword(password);
    const now = Date.now();
    const insertUser = db.prepare(
      "insert into user (id, name, email, email_verified, created_at, updated_at, role) values (?, ?, ?, 1, ?, ?, 'user')",
    );
    const insertAccount = db.prepare(
      "insert into account (id, account_id, provider_id, user_id, password, created_at, updated_at) values (?, ?, 'credential', ?, ?, ?, ?)",
    );
    const insertMember = db.prepare("insert into memberships (campaign_id, user_id, role, created_at) values (?, ?, 'scientist', ?)");
    const writerEmails: string[] = [];
    for (let i = 0; i < WRITERS; i++) {
      const id = crypto.randomUUID();
      const email = `writer${i}@bathynote.test`;
      insertUser.run(id, `Writer ${i}`, email, now, now);
      insertAccount.run(crypto.randomUUID(), id, id, hash, now, now);
      insertMember.run(campaignId, id, now);
      writerEmails.push(email);
    }
    const firstEvent = (db.prepare('select coalesce(max(id), 0) as id from live_events').get() as { id: number }).id;

    const writerCookies = await Promise.all(writerEmails.map((e) => signIn(server.url, e, password)));
    const readerCookies = await Promise.all(
      ['guest', 'lead', 'pilot', 'archaeologist', 'biologist'].map((who) => signIn(server.url, `${who}@bathynote.test`, 'bathynote-demo')),
    );
    readers = spawn(
      process.execPath,
      ['--import', 'tsx', 'tests/bench/stream-readers.ts', `${server.url}/api/dives/${diveId}/stream`, String(READERS), ...readerCookies],
      {
        stdio: ['pipe', 'pipe', 'inherit'],
      },
    );
    let out = '';
    readers.stdout!.on('data', (d: Buffer) => (out += d.toString()));
    for (let waited = 0; !out.includes('ready\n'); waited += 100) {
      if (waited > 60_000) throw new Error(`stream readers did not start: ${out}`);
      await new Promise((r) => setTimeout(r, 100));
    }
    const serverMs: number[] = [];

    let peakMb = 0;
    const sampler = setInterval(() => {
      peakMb = Math.max(peakMb, memoryOf(server.child.pid!).rssMb);
    }, 250);

    let n = 0;
    const phase = (rate: number, seconds: number) =>
      autocannon({
        url: `${server.url}/api/dives/${diveId}/observations`,
        method: 'POST',
        connections: WRITERS,
        overallRate: rate,
        duration: seconds,
        headers: { 'content-type': 'application/json' },
        setupClient: (client) => {
          const index = n++ % WRITERS;
          client.setHeaders({ 'content-type': 'application/json', cookie: writerCookies[index]! });
        },
        requests: [
          {
            onResponse: (_status, _body, _context, headers) => {
              // Header names arrive as the server spelled them.
              const timing = headers?.['Server-Timing'] ?? headers?.['server-timing'];
              const dur = /dur=([\d.]+)/.exec(typeof timing === 'string' ? timing : '');
              if (dur) serverMs.push(Number(dur[1]));
            },
            setupRequest: (req) => ({
              ...req,
              body: JSON.stringify({
                kind: 'biology',
                title: `Load entry ${Math.random().toString(36).slice(2, 8)}`,
                tags: ['coral'],
                note: 'Polyps *extended*.',
              }),
            }),
          },
        ],
      });
    const steady = await phase(WRITERS / 5, STEADY_S);
    const burst = await phase((WRITERS / 5) * 10, BURST_S);
    await new Promise((r) => setTimeout(r, 2000));
    clearInterval(sampler);
    const before = out.length;
    readers.stdin!.write('stop\n');
    while (!out.slice(before).includes('\n')) await new Promise((r) => setTimeout(r, 50));
    const stream = JSON.parse(out.slice(before).trim()) as { received: number; p50: number; p99: number; max: number };
    const received = stream.received;

    const sent = (
      db
        .prepare("select count(*) as n from live_events where id > ? and dive_id = ? and type = 'observation.created'")
        .get(firstEvent, diveId) as { n: number }
    ).n;
    db.close();
    const memory = memoryOf(server.child.pid!);
    const expected = sent * READERS;
    const line = (name: string, r: autocannon.Result) =>
      `  ${name.padEnd(7)} ${(r.requests.total / r.duration).toFixed(1).padStart(6)} req/s   write p50 ${r.latency.p50} ms   p99 ${r.latency.p99} ms   max ${r.latency.max} ms   non-2xx ${r.non2xx}   errors ${r.errors + r.timeouts}`;
    process.stdout.write(
      [
        `${WRITERS} writers (one entry each per 5 s for ${STEADY_S} s, then 10× for ${BURST_S} s), ${READERS} live readers, server in its own process`,
        line('steady', steady),
        line('burst', burst),
        `  server  time per write p50 ${percentile(serverMs, 50).toFixed(1)} ms   p99 ${percentile(serverMs, 99).toFixed(1)} ms   (from Server-Timing; the lines above include the load generators sharing these ${os.cpus().length} cores)`,
        `  stream  delay p50 ${stream.p50} ms   p99 ${stream.p99} ms   max ${stream.max} ms   (target p99 <= 250 ms; write target p99 <= 50 ms)`,
        `  events  ${sent} entries published, ${received} of ${expected} deliveries received (${expected - received} lost)`,
        `  memory  server rss ${memory.rssMb.toFixed(0)} MB now, peak ${Math.max(peakMb, memory.peakMb).toFixed(0)} MB`,
        '',
      ].join('\n'),
    );
  } finally {
    readers?.kill();
    await server.stop();
  }
}
