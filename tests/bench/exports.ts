import { readFileSync } from 'node:fs';
import { cpus, loadavg } from 'node:os';
import path from 'node:path';

import Database from 'better-sqlite3';

import { DEMO_PASSWORD } from '@/db/seed';
import { emails } from '../helpers/demo';
import { startServerProcess } from '../helpers/server-process';
import { memoryOf, signIn } from './process';

const ENTRIES = 100_000;

/**
 * Fills the demo campaign of the server's database with 100,000 entries over its four dives: 60 %
 * biology (half identified, some sampled), 20 % archaeology with a find each (a custody trail on
 * every tenth), the rest environment and operations; four in five with a position.
 */
function fill(dbFile: string): { campaignId: string; finds: number } {
  const db = new Database(dbFile);
  db.pragma('busy_timeout = 5000');
  const campaignId = (db.prepare("select id from campaigns where name = 'Varn Shoal 2026'").get() as { id: string }).id;
  const diveIds = (db.prepare('select id from dives where campaign_id = ? order by number').all(campaignId) as { id: string }[]).map(
    (d) => d.id,
  );
  const authorId = (db.prepare('select id from user where email = ?').get(emails.biologist) as { id: string }).id;
  const sampleTag = (
    db.prepare("select id from tags where campaign_id = ? and lower(name) = 'sample'").get(campaignId) as { id: string } | undefined
  )?.id;
  const entry = db.prepare(
    'insert into observations (id, dive_id, campaign_id, observed_at, kind, title, note, depth, depth_source, lat, lon, position_source, temperature, author_id, created_at, updated_at) values (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)',
  );
  const ident = db.prepare(
    "insert into identifications (observation_id, scientific_name, taxon_rank, qualifier, verification_status, identified_by, updated_at) values (?, ?, 'species', ?, 'unverified', ?, ?)",
  );
  const find = db.prepare(
    "insert into finds (observation_id, campaign_id, find_number, object_type, material, condition, state, updated_at) values (?, ?, ?, 'amphora sherd', 'ceramic', 'broken', ?, ?)",
  );
  const custody = db.prepare(
    'insert into custody_events (id, observation_id, holder, since, location, container, recorded_by, created_at) values (?, ?, ?, ?, ?, ?, ?, ?)',
  );
  const tag = sampleTag ? db.prepare('insert into observation_tags (observation_id, tag_id) values (?, ?)') : null;
  const start = Date.UTC(2026, 4, 12, 18, 0);
  let finds = 0;
  db.transaction(() => {
    for (let i = 0; i < ENTRIES; i++) {
      const id = crypto.randomUUID();
      const at = start + i * 3_000;
      const r = i % 10;
      const kind = r < 6 ? 'biology' : r < 8 ? 'archaeology' : r === 8 ? 'environment' : 'operations';
      const placed = i % 5 !== 0;
      entry.run(
        id,
        diveIds[i % diveIds.length],
        campaignId,
        at,
        kind,
        `Bench entry ${i}`,
        i % 3 === 0 ? 'A longer note, with a comma and "quotes",\nover two lines.' : '',
        480 + (i % 140) + 0.25,
        'telemetry',
        placed ? 36.145 + ((i % 997) - 498) * 1e-6 : null,
        placed ? -7.432 + ((i % 991) - 495) * 1e-6 : null,
        placed ? 'telemetry' : null,
        10.8,
        authorId,
        at,
        at,
      );
      if (kind === 'biology' && i % 2 === 0) ident.run(id, 'Desmophyllum pertusum', i % 4 === 0 ? 'cf.' : null, authorId, at);
      if (kind === 'biology' && i % 50 === 0 && tag && sampleTag) tag.run(id, sampleTag);
      if (kind === 'archaeology') {
        finds++;
        const recovered = finds % 10 === 0;
        find.run(id, campaignId, `BX-${finds}`, recovered ? 'recovered' : 'in-situ', at);
        if (recovered) {
          custody.run(crypto.randomUUID(), id, 'Pilot on watch', at, 'Vehicle basket', null, authorId, at);
          custody.run(crypto.randomUUID(), id, 'Conservator', at + 3_600_000, 'Wet lab', `Tank ${finds % 7}`, authorId, at);
        }
      }
    }
  })();
  db.close();
  return { campaignId, finds };
}

