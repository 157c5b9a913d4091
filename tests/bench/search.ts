/**
 * `npm run bench -- search`: search over synthetic corpora (100,000 and 1,000,000 entries by
 * default; `SEARCH_BENCH_SIZES=100000` for one size) in 40 campaigns, written from invented
 * words straight into a fresh database. The caller is a member of 10 of the 40 campaigns.
 * Printed: index build time and size, the server's resident memory, latency through the HTTP API
 * for 50 fixed three-word queries (half with one typo; asked three times, and the first asking on
 * its own), the share of typo queries whose intended
 * entry is in the top 10, and beside it a plain fuse.js scan over the 20,000 entries of one
 * campaign (speed per entry, and how many of its top 10 the index also ranks in its top 10).
 * Nothing is asserted.
 */
import { existsSync, mkdtempSync, readFileSync, rmSync, statSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import path from 'node:path';

import Fuse from 'fuse.js';

import { migrateDatabase, openDatabase } from '@/db/client';
import { seedDemo } from '@/db/seed';
import { random } from '@/db/seed-random';
import { searchPageSchema } from '@/lib/schemas/search';
import { indexFileFor, openIndexStore } from '@/server/services/search/store';
import { startServerProcess } from '../helpers/server-process';
import { memoryOf, signIn } from './process';

const CAMPAIGNS = 40;
const VISIBLE = 10;
const DIVES_PER_CAMPAIGN = 5;
/** The first campaign holds exactly this many entries: the subset fuse.js scans. */
const SUBSET = 20_000;
const QUERIES = 50;

const rnd = random(20_260_514);
const pick = <T>(list: readonly T[]): T => list[Math.floor(rnd() * list.length)]!;

/* ---- invented words ---- */

const onsets = [
  'b',
  'br',
  'c',
  'cl',
  'd',
  'dr',
  'f',
  'g',
  'gl',
  'h',
  'k',
  'l',
  'm',
  'n',
  'p',
  'pl',
  'qu',
  'r',
  's',
  'sk',
  't',
  'tr',
  'v',
  'z',
];
const vowels = ['a', 'e', 'i', 'o', 'u', 'ae', 'io', 'ou'];
const codas = ['', '', 'n', 'r', 'l', 's', 'th', 'x', 'nd', 'rk'];

function inventWords(n: number): string[] {
  const seen = new Set<string>();
  while (seen.size < n) {
    const syllables = 1 + Math.floor(rnd() * 4);
    let w = '';
    for (let s = 0; s < syllables; s++) w += pick(onsets) + pick(vowels) + (s === syllables - 1 ? pick(codas) : '');
    if (w.length >= 3 && w.length <= 14) seen.add(w);
  }
  return [...seen];
}

/** Word frequencies that fall off like a natural language's (Zipf, exponent 1). */
function zipf(words: string[]): () => string {
  const weights = words.map((_, i) => 1 / (i + 1));
  const total = weights.reduce((a, b) => a + b, 0);
  const cumulative: number[] = [];
  let acc = 0;
  for (const w of weights) cumulative.push((acc += w / total));
  return () => {
    const r = rnd();
    let lo = 0;
    let hi = cumulative.length - 1;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (cumulative[mid]! < r) lo = mid + 1;
      else hi = mid;
    }
    return words[lo]!;
  };
}

/** One typing slip: a letter changed, dropped or doubled (never the first letter). */
function typo(word: string): string {
  const at = 1 + Math.floor(rnd() * (word.length - 1));
  const kind = Math.floor(rnd() * 3);
  const other = String.fromCharCode(97 + ((word.charCodeAt(at) - 97 + 1 + Math.floor(rnd() * 24)) % 26));
  if (kind === 0) return word.slice(0, at) + other + word.slice(at + 1);
  if (kind === 1) return word.slice(0, at) + word.slice(at + 1);
  return word.slice(0, at) + word[at] + word.slice(at);
}

