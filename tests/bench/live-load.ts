import { execFileSync, spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';

import { hashPassword } from 'better-auth/crypto';
import Database from 'better-sqlite3';

import { freePort, startServerProcess } from '../helpers/server-process';
import { memoryOf, signIn } from './process';
import { percentile, Writers, type WriteRound } from './writers';

const WRITERS = 20;
const READERS = 200;
const STEADY_S = 40;
const BURST_S = 20;
const HERD_ROUNDS = 10;

/**
 * Loaded into the server under test and the baseline (`node --import`): the delay of their event
 * loop, that is how long a request that has arrived waits before the server can start on it,
 * which Server-Timing cannot see. On SIGUSR2 it writes the figures since the last signal to the
 * file named by BENCH_LOOP_DELAY_FILE and starts counting afresh. Plain JavaScript, written to a
 * temporary file, so the server runs as it does in production (no TypeScript loader).
 */
const LOOP_DELAY_MODULE = `
import { writeFileSync } from 'node:fs';
import { monitorEventLoopDelay, PerformanceObserver } from 'node:perf_hooks';
const file = process.env.BENCH_LOOP_DELAY_FILE;
if (file) {
  const histogram = monitorEventLoopDelay({ resolution: 5 });
  histogram.enable();
  let gc = { pauses: 0, longest: 0, total: 0 };
  new PerformanceObserver((list) => {
    for (const e of list.getEntries()) {
      gc.pauses++;
      gc.longest = Math.max(gc.longest, e.duration);
      gc.total += e.duration;
    }
  }).observe({ entryTypes: ['gc'] });
  const ms = (ns) => Math.round(ns / 1e5) / 10;
  process.on('SIGUSR2', () => {
    writeFileSync(file, JSON.stringify({ p50: ms(histogram.percentile(50)), p99: ms(histogram.percentile(99)), max: ms(histogram.max), gc }));
    histogram.reset();
    gc = { pauses: 0, longest: 0, total: 0 };
  });
}
`;

type LoopDelay = { p50: number; p99: number; max: number; gc: { pauses: number; longest: number; total: number }; cpuMs: number };

/** CPU time (user and system) process `pid` has used, in ms, from /proc (Linux; 100 ticks a second). */
function cpuMsOf(pid: number): number {
  try {
    const fields = readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1]!.split(' ');
    return (Number(fields[11]) + Number(fields[12])) * 10;
  } catch {
    return NaN;
  }
}

/** Event-loop delay of a process that loaded LOOP_DELAY_MODULE: `take` returns the figures since the last take. */
function loopDelayOf(dir: string, name: string) {
  const module = path.join(dir, 'loop-delay.mjs');
  writeFileSync(module, LOOP_DELAY_MODULE);
  const file = path.join(dir, `${name}-loop-delay.json`);
  let cpuAtLastTake = 0;
  return {
    env: { NODE_OPTIONS: `${process.env.NODE_OPTIONS ?? ''} --import ${module}`.trim(), BENCH_LOOP_DELAY_FILE: file },
    async take(pid: number): Promise<LoopDelay> {
      const cpu = cpuMsOf(pid);
      const cpuMs = cpu - cpuAtLastTake;
      cpuAtLastTake = cpu;
      rmSync(file, { force: true });
      process.kill(pid, 'SIGUSR2');
      for (let waited = 0; !existsSync(file); waited += 20) {
        if (waited > 5000) return { p50: NaN, p99: NaN, max: NaN, gc: { pauses: NaN, longest: NaN, total: NaN }, cpuMs };
        await new Promise((r) => setTimeout(r, 20));
      }
      await new Promise((r) => setTimeout(r, 20));
      return { ...(JSON.parse(readFileSync(file, 'utf8')) as Omit<LoopDelay, 'cpuMs'>), cpuMs };
    },
  };
}

/** Where taskset exists and there are two or more cores: the server on CPU 0, everything else on the rest. */
function pinning(): { server: string; rest: string } | undefined {
  const cores = os.cpus().length;
  if (cores < 2) return undefined;
  try {
    const rest = cores === 2 ? '1' : `1-${cores - 1}`;
    execFileSync('taskset', ['-apc', rest, String(process.pid)], { stdio: 'ignore' });
    return { server: '0', rest };
  } catch {
    return undefined;
  }
}

/** The bare endpoint on the same stack (tests/bench/baseline-server.ts), in its own process. */
async function startBaseline(
  cpus: string | undefined,
  env: Record<string, string>,
): Promise<{ url: string; child: ChildProcess; stop: () => void }> {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'bathynote-baseline-'));
  const port = await freePort();
  const args = ['--import', 'tsx', 'tests/bench/baseline-server.ts', String(port), path.join(dir, 'baseline.db')];
  const options = { env: { ...process.env, ...env } };
  const child = cpus ? spawn('taskset', ['-c', cpus, process.execPath, ...args], options) : spawn(process.execPath, args, options);
  let out = '';
  child.stdout.on('data', (d: Buffer) => (out += d.toString()));
  for (let waited = 0; !out.includes('listening'); waited += 100) {
    if (waited > 30_000 || child.exitCode !== null) throw new Error(`baseline server did not start: ${out}`);
    await new Promise((r) => setTimeout(r, 100));
  }
  return {
    url: `http://127.0.0.1:${port}`,
    child,
    stop: () => {
      child.kill();
      rmSync(dir, { recursive: true, force: true });
    },
  };
}

