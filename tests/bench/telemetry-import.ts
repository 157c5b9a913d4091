import { createReadStream, openAsBlob, mkdtempSync, readFileSync, rmSync, statSync } from 'node:fs';
import os, { tmpdir } from 'node:os';
import path from 'node:path';

import Database from 'better-sqlite3';

import { DEMO_PASSWORD } from '@/db/seed';
import { diveFacts, stampDiveObservations } from '@/server/services/telemetry';
import { importTelemetryLog } from '@/server/services/telemetry-import';
import { announceStamped } from '@/server/services/telemetry-stamp';
import { logOf } from '@/server/services/telemetry-series';
import { writeVehicleLog } from '../fixtures/telemetry/logs';
import { demoIds, emails } from '../helpers/demo';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';
import { startTestServer } from '../helpers/test-server';
import { memoryOf, signIn } from './process';

/** Process CPU time (user and system) in ms; beside wall time it shows what a busy machine adds. */
const cpuMs = (u: NodeJS.CpuUsage) => (u.user + u.system) / 1000;

/** Peak resident memory of process `pid` while `work` runs, sampled from /proc every 10 ms. */
async function withPeakRssOf<T>(pid: number, work: () => Promise<T>): Promise<{ result: T; peak: number; before: number }> {
  const before = memoryOf(pid).rssMb;
  let peak = before;
  const timer = setInterval(() => {
    peak = Math.max(peak, memoryOf(pid).rssMb);
  }, 10);
  try {
    const result = await work();
    peak = Math.max(peak, memoryOf(pid).rssMb);
    return { result, peak, before };
  } finally {
    clearInterval(timer);
  }
}

type ImportFigures = { ms: number; cpuMs: number; status: number; report: ImportReport; peak: number; before: number };

/** CPU time (user and system) process `pid` has used, in ms, from /proc (Linux; 100 ticks a second). */
function cpuMsOf(pid: number): number {
  const fields = readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1]!.split(' ');
  return (Number(fields[11]) + Number(fields[12])) * 10;
}
type ImportReport = { rowsTaken?: number; rowsRejected?: number; stamped?: { updated: number } };

/** One log imported over HTTP into the server process's dive `diveNumber`, with the server's peak resident memory meanwhile. */
async function importOver(server: ServerProcess, file: string, diveNumber: string): Promise<ImportFigures> {
  const serverDb = new Database(path.join(server.dir, 'bathynote.db'), { readonly: true });
  const diveId = (serverDb.prepare('select id from dives where number = ?').get(diveNumber) as { id: string }).id;
  serverDb.close();
  const cookie = await signIn(server.url, emails.pilot, DEMO_PASSWORD);
  const blob = await openAsBlob(file, { type: 'text/csv' });
  const cpuBefore = cpuMsOf(server.child.pid!);
  const { result, peak, before } = await withPeakRssOf(server.child.pid!, async () => {
    const body = new FormData();
    body.set('mode', 'replace');
    body.set('file', blob, path.basename(file));
    const began = performance.now();
    const res = await fetch(`${server.url}/api/dives/${diveId}/telemetry`, {
      method: 'POST',
      headers: { cookie, origin: server.url },
      body,
    });
    const report = (await res.json()) as ImportReport;
    return { ms: performance.now() - began, status: res.status, report };
  });
  return { ...result, cpuMs: cpuMsOf(server.child.pid!) - cpuBefore, peak, before };
}

/**
 * The table as the app has it (same columns, primary key and WITHOUT ROWID storage, as migration
 * 0012 made it), without the dive it belongs to: a bare loop into a table with a rowid and a
 * second index for the key would measure other work than the import does.
 */
function createBareTable(db: Database.Database): void {
  db.exec(`create table telemetry_samples (dive_id text not null, t integer not null, depth real, pressure real, lat real,
    lon real, heading real, altitude real, temperature real, salinity real, primary key (dive_id, t)) without rowid`);
}

/** The same rows as the log file, written by a bare better-sqlite3 loop: the floor an import can reach. */
function bareInsert(dbFile: string, diveId: string, rows: number, start: number): { ms: number; cpuMs: number } {
  const db = new Database(dbFile);
  db.pragma('journal_mode = WAL');
  db.pragma('synchronous = FULL');
  createBareTable(db);
  const insert = db.prepare(
    'insert into telemetry_samples (dive_id, t, depth, pressure, lat, lon, heading, altitude, temperature, salinity) values (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)',
  );
  const began = performance.now();
  const cpu = process.cpuUsage();
  db.transaction(() => {
    for (let i = 0; i < rows; i++) {
      const m = i / 600;
      const depth = Math.min(600, m * 22) + 3 * Math.sin(m / 7);
      insert.run(diveId, start + i * 100, depth, depth * 1.0063, 36.145, -7.432, (m * 7) % 360, 2.5, 10.8, 35.7);
    }
  })();
  const ms = performance.now() - began;
  const used = cpuMs(process.cpuUsage(cpu));
  db.close();
  return { ms, cpuMs: used };
}