/** CPU time (user and system) a process has used, in seconds, from /proc (Linux). */
function cpuSecondsOf(pid: number): number {
  const fields = readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1]!.split(' ');
  // utime and stime are fields 14 and 15 of the line, in clock ticks (100 per second on Linux).
  return (Number(fields[11]) + Number(fields[12])) / 100;
}

/** Peak resident memory of `pid` while `work` runs, sampled from /proc every 10 ms, and the CPU time it took. */
async function withPeakRssOf<T>(pid: number, work: () => Promise<T>): Promise<{ result: T; peak: number; before: number; cpu: number }> {
  const before = memoryOf(pid).rssMb;
  const cpuBefore = cpuSecondsOf(pid);
  let peak = before;
  const timer = setInterval(() => {
    peak = Math.max(peak, memoryOf(pid).rssMb);
  }, 10);
  try {
    const result = await work();
    peak = Math.max(peak, memoryOf(pid).rssMb);
    return { result, peak, before, cpu: cpuSecondsOf(pid) - cpuBefore };
  } finally {
    clearInterval(timer);
  }
}

/** Reads a download to the end without keeping it, as a browser saving to disk would. */
async function drain(url: string, cookie: string): Promise<{ status: number; bytes: number; firstByteMs: number; ms: number }> {
  const began = performance.now();
  const res = await fetch(url, { headers: { cookie } });
  const firstByteMs = performance.now() - began;
  let bytes = 0;
  const reader = res.body?.getReader();
  for (;;) {
    const part = reader ? await reader.read() : { done: true as const, value: undefined };
    if (part.done) break;
    bytes += part.value.length;
  }
  return { status: res.status, bytes, firstByteMs, ms: performance.now() - began };
}

/**
 * Each export of a 100,000-entry campaign downloaded from the server in its own process (as in
 * production): time and the server's peak memory above what it held before the download.
 */
export async function benchExports(): Promise<void> {
  const server = await startServerProcess({ LOG_LEVEL: 'silent', AUTH_RATE_LIMIT: '1000', API_RATE_LIMIT: '1000000' });
  try {
    const { campaignId, finds } = fill(path.join(server.dir, 'bathynote.db'));
    const cookie = await signIn(server.url, emails.lead, DEMO_PASSWORD);
    const pid = server.child.pid!;
    const base = `${server.url}/api/campaigns/${campaignId}/export`;
    // One warm-up request so that the first export does not pay for compiling the code paths.
    await drain(`${base}/summary`, cookie);
    const lines = [
      `exports of a campaign of ${ENTRIES.toLocaleString('en')} entries (${finds.toLocaleString('en')} finds); server in its own process; load average ${loadavg()[0]!.toFixed(1)} on ${cpus().length} cores (wall time stretches with it, CPU time less so)`,
    ];
    for (const name of ['summary', 'darwin-core.zip', 'finds.csv', 'observations.geojson', 'observations.csv']) {
      const { result, peak, before, cpu } = await withPeakRssOf(pid, () => drain(`${base}/${name}`, cookie));
      lines.push(
        `  ${name.padEnd(21)} status ${result.status}   ${(result.ms / 1000).toFixed(2)} s (server CPU ${cpu.toFixed(2)} s, first byte ${result.firstByteMs.toFixed(0)} ms)   ${(result.bytes / 1e6).toFixed(1)} MB   server rss ${before.toFixed(0)} → peak ${peak.toFixed(0)} MB (+${(peak - before).toFixed(0)} MB)`,
      );
    }
    lines.push('  targets: each export <= 10 s and <= 200 MB above the idle server; printed, not asserted', '');
    process.stdout.write(lines.join('\n'));
  } finally {
    await server.stop();
  }
}