/**
 * 20 people log one dive (one entry each per 5 s, then a burst at ten times that) while 200
 * readers ashore follow its live stream. The server runs in its own process, as in production.
 * The same schedule then runs against a bare endpoint on the same stack, in the same run, and
 * every figure is printed with its ratio to that baseline.
 */
export async function benchLiveLoad(): Promise<void> {
  const pinned = pinning();
  const delayDir = mkdtempSync(path.join(os.tmpdir(), 'bathynote-loop-delay-'));
  const serverDelay = loopDelayOf(delayDir, 'server');
  const baselineDelay = loopDelayOf(delayDir, 'baseline');
  // Its readers share a few sessions, far past the per-session and per-person stream caps.
  const server = await startServerProcess(
    {
      ...serverDelay.env,
      LOG_LEVEL: 'silent',
      AUTH_RATE_LIMIT: '10000',
      API_RATE_LIMIT: '10000000',
      STREAM_MAX_PER_SESSION: '10000',
      STREAM_MAX_PER_PERSON: '10000',
    },
    pinned ? { cpus: pinned.server } : {},
  );
  let readers: ReturnType<typeof spawn> | undefined;
  let baseline: Awaited<ReturnType<typeof startBaseline>> | undefined;
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

    let peakMb = 0;
    const sampler = setInterval(() => {
      peakMb = Math.max(peakMb, memoryOf(server.child.pid!).rssMb);
    }, 250);

    const writers = new Writers(`${server.url}/api/dives/${diveId}/observations`, writerCookies, () =>
      JSON.stringify({
        kind: 'biology',
        title: `Load entry ${Math.random().toString(36).slice(2, 8)}`,
        tags: ['coral'],
        note: 'Polyps *extended*.',
      }),
    );
    type StreamFigures = { received: number; p50: number; p99: number; max: number };
    /** What the readers received since they last said, once the stream has had two seconds to settle. */
    const readersSay = async (command: 'report' | 'stop'): Promise<StreamFigures> => {
      await new Promise((r) => setTimeout(r, 2000));
      const before = out.length;
      readers!.stdin!.write(`${command}\n`);
      while (!out.slice(before).includes('\n')) await new Promise((r) => setTimeout(r, 50));
      return JSON.parse(out.slice(before).trim()) as StreamFigures;
    };
    const pid = server.child.pid!;
    await serverDelay.take(pid);
    const steady = await writers.schedule(5000, STEADY_S);
    const steadyDelay = await serverDelay.take(pid);
    const burst = await writers.schedule(500, BURST_S);
    const burstDelay = await serverDelay.take(pid);
    const stream = await readersSay('report');
    await serverDelay.take(pid);
    const herd = await writers.herd(HERD_ROUNDS);
    const herdDelay = await serverDelay.take(pid);
    const herdStream = await readersSay('stop');
    writers.close();
    clearInterval(sampler);
    const received = stream.received + herdStream.received;

    // The same schedule against the bare endpoint, with the readers gone.
    baseline = await startBaseline(pinned?.server, baselineDelay.env);
    const basePid = baseline.child.pid!;
    const bare = new Writers(`${baseline.url}/entries`, writerCookies, () =>
      JSON.stringify({
        kind: 'biology',
        title: `Load entry ${Math.random().toString(36).slice(2, 8)}`,
        tags: ['coral'],
        note: 'Polyps *extended*.',
      }),
    );
    await baselineDelay.take(basePid);
    const bareSteady = await bare.schedule(5000, STEADY_S);
    const bareSteadyDelay = await baselineDelay.take(basePid);
    const bareBurst = await bare.schedule(500, BURST_S);
    const bareBurstDelay = await baselineDelay.take(basePid);
    const bareHerd = await bare.herd(HERD_ROUNDS);
    const bareHerdDelay = await baselineDelay.take(basePid);
    bare.close();

    const sent = (
      db
        .prepare("select count(*) as n from live_events where id > ? and dive_id = ? and type = 'observation.created'")
        .get(firstEvent, diveId) as { n: number }
    ).n;
    db.close();
    const memory = memoryOf(server.child.pid!);
    const expected = sent * READERS;
    const ms = (v: number) => `${v.toFixed(0)} ms`;
    /** Which answer `percentile(…, 99)` picks, counted from the slowest: with a few hundred, one hiccup moves it. */
    const rankFromSlowest = (n: number) => {
      const k = n - Math.floor(0.99 * n);
      const suffix =
        k % 10 === 1 && k % 100 !== 11 ? 'st' : k % 10 === 2 && k % 100 !== 12 ? 'nd' : k % 10 === 3 && k % 100 !== 13 ? 'rd' : 'th';
      return k === 1 ? 'the slowest' : `the ${k}${suffix} slowest`;
    };
    const ratio = (v: number, base: number) => (base > 0 ? `${(v / base).toFixed(1)}x` : '-');
    const line = (name: string, r: WriteRound, base: WriteRound, delay: LoopDelay, baseDelay: LoopDelay) =>
      [
        `  ${name.padEnd(7)} ${(r.sent / r.seconds).toFixed(1).padStart(6)} req/s   write p50 ${ms(percentile(r.latencies, 50))}   p99 ${ms(percentile(r.latencies, 99))}   max ${ms(Math.max(...r.latencies))}   server p50 ${ms(percentile(r.serverMs, 50))} p99 ${ms(percentile(r.serverMs, 99))}   non-2xx ${r.non2xx}   errors ${r.errors}   (${r.latencies.length} entries: p99 is ${rankFromSlowest(r.latencies.length)})`,
        `          baseline write p50 ${ms(percentile(base.latencies, 50))}   p99 ${ms(percentile(base.latencies, 99))}   server p99 ${ms(percentile(base.serverMs, 99))}   ratio write p99 ${ratio(percentile(r.latencies, 99), percentile(base.latencies, 99))}   server p99 ${ratio(percentile(r.serverMs, 99), percentile(base.serverMs, 99))}`,
        `          event-loop delay p50 ${delay.p50} ms   p99 ${delay.p99} ms   max ${delay.max} ms   (baseline p99 ${baseDelay.p99} ms)   load generator late p99 ${ms(percentile(r.lateMs, 99))} (baseline run ${ms(percentile(base.lateMs, 99))})`,
        `          garbage collection: ${delay.gc.pauses} pauses, longest ${delay.gc.longest.toFixed(1)} ms, ${delay.gc.total.toFixed(0)} ms in all   (baseline ${baseDelay.gc.pauses}, longest ${baseDelay.gc.longest.toFixed(1)} ms)`,
        `          CPU per entry: server ${(delay.cpuMs / r.sent).toFixed(1)} ms, baseline ${(baseDelay.cpuMs / base.sent).toFixed(1)} ms   ratio ${ratio(delay.cpuMs / r.sent, baseDelay.cpuMs / base.sent)}   (the server's includes telling ${READERS} readers; CPU time is what a busy machine does not stretch)`,
        `          write from send p50 ${ms(percentile(r.fromSend, 50))}   p99 ${ms(percentile(r.fromSend, 99))}   baseline p99 ${ms(percentile(base.fromSend, 99))}   ratio ${ratio(percentile(r.fromSend, 99), percentile(base.fromSend, 99))}   (the bench's own lateness left out)`,
      ].join('\n');
    process.stdout.write(
      [
        `load average ${os
          .loadavg()
          .map((l) => l.toFixed(2))
          .join(' ')} (1, 5, 15 min) at the end of the run`,
        `${WRITERS} writers (one entry each per 5 s for ${STEADY_S} s, then 10× for ${BURST_S} s, turns spread evenly), ${READERS} live readers, server in its own process`,
        pinned
          ? `  (server under test and baseline pinned to CPU ${pinned.server}; load generators and readers on CPU ${pinned.rest}, with taskset)`
          : '  (no pinning: taskset missing or one core)',
        line('steady', steady, bareSteady, steadyDelay, bareSteadyDelay),
        line('burst', burst, bareBurst, burstDelay, bareBurstDelay),
        `  (event-loop delay: how long work that was due waited for the server's event loop; load generator late: how long after its due instant the bench itself got to send an entry)`,
        `  (write: from the moment an entry was due to its answer; server: its own time, from Server-Timing; targets: write p99 <= 1.5x the baseline's, server p99 <= 30 ms)`,
        line('herd', herd, bareHerd, herdDelay, bareHerdDelay),
        `  (herd: all ${WRITERS} press send in the same instant, ${HERD_ROUNDS} times, a second apart; targets: write p99 <= 2x the baseline's, server p99 <= 60 ms)`,
        `  stream  delay p50 ${stream.p50} ms   p99 ${stream.p99} ms   max ${stream.max} ms   (steady and burst; target p99 <= 100 ms)   herd p50 ${herdStream.p50} ms   p99 ${herdStream.p99} ms`,
        `  events  ${sent} entries published, ${received} of ${expected} deliveries received (${expected - received} lost)`,
        `  memory  server rss ${memory.rssMb.toFixed(0)} MB now, peak ${Math.max(peakMb, memory.peakMb).toFixed(0)} MB`,
        '',
      ].join('\n'),
    );
    if (process.env.BENCH_SERVER_OUTPUT) writeFileSync(process.env.BENCH_SERVER_OUTPUT, server.output());
  } finally {
    readers?.kill();
    baseline?.stop();
    await server.stop();
    rmSync(delayDir, { recursive: true, force: true });
  }
}