/**
 * The same log file read from its first byte by the plainest importer there is (lines split at
 * commas, `Date.parse` and `Number` per cell, no checks) and inserted by the bare loop: the floor
 * for an import that starts, as the real one does, from the file rather than from rows in memory.
 */
async function bareImport(dbFile: string, diveId: string, file: string): Promise<{ ms: number; cpuMs: number; rows: number }> {
  const db = new Database(dbFile);
  db.pragma('journal_mode = WAL');
  db.pragma('synchronous = FULL');
  createBareTable(db);
  const insert = db.prepare(
    'insert into telemetry_samples (dive_id, t, depth, pressure, lat, lon, heading, altitude, temperature, salinity) values (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)',
  );
  const began = performance.now();
  const cpu = process.cpuUsage();
  let rows = 0;
  db.exec('begin');
  let rest = '';
  let header = true;
  const take = (line: string) => {
    if (header) {
      header = false;
      return;
    }
    const c = line.split(',');
    insert.run(
      diveId,
      Date.parse(c[0]!),
      Number(c[1]),
      Number(c[2]),
      Number(c[3]),
      Number(c[4]),
      Number(c[5]),
      Number(c[6]),
      Number(c[7]),
      Number(c[8]),
    );
    rows++;
  };
  for await (const chunk of createReadStream(file, { encoding: 'utf8', highWaterMark: 64 * 1024 }) as AsyncIterable<string>) {
    const text = rest + chunk;
    let start = 0;
    for (let nl = text.indexOf('\n'); nl !== -1; nl = text.indexOf('\n', start)) {
      take(text.slice(start, nl));
      start = nl + 1;
    }
    rest = text.slice(start);
  }
  if (rest !== '') take(rest);
  db.exec('commit');
  const ms = performance.now() - began;
  const used = cpuMs(process.cpuUsage(cpu));
  db.close();
  return { ms, cpuMs: used, rows };
}

/**
 * A ten-hour log at 10 Hz (360,000 rows) imported through the real HTTP endpoint, beside a bare
 * insert loop of the same rows; then 10,000 entries stamped from that log.
 */
