import { readFileSync } from 'node:fs';
import os from 'node:os';

import { startServerProcess } from '../helpers/server-process';
import { memoryOf, signIn } from './process';

const TARGET_MB = 130;
const SETTLE_MS = 5000;

/** Resident memory split as the kernel counts it: the process's own pages and those of mapped files (code, libraries). */
function residentOf(pid: number): { anonMb: number; fileMb: number } {
  const text = readFileSync(`/proc/${pid}/status`, 'utf8');
  const kb = (key: string) => Number(new RegExp(`${key}:\\s+(\\d+)`).exec(text)?.[1] ?? NaN);
  return { anonMb: kb('RssAnon') / 1024, fileMb: kb('RssFile') / 1024 };
}

/**
 * The resident memory of the server as `npm start` runs it (the bundle, a fresh database, the
 * demo seeded), once it has started and settled, and again after a person has opened the app:
 * signed in, listed campaigns and dives, read a dive's log and opened its live stream.
 */
export async function benchIdleMemory(): Promise<void> {
  const began = performance.now();
  const server = await startServerProcess({ LOG_LEVEL: 'silent', BATHYNOTE_DEMO_WATCHES: '1' });
  const startedMs = performance.now() - began;
  try {
    const pid = server.child.pid!;
    await new Promise((r) => setTimeout(r, SETTLE_MS));
    const started = memoryOf(pid);
    const startedSplit = residentOf(pid);

    const cookie = await signIn(server.url, 'biologist@bathynote.test', 'bathynote-demo');
    const get = async <T>(url: string): Promise<T> => {
      const res = await fetch(`${server.url}${url}`, { headers: { cookie } });
      if (!res.ok) throw new Error(`GET ${url}: ${res.status}`);
      return (await res.json()) as T;
    };
    const campaigns = await get<{ items: { id: string }[] } | { id: string }[]>('/api/campaigns');
    const campaignList = Array.isArray(campaigns) ? campaigns : campaigns.items;
    const dives = await get<{ items: { id: string }[] } | { id: string }[]>(`/api/campaigns/${campaignList[0]!.id}/dives`);
    const diveList = Array.isArray(dives) ? dives : dives.items;
    const dive = diveList[0]!.id;
    await get(`/api/dives/${dive}`);
    await get(`/api/dives/${dive}/observations?limit=100`);
    const stream = new AbortController();
    const open = await fetch(`${server.url}/api/dives/${dive}/stream`, { headers: { cookie }, signal: stream.signal });
    await new Promise((r) => setTimeout(r, 500));
    stream.abort();
    await open.body?.cancel().catch(() => undefined);
    await new Promise((r) => setTimeout(r, SETTLE_MS));
    const used = memoryOf(pid);
    const usedSplit = residentOf(pid);

    const mb = (v: number) => `${v.toFixed(0)} MB`;
    process.stdout.write(
      [
        `the server as npm start runs it (bundle, fresh database, demo seeded in its child process), ${os.loadavg()[0]!.toFixed(2)} load`,
        `  started      ${(startedMs / 1000).toFixed(1)} s to answer /api/health`,
        `  idle         rss ${mb(started.rssMb)} (${mb(startedSplit.anonMb)} heap and other own pages, ${mb(startedSplit.fileMb)} mapped files)   peak since start ${mb(started.peakMb)}   (target <= ${TARGET_MB} MB)`,
        `  after use    rss ${mb(used.rssMb)} (${mb(usedSplit.anonMb)} own, ${mb(usedSplit.fileMb)} files)   after a sign-in, the campaign's dives, a dive's log and its stream, ${SETTLE_MS / 1000} s later`,
        '',
      ].join('\n'),
    );
  } finally {
    await server.stop();
  }
}