type Target = { id: string; campaign: number; title: string; note: string; tags: string; sci: string; find: string };
type Query = { q: string; typo: boolean; target: string };

/* ---- the corpus ---- */

export function generate(dir: string, size: number) {
  const file = path.join(dir, 'bathynote.db');
  const db = openDatabase(file);
  migrateDatabase(db);
  return seedDemo(db).then(() => {
    const sqlite = db.$client;
    // Bulk loading into a throwaway database: no journal, no waiting for the disk, a large page
    // cache (random ids land all over the indexes), as any bulk load would.
    sqlite.pragma('journal_mode = OFF');
    sqlite.pragma('synchronous = OFF');
    sqlite.pragma('cache_size = -262144');
    const words = inventWords(30_000);
    const word = zipf(words);
    const caller = sqlite.prepare(`select id from user where email = 'biologist@bathynote.test'`).pluck().get() as string;
    const author = caller;
    const now = Date.UTC(2026, 4, 14);
    const campaigns: string[] = [];
    const dives: string[][] = [];
    const tagIds: { id: string; name: string }[][] = [];
    const subset: Target[] = [];
    const targets: Target[] = [];
    const started = performance.now();
    // Secondary indexes are dropped during the load and built once after it (quicker than keeping
    // them up to date row by row), from their own definitions.
    const bulkTables = ['observations', 'observation_tags', 'identifications', 'finds'];
    const indexes = sqlite
      .prepare(
        `select name, sql from sqlite_master where type = 'index' and sql is not null and tbl_name in (${bulkTables.map(() => '?').join(', ')})`,
      )
      .all(...bulkTables) as { name: string; sql: string }[];
    for (const ix of indexes) sqlite.exec(`drop index "${ix.name}"`);
    sqlite.transaction(() => {
      const campaign = sqlite.prepare(
        'insert into campaigns (id, name, site_name, datum_lat, datum_lon, created_at, updated_at) values (?, ?, ?, 36.1, -7.4, ?, ?)',
      );
      const dive = sqlite.prepare('insert into dives (id, campaign_id, number, created_at, updated_at) values (?, ?, ?, ?, ?)');
      const tag = sqlite.prepare('insert into tags (id, campaign_id, name, created_at) values (?, ?, ?, ?)');
      const member = sqlite.prepare(`insert into memberships (campaign_id, user_id, role, created_at) values (?, ?, 'scientist', ?)`);
      for (let c = 0; c < CAMPAIGNS; c++) {
        const id = crypto.randomUUID();
        campaigns.push(id);
        campaign.run(id, `Bench campaign ${c + 1}`, `Bench site ${c + 1}`, now, now);
        dives.push(
          Array.from({ length: DIVES_PER_CAMPAIGN }, (_, d) => {
            const diveId = crypto.randomUUID();
            dive.run(diveId, id, `B${c + 1}-${d + 1}`, now, now);
            return diveId;
          }),
        );
        const names = new Set<string>();
        while (names.size < 30) names.add(word());
        tagIds.push(
          [...names].map((name) => {
            const tagId = crypto.randomUUID();
            tag.run(tagId, id, name, now);
            return { id: tagId, name };
          }),
        );
        if (c < VISIBLE) member.run(id, caller, now);
      }

      const observation = sqlite.prepare(
        `insert into observations (id, dive_id, campaign_id, observed_at, kind, title, note, depth, depth_source, author_id, created_at, updated_at)
         values (?, ?, ?, ?, ?, ?, ?, ?, 'manual', ?, ?, ?)`,
      );
      const observationTag = sqlite.prepare('insert or ignore into observation_tags (observation_id, tag_id) values (?, ?)');
      const identification = sqlite.prepare(
        'insert into identifications (observation_id, scientific_name, identified_by, updated_at) values (?, ?, ?, ?)',
      );
      const find = sqlite.prepare('insert into finds (observation_id, campaign_id, find_number, updated_at) values (?, ?, ?, ?)');
      const kinds = ['biology', 'archaeology', 'environment', 'operations'] as const;
      // Every so many entries of the caller's campaigns (outside the subset) is a query's target.
      const visibleOutside = ((size - SUBSET) * (VISIBLE - 1)) / (CAMPAIGNS - 1);
      const everyTarget = Math.max(1, Math.floor(visibleOutside / (QUERIES + 5)));
      let visibleSeen = 0;
      const findCount = new Array<number>(CAMPAIGNS).fill(0);
      for (let i = 0; i < size; i++) {
        // The first campaign holds the subset; the rest share what is left.
        const c = i < SUBSET ? 0 : 1 + ((i - SUBSET) % (CAMPAIGNS - 1));
        const id = crypto.randomUUID();
        const kind = kinds[i % 4]!;
        const titleWords = Array.from({ length: 3 + Math.floor(rnd() * 5) }, word);
        const title = titleWords.join(' ');
        const noteLength = Math.floor(rnd() * rnd() * 60);
        const note = Array.from({ length: noteLength }, word).join(' ');
        const at = now - Math.floor(rnd() * 400 * 86_400_000);
        observation.run(id, pick(dives[c]!), campaigns[c]!, at, kind, title, note, 400 + Math.floor(rnd() * 400), author, at, at);
        const tags: string[] = [];
        for (let t = Math.floor(rnd() * 3); t > 0; t--) {
          const chosen = pick(tagIds[c]!);
          observationTag.run(id, chosen.id);
          tags.push(chosen.name);
        }
        let sci = '';
        let findNumber = '';
        if (kind === 'biology') {
          sci = `${word()[0]!.toUpperCase()}${word().slice(1)} ${word()}`;
          identification.run(id, sci, author, at);
        } else if (kind === 'archaeology') {
          findNumber = `F-${String(++findCount[c]!).padStart(6, '0')}`;
          find.run(id, campaigns[c]!, findNumber, at);
        }
        const entry = { id, campaign: c, title, note, tags: tags.join(' '), sci, find: findNumber };
        if (c === 0) subset.push(entry);
        if (c > 0 && c < VISIBLE && visibleSeen++ % everyTarget === 0 && targets.length < QUERIES && new Set(titleWords).size >= 3)
          targets.push(entry);
      }
    })();
    for (const ix of indexes) sqlite.exec(ix.sql);
    const generateMs = performance.now() - started;
    sqlite.pragma('journal_mode = WAL');
    db.$client.close();
    // Queries: three distinct title words of a visible entry; every other one with a typing slip.
    const queries: Query[] = targets.map((t, i) => {
      const three = [...new Set(t.title.split(' '))].slice(0, 3);
      const slipped = i % 2 === 1;
      if (slipped) {
        const longest = three.reduce((a, b, j) => (b.length > three[a]!.length ? j : a), 0);
        three[longest] = typo(three[longest]!);
      }
      return { q: three.join(' '), typo: slipped, target: t.id };
    });
    return { file, generateMs, subset, queries, campaigns };
  });
}