export async function benchTelemetryImport(): Promise<void> {
  const dir = mkdtempSync(path.join(tmpdir(), 'bathynote-bench-telemetry-'));
  // The import runs against the server in its own process, as in production, so its memory is
  // the server's alone; stamping below is timed in this process on a test server.
  const server = await startServerProcess({ LOG_LEVEL: 'silent', AUTH_RATE_LIMIT: '1000', API_RATE_LIMIT: '1000000' });
  const t = await startTestServer({ env: { AUTH_RATE_LIMIT: '1000', API_RATE_LIMIT: '1000000' } });
  try {
    const ids = demoIds(t.ctx.db);
    const dive = ids.dive2026;
    const facts = diveFacts(t.ctx.db, dive);
    const start = facts.phases.launch ?? Date.UTC(2026, 4, 13, 17, 40);
    const file = path.join(dir, 'skerry-10h-10hz.csv');
    const rows = await writeVehicleLog(file, start, 10, 10);

    const imported = await importOver(server, file, 'VS-02');
    const { peak, before } = imported;
    const pid = server.child.pid!;
    const lifetimePeak = memoryOf(pid).peakMb;

    const bare = bareInsert(path.join(dir, 'bare.db'), dive, rows, start);
    const bareMs = bare.ms;
    const bareFromFile = await bareImport(path.join(dir, 'bare-file.db'), dive, file);

    // The same log in this process's database, untimed, so that every entry has a sample to take.
    await importTelemetryLog(t.ctx.db, t.ctx.live, {
      diveId: dive,
      userId: ids.userId(emails.pilot),
      filePath: file,
      fileName: 'skerry-10h-10hz.csv',
      fields: { mode: 'replace' },
    });
    // 10,000 entries spread over the log, none with typed values, stamped in one go.
    const db = t.ctx.db;
    const authorId = ids.userId(emails.biologist);
    const insert = db.$client.prepare(
      "insert into observations (id, dive_id, campaign_id, observed_at, kind, title, author_id, created_at, updated_at) values (?, ?, ?, ?, 'biology', 'Bench entry', ?, ?, ?)",
    );
    db.$client.transaction(() => {
      for (let i = 0; i < 10_000; i++) {
        const at = start + Math.round((i * 10 * 3600_000) / 10_000);
        insert.run(crypto.randomUUID(), dive, ids.campaign2026, at, authorId, at, at);
      }
    })();
    const { series } = logOf(db, dive);
    // Stamping and its announcement are one transaction, as in the import itself.
    const began = performance.now();
    const stampCpu = process.cpuUsage();
    let stampMs = 0;
    const stamped = t.ctx.live.withEvents((tx, stage) => {
      const result = stampDiveObservations(db, dive, series, facts.gapMs);
      stampMs = performance.now() - began;
      announceStamped(stage, ids.campaign2026, dive, result.changed);
      return result;
    });
    const announceMs = performance.now() - began - stampMs;
    const stampCpuMs = cpuMs(process.cpuUsage(stampCpu));

    process.stdout.write(
      [
        `import of a ${rows.toLocaleString('en')}-row log (10 h at 10 Hz) through POST /api/dives/:diveId/telemetry`,
        `  status       ${imported.status}   rows taken ${imported.report.rowsTaken}   rejected ${imported.report.rowsRejected}`,
        `  time         ${(imported.ms / 1000).toFixed(2)} s   (target <= 5 s; upload, parse, write and stamp, server in its own process)`,
        `  peak memory  server rss ${peak.toFixed(0)} MB during the import   (${before.toFixed(0)} MB before it, so ${(peak - before).toFixed(0)} MB for the import; ${lifetimePeak.toFixed(0)} MB the server's peak since start)`,
        `  bare insert  ${(bareMs / 1000).toFixed(2)} s for the same rows (better-sqlite3 loop, one transaction)   import/bare ${(imported.ms / bareMs).toFixed(1)}x (target <= 2x)`,
        `  bare import  ${(bareFromFile.ms / 1000).toFixed(2)} s reading the same file from its first byte (${bareFromFile.rows.toLocaleString('en')} rows, split, Number, no checks) and inserting   import/bare import ${(imported.ms / bareFromFile.ms).toFixed(1)}x   CPU ${(bareFromFile.cpuMs / 1000).toFixed(2)} s, server CPU/bare import CPU ${(imported.cpuMs / bareFromFile.cpuMs).toFixed(1)}x`,
        `  load         ${os
          .loadavg()
          .map((l) => l.toFixed(2))
          .join(' ')} (1, 5, 15 min)`,
        `  CPU          server ${(imported.cpuMs / 1000).toFixed(2)} s for the import (upload included), bare loop ${(bare.cpuMs / 1000).toFixed(2)} s   import/bare ${(imported.cpuMs / bare.cpuMs).toFixed(1)}x (CPU time is what a busy machine does not stretch)`,
        `stamping 10,000 entries from that log`,
        `  stamp        ${stampMs.toFixed(0)} ms for ${stamped.changed.length} changed entries   (target <= 100 ms; CPU ${stampCpuMs.toFixed(0)} ms)`,
        `  announce     ${announceMs.toFixed(0)} ms more to stage and send their dive.restamped event`,
        '',
      ].join('\n'),
    );
  } finally {
    await t.close();
    await server.stop();
  }
  try {
    await benchMillionRows(dir);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

const MILLION = 1_000_000;

/**
 * A multi-day log at 10 Hz, a million rows, imported into a freshly started server: its peak
 * resident memory during the import against its idle memory just before.
 */
async function benchMillionRows(dir: string): Promise<void> {
  const file = path.join(dir, 'skerry-28h-10hz.csv');
  const rows = await writeVehicleLog(file, Date.UTC(2026, 4, 13, 17, 40), MILLION / 36_000, 10);
  const { size } = statSync(file);
  const server = await startServerProcess({ LOG_LEVEL: 'silent', AUTH_RATE_LIMIT: '1000', API_RATE_LIMIT: '1000000' });
  try {
    await new Promise((r) => setTimeout(r, 3000));
    const idle = memoryOf(server.child.pid!).rssMb;
    const imported = await importOver(server, file, 'VS-03');
    process.stdout.write(
      [
        `import of a ${rows.toLocaleString('en')}-row log (${(size / 1024 / 1024).toFixed(0)} MB, 28 h at 10 Hz) into a freshly started server, ${os.loadavg()[0]!.toFixed(2)} load`,
        `  status       ${imported.status}   rows taken ${imported.report.rowsTaken}   rejected ${imported.report.rowsRejected}   entries stamped ${imported.report.stamped?.updated}`,
        `  time         ${(imported.ms / 1000).toFixed(2)} s   (server CPU ${(imported.cpuMs / 1000).toFixed(2)} s)`,
        `  peak memory  server rss ${imported.peak.toFixed(0)} MB during the import, idle ${idle.toFixed(0)} MB before it: +${(imported.peak - idle).toFixed(0)} MB   (target <= idle + 100 MB)`,
        '',
      ].join('\n'),
    );
  } finally {
    await server.stop();
  }
}