/** CPU time a process has used so far, in ms (user + system, from /proc: Linux). */
function cpuMsOf(pid: number): number {
  const fields = readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1]!.split(' ');
  // utime and stime are the 14th and 15th fields of the line (11th and 12th after the name), in clock ticks.
  return ((Number(fields[11]) + Number(fields[12])) * 1000) / 100;
}

const percentile = (sorted: number[], p: number) => sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))]!;
const mb = (bytes: number) => `${(bytes / 2 ** 20).toFixed(1)} MB`;
const sizeOf = (f: string) => (existsSync(f) ? statSync(f).size : 0);

async function benchSize(size: number) {
  const dir = mkdtempSync(path.join(tmpdir(), 'bathynote-search-bench-'));
  try {
    const { file, generateMs, subset, queries, campaigns } = await generate(dir, size);
    const out: string[] = [
      `${size.toLocaleString('en')} entries in ${CAMPAIGNS} campaigns (written in ${(generateMs / 1000).toFixed(1)} s); the caller is a member of ${VISIBLE}`,
    ];

    // The index is built the way the server builds a missing one, timed here on its own.
    const db = openDatabase(file);
    const built = openIndexStore(db, file);
    db.$client.pragma('search.wal_checkpoint(TRUNCATE)');
    db.$client.close();
    const indexFile = indexFileFor(file);
    out.push(
      `  index build  ${(built.ms / 1000).toFixed(1)} s   size ${mb(sizeOf(indexFile) + sizeOf(`${indexFile}-wal`))} (record ${mb(sizeOf(file) + sizeOf(`${file}-wal`))})   target ≤ 250 MB at 1,000,000`,
    );

    const starting = performance.now();
    const server = await startServerProcess(
      { LOG_LEVEL: 'error', API_RATE_LIMIT: '1000000', AUTH_RATE_LIMIT: '1000' },
      { dir, keepDir: true },
    );
    const startMs = performance.now() - starting;
    try {
      const cookie = await signIn(server.url, 'biologist@bathynote.test', 'bathynote-demo');
      const ask = async (q: string, extra: Record<string, string> = {}) => {
        const url = `${server.url}/api/search?${new URLSearchParams({ q, limit: '10', ...extra }).toString()}`;
        // A kept-alive socket the server closed while fuse.js was busy fails once; ask again.
        const res = await fetch(url, { headers: { cookie } }).catch(() => fetch(url, { headers: { cookie } }));
        if (res.status !== 200) throw new Error(`search ${q}: ${res.status} ${await res.text()}`);
        return searchPageSchema.parse(await res.json());
      };
      const warm = performance.now();
      // Not one of the measured queries as asked (a finished last word), so none of them is kept from here.
      await ask(`${queries[0]!.q} `);
      out.push(
        `  start        server answering in ${(startMs / 1000).toFixed(1)} s (opens the index, reads its word list into memory); first query ${(performance.now() - warm).toFixed(0)} ms`,
      );

      const times: number[] = [];
      // The server keeps its last rankings until the record changes, so the first asking of each
      // query is also reported on its own: that is the index's own speed.
      const firstTimes: number[] = [];
      let typoHits = 0;
      let plainHits = 0;
      const pid = server.child.pid!;
      const cpuBefore = cpuMsOf(pid);
      let cpuFirst = 0;
      for (let round = 0; round < 3; round++) {
        if (round === 1) cpuFirst = cpuMsOf(pid) - cpuBefore;
        for (const query of queries) {
          const t0 = performance.now();
          const page = await ask(query.q);
          times.push(performance.now() - t0);
          if (round === 0) {
            firstTimes.push(performance.now() - t0);
            const hit = page.items.some((i) => i.id === query.target);
            if (hit && query.typo) typoHits++;
            if (hit && !query.typo) plainHits++;
          }
        }
      }
      const cpuAll = cpuMsOf(pid) - cpuBefore;
      times.sort((a, b) => a - b);
      firstTimes.sort((a, b) => a - b);
      const mem = memoryOf(server.child.pid!);
      const typos = queries.filter((q) => q.typo).length;
      out.push(
        `  latency      p50 ${percentile(times, 50).toFixed(1)} ms   p95 ${percentile(times, 95).toFixed(1)} ms   max ${times[times.length - 1]!.toFixed(1)} ms   (${times.length} requests, ${queries.length} queries × 3; target p95 ≤ 20 ms at 100,000, ≤ 100 ms at 1,000,000)`,
        `  first asking p50 ${percentile(firstTimes, 50).toFixed(1)} ms   p95 ${percentile(firstTimes, 95).toFixed(1)} ms   max ${firstTimes[firstTimes.length - 1]!.toFixed(1)} ms   (each query once, nothing kept from before; machine load ${loadavg()[0]!.toFixed(1)})`,
        // The server's own CPU time does not grow with the machine's load as the latency does.
        `  server CPU   ${(cpuFirst / queries.length).toFixed(1)} ms a request at the first asking, ${(cpuAll / times.length).toFixed(1)} ms over all ${times.length} (10 ms clock ticks)`,
        `  top 10       typo queries ${typoHits}/${typos} find their entry (target ≥ 24/25); without a typo ${plainHits}/${queries.length - typos}`,
        `  server       rss ${mem.rssMb.toFixed(0)} MB, peak ${mem.peakMb.toFixed(0)} MB (target ≤ 400 MB at 1,000,000)`,
      );

      // fuse.js over the first campaign's 20,000 entries, with the same queries (its extended
      // search: words separated by spaces must all match, each fuzzily).
      const fuse = new Fuse(subset, {
        keys: [
          { name: 'title', weight: 10 },
          { name: 'tags', weight: 6 },
          { name: 'sci', weight: 8 },
          { name: 'find', weight: 8 },
          { name: 'note', weight: 1 },
        ],
        includeScore: true,
        ignoreLocation: true,
        threshold: 0.4,
        useExtendedSearch: true,
      });
      // Queries aimed at the subset: the same recipe over its entries.
      const subsetQueries = queries.map((q, i) => {
        const t = subset[Math.floor((i * subset.length) / queries.length)]!;
        const three = [...new Set(t.title.split(' '))].slice(0, 3);
        if (q.typo) {
          const longest = three.reduce((a, b, j) => (b.length > three[a]!.length ? j : a), 0);
          three[longest] = typo(three[longest]!);
        }
        return three.join(' ');
      });
      let fuseMs = 0;
      let oursMs = 0;
      let overlap = 0;
      let compared = 0;
      for (const q of subsetQueries) {
        const f0 = performance.now();
        const theirs = fuse.search(q, { limit: 10 }).map((r) => r.item.id);
        fuseMs += performance.now() - f0;
        const o0 = performance.now();
        const ours = (await ask(q, { campaignId: campaigns[0]! })).items.map((i) => i.id);
        oursMs += performance.now() - o0;
        if (theirs.length === 0 && ours.length === 0) continue;
        compared++;
        const shared = theirs.filter((id) => ours.includes(id)).length;
        // Shared among as many as the shorter list holds: a query that only a few entries match
        // is not held against either side.
        overlap += shared / Math.max(1, Math.min(10, theirs.length, ours.length));
      }
      const visibleEntries = SUBSET + ((size - SUBSET) * (VISIBLE - 1)) / (CAMPAIGNS - 1);
      out.push(
        `  fuse.js      ${(fuseMs / subsetQueries.length).toFixed(1)} ms a query over ${SUBSET.toLocaleString('en')} entries in memory = ${((fuseMs / subsetQueries.length / SUBSET) * 1000).toFixed(2)} µs an entry;` +
          ` the index ${((oursMs / subsetQueries.length / SUBSET) * 1000).toFixed(3)} µs an entry over the same campaign through HTTP` +
          ` (${((percentile(times, 50) / visibleEntries) * 1000).toFixed(4)} µs an entry over all ${Math.round(visibleEntries).toLocaleString('en')} visible)`,
        `  overlap      top 10 shared with fuse.js ${((overlap / Math.max(1, compared)) * 100).toFixed(0)} % over ${compared} queries (target ≥ 80 %)`,
      );
    } finally {
      await server.stop();
    }
    process.stdout.write(`${out.join('\n')}\n\n`);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

export async function benchSearch(): Promise<void> {
  const wanted: string = process.env.SEARCH_BENCH_SIZES ?? '100000,1000000';
  const sizes = wanted
    .split(',')
    .map((s) => Number(s.trim()))
    .filter((n) => Number.isInteger(n) && n > SUBSET);
  for (const size of sizes) await benchSize(size);
}
