/**
 * The demo's dive under way. With `BATHYNOTE_DEMO` and `BATHYNOTE_DEMO_LIVE` on, a small simulator
 * in the server process launches a dive of "Varn Shoal 2026" (or carries on the one it left when
 * the server stopped), adds the vehicle's telemetry through the log import, and has two colleagues
 * log an entry every 20–60 s through the same command as the API. So a newcomer sees the live log,
 * its new-entries marker and the depth profile grow without opening a second browser. Every name,
 * place and number it writes is invented.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';

import { and, desc, eq, isNotNull, isNull, like } from 'drizzle-orm';

import { random } from '../../db/seed-random';
import * as s from '../../db/schema';
import { fromLocalEN, type LatLon } from '../../lib/geodesy';
import { observationCreateSchema, type ObservationKind } from '../../lib/schemas';
import { pressureFromDepth } from '../../lib/seawater';
import type { AppContext } from '../context';
import { queueDigests } from './digests';
import { createDive, setPhase } from './dives';
import { createObservation } from './observations';
import { importTelemetryLog } from './telemetry-import';

/** The campaign the dive under way belongs to. */
export const DEMO_LIVE_CAMPAIGN = 'Varn Shoal 2026';
/** The file name every log the simulator adds is imported under; it also tells its dives apart. */
const logName = (number: string) => `skerry-${number.toLowerCase()}-live.csv`;
const LIVE_LOG_PATTERN = 'skerry-%-live.csv';

/** A dive left with no telemetry for longer than this is brought up and a new one launched. */
const STALE_MS = 2 * 3_600_000;
/** How long before start a new dive was launched: it is on the bottom, and working, when the first person looks. */
const LAUNCHED_AGO_MS = 70 * 60_000;
const DESCENT_M_PER_MIN = 22;
const ASCENT_M_PER_MIN = 25;
/** Minutes of log before launch and after on deck, with the vehicle on deck. */
const MARGIN_MS = 3 * 60_000;
const SAMPLE_MS = 1000;

/** The clock and timers the simulator runs on; tests pass their own and move time by hand. */
export type DemoClock = {
  now(): number;
  setTimeout(run: () => void, ms: number): unknown;
  clearTimeout(handle: unknown): void;
};

export const systemClock: DemoClock = {
  now: () => Date.now(),
  setTimeout: (run, ms) => setTimeout(run, ms),
  clearTimeout: (handle) => clearTimeout(handle as ReturnType<typeof setTimeout>),
};

export type DemoLiveOptions = {
  clock?: DemoClock;
  /** Random numbers in [0, 1): who logs, what, and when. */
  random?: () => number;
  /** The shortest and longest wait between two entries, in ms. */
  minWaitMs?: number;
  maxWaitMs?: number;
};

export type DemoLive = {
  /** The dive under way, or null when the simulator is off. */
  readonly diveId: string | null;
  readonly diveNumber: string | null;
  readonly running: boolean;
  /** Settles once the step in progress (if any) is done. */
  idle(): Promise<void>;
  /** Stops the timer and waits for the step in progress; nothing is written after it settles. */
  stop(): Promise<void>;
};

const inactive: DemoLive = { diveId: null, diveNumber: null, running: false, idle: async () => {}, stop: async () => {} };

type Deps = Pick<AppContext, 'env' | 'db' | 'live' | 'log' | 'mail'>;

const round = (v: number, places: number) => Math.round(v * 10 ** places) / 10 ** places;
const smooth = (f: number) => f * f * (3 - 2 * f);

/** The dive's timing, from which the whole track follows: a restart draws the same vehicle. */
type Track = { launch: number; onBottom: number; bottom: number; datum: LatLon; seed: number };

function hashOf(text: string): number {
  let h = 2166136261;
  for (const c of text) h = Math.imul(h ^ c.charCodeAt(0), 16777619);
  return h >>> 0;
}

/**
 * Where the vehicle is at `t` (ms): on deck before launch, down the water column at 22 m/min,
 * then wandering over the wreck within about 70 m of the datum, following the seabed; after
 * `offBottom` (when given) back up at 25 m/min to the ship.
 */
function vehicleAt(track: Track, t: number, offBottom: number | null) {
  const rand = random(track.seed);
  const phase = Array.from({ length: 6 }, () => rand() * Math.PI * 2);
  const ship = { east: -70 - rand() * 30, north: -60 - rand() * 30 };
  const wander = (at: number) => {
    const m = (at - track.onBottom) / 60_000;
    return {
      east: 45 * Math.sin(m / 23 + phase[0]!) + 20 * Math.sin(m / 7.1 + phase[1]!),
      north: 38 * Math.sin(m / 31 + phase[2]!) + 16 * Math.cos(m / 9.3 + phase[3]!),
    };
  };
  const onDeck = offBottom === null ? null : offBottom + (track.bottom / ASCENT_M_PER_MIN) * 60_000;
  if (t < track.launch || (onDeck !== null && t > onDeck)) return { depth: 0, at: ship, onBottom: false, inWater: false };
  if (t < track.onBottom) {
    const f = (t - track.launch) / (track.onBottom - track.launch);
    const first = wander(track.onBottom);
    return {
      depth: (track.bottom - 4) * f + 4 * smooth(f),
      at: { east: ship.east + (first.east - ship.east) * smooth(f), north: ship.north + (first.north - ship.north) * smooth(f) },
      onBottom: false,
      inWater: true,
    };
  }
  if (offBottom !== null && onDeck !== null && t > offBottom) {
    const f = (t - offBottom) / (onDeck - offBottom);
    const last = wander(offBottom);
    return {
      depth: track.bottom * (1 - f),
      at: { east: last.east + (ship.east - last.east) * smooth(f), north: last.north + (ship.north - last.north) * smooth(f) },
      onBottom: false,
      inWater: true,
    };
  }
  const m = (t - track.onBottom) / 60_000;
  // The wreck mound rises a few metres above the seabed the vehicle follows.
  const depth = track.bottom + 4 * Math.sin(m / 17 + phase[4]!) - 3 * Math.max(0, Math.cos(m / 5 + phase[5]!));
  return { depth, at: wander(t), onBottom: true, inWater: true };
}

/** The log's rows from `from` to `to` (ms, whole seconds), as the vehicle's CSV. */
function logCsv(track: Track, from: number, to: number, offBottom: number | null, noise: () => number): string {
  const lines = ['time,depth_m,pressure_dbar,lat,lon,heading,altitude_m,temperature_c,salinity'];
  for (let t = from; t <= to; t += SAMPLE_MS) {
    const here = vehicleAt(track, t, offBottom);
    const before = vehicleAt(track, t - SAMPLE_MS, offBottom);
    const moved = Math.hypot(here.at.east - before.at.east, here.at.north - before.at.north);
    const heading = moved > 0.01 ? (Math.atan2(here.at.east - before.at.east, here.at.north - before.at.north) * 180) / Math.PI : 0;
    const depth = Math.max(0, here.depth + (here.onBottom ? (noise() - 0.5) * 0.3 : 0));
    const fix = fromLocalEN(track.datum, { eastM: here.at.east + (noise() - 0.5) * 0.4, northM: here.at.north + (noise() - 0.5) * 0.4 });
    const cells = [
      new Date(t).toISOString(),
      round(depth, 2),
      round(pressureFromDepth(depth, track.datum.lat), 2),
      round(fix.lat, 7),
      round(fix.lon, 7),
      round((heading + 360) % 360, 1),
      here.onBottom ? round(2.2 + 1.4 * Math.sin(t / 90_000) + noise() * 0.3, 2) : '',
      here.inWater ? round(10.72 + 6.6 * Math.exp(-depth / 110) + (noise() - 0.5) * 0.02, 3) : '',
      here.inWater ? round(35.62 + 0.42 * Math.exp(-depth / 200) + (noise() - 0.5) * 0.01, 3) : '',
    ];
    lines.push(cells.join(','));
  }
  return `${lines.join('\n')}\n`;
}

type Colleague = 'biologist' | 'archaeologist';
type Subject = { text: string; tags: string[] };

/** What each colleague notices, and where: every pairing makes a title of its own. */
const subjects: Record<Colleague, { kind: ObservationKind; what: Subject[]; where: Subject[]; notes: string[] }> = {
  biologist: {
    kind: 'biology',
    what: [
      { text: 'Squat lobster', tags: ['crustacean'] },
      { text: 'Brittle star cluster', tags: ['echinoderm'] },
      { text: 'Young conger', tags: ['fish'] },
      { text: 'Rosefish', tags: ['fish'] },
      { text: 'Vase sponge', tags: ['sponge'] },
      { text: 'Small coral colony', tags: ['coral'] },
      { text: 'Patch of white mat', tags: ['microbial-mat'] },
      { text: 'Rust-coloured drip', tags: ['concretion'] },
      { text: 'Forkbeard', tags: ['fish'] },
      { text: 'Pencil urchin', tags: ['echinoderm'] },
      { text: 'Hermit crab', tags: ['crustacean'] },
      { text: 'Pale anemone', tags: [] },
      { text: 'Cup corals', tags: ['coral'] },
      { text: 'Grenadier', tags: ['fish'] },
      { text: 'Orange sea star', tags: ['echinoderm'] },
      { text: 'Red shrimp', tags: ['crustacean'] },
    ],
    where: [
      { text: 'on the port frames', tags: ['hull'] },
      { text: 'by the sternpost', tags: ['stern'] },
      { text: 'at the foot of the cargo mound', tags: ['cargo'] },
      { text: 'on a toppled amphora', tags: ['amphora'] },
      { text: 'under the bow fittings', tags: ['hull'] },
      { text: 'beside the keel', tags: ['hull'] },
      { text: 'on the starboard quarter', tags: ['stern'] },
      { text: 'in the scour pit aft', tags: ['sediment'] },
      { text: 'on the sediment apron', tags: ['sediment'] },
      { text: 'on the stern rail', tags: ['stern'] },
      { text: 'among the ballast stones', tags: ['ballast'] },
      { text: 'inside a broken jar', tags: ['amphora'] },
    ],
    notes: [
      'Seen on the forward camera, about {size} cm.',
      'Moved off slowly when the lamps came close.',
      'Still there on the second pass; frame grab taken.',
      'Two more just out of frame.',
      'Worth a closer look on the way back.',
      'Did not react to the thrusters.',
    ],
  },
  archaeologist: {
    kind: 'archaeology',
    what: [
      { text: 'Amphora rim', tags: ['amphora'] },
      { text: 'Coarse ware sherd', tags: ['coarse-ware'] },
      { text: 'Jar shoulder', tags: ['amphora', 'cargo'] },
      { text: 'Frame end', tags: ['hull', 'timber'] },
      { text: 'Row of treenails', tags: ['hull', 'timber'] },
      { text: 'Ballast cobble', tags: ['ballast'] },
      { text: 'Copper-alloy nail', tags: ['hull'] },
      { text: 'Lead sheet offcut', tags: ['hull'] },
      { text: 'Clay stopper', tags: ['amphora'] },
      { text: 'Plank seam', tags: ['hull', 'timber'] },
      { text: 'Bowl fragment', tags: ['coarse-ware'] },
      { text: 'Iron concretion', tags: ['concretion'] },
      { text: 'Amphora toe', tags: ['amphora'] },
    ],
    where: [
      { text: 'at the north edge of the mound', tags: ['cargo'] },
      { text: 'under the collapsed frames', tags: ['hull'] },
      { text: 'off the starboard quarter', tags: ['stern'] },
      { text: 'beside the keel', tags: ['hull'] },
      { text: 'near the mast step', tags: ['hull'] },
      { text: 'at the foot of the stem', tags: ['hull'] },
      { text: 'in the scour pit aft', tags: ['sediment'] },
      { text: 'half buried west of the mound', tags: ['sediment'] },
      { text: 'on top of the cargo', tags: ['cargo'] },
      { text: 'by the rudder fitting', tags: ['stern'] },
      { text: 'on the port side', tags: ['hull'] },
      { text: 'under the amphora stack', tags: ['amphora'] },
    ],
    notes: [
      'About {size} cm visible; left in situ.',
      'Position noted on the site plan for the mosaic.',
      'Partly silted; the thruster wash uncovered it.',
      'Same fabric as the bowls amidships.',
      'Edges worn smooth, so exposed for a long time.',
      'Photographed with the laser scaler in frame.',
    ],
  },
};

/** Every title a colleague could give, in an order drawn once per dive. */
function titleOrder(who: Colleague, rand: () => number): { title: string; tags: string[] }[] {
  const { what, where } = subjects[who];
  const all = what.flatMap((w) => where.map((p) => ({ title: `${w.text} ${p.text}`, tags: [...new Set([...w.tags, ...p.tags])] })));
  for (let i = all.length - 1; i > 0; i--) {
    const j = Math.floor(rand() * (i + 1));
    [all[i], all[j]] = [all[j]!, all[i]!];
  }
  return all;
}

/**
 * Starts the simulator when the demo and its live dive are on (off otherwise, and so off in tests
 * unless a test asks for it). Resolves once the dive is under way and its log reaches now.
 */
export async function startDemoLive(deps: Deps, options: DemoLiveOptions = {}): Promise<DemoLive> {
  const { env, db, live, log } = deps;
  if (!env.BATHYNOTE_DEMO || !env.BATHYNOTE_DEMO_LIVE) return inactive;
  const clock = options.clock ?? systemClock;
  const rand = options.random ?? Math.random;
  const minWait = options.minWaitMs ?? 20_000;
  const maxWait = options.maxWaitMs ?? 60_000;

  const campaign = db.select().from(s.campaigns).where(eq(s.campaigns.name, DEMO_LIVE_CAMPAIGN)).get();
  const idOf = (email: string) => db.select({ id: s.user.id }).from(s.user).where(eq(s.user.email, email)).get()?.id;
  const people = {
    pilot: idOf('pilot@bathynote.test'),
    biologist: idOf('biologist@bathynote.test'),
    archaeologist: idOf('archaeologist@bathynote.test'),
  };
  if (!campaign || !people.pilot || !people.biologist || !people.archaeologist) {
    log.info('demo dive under way not started: the demo campaign or its people are missing');
    return inactive;
  }
  const ids = { pilot: people.pilot, biologist: people.biologist, archaeologist: people.archaeologist };
  const datum = { lat: campaign.datumLat, lon: campaign.datumLon };
  const workDir = mkdtempSync(path.join(tmpdir(), 'bathynote-demo-live-'));
  let files = 0;

  const lastSampleOf = (diveId: string): number | null =>
    db.$client.prepare('select max(t) from telemetry_samples where dive_id = ?').pluck().get(diveId) as number | null;

  /** Adds the log from `from` to `to` through the import, as a pilot would upload it. */
  const appendLog = async (dive: { id: string; number: string }, track: Track, from: number, to: number, offBottom: number | null) => {
    if (to < from) return;
    const file = path.join(workDir, `log-${++files}.csv`);
    writeFileSync(file, logCsv(track, from, to, offBottom, rand));
    try {
      await importTelemetryLog(db, live, {
        diveId: dive.id,
        userId: ids.pilot,
        filePath: file,
        fileName: logName(dive.number),
        fields: { mode: 'append' },
      });
    } finally {
      rmSync(file, { force: true });
    }
  };

  const trackOf = (dive: typeof s.dives.$inferSelect): Track | null =>
    dive.launchAt && dive.onBottomAt
      ? {
          launch: dive.launchAt.getTime(),
          onBottom: dive.onBottomAt.getTime(),
          bottom: ((dive.onBottomAt.getTime() - dive.launchAt.getTime()) / 60_000) * DESCENT_M_PER_MIN,
          datum,
          seed: hashOf(dive.id),
        }
      : null;

  /** A dive the simulator launched that is not yet on deck (the newest, if several). */
  const ownDiveUnderWay = () =>
    db
      .selectDistinct({ dive: s.dives })
      .from(s.dives)
      .innerJoin(s.telemetryImports, eq(s.telemetryImports.diveId, s.dives.id))
      .where(
        and(
          eq(s.dives.campaignId, campaign.id),
          isNotNull(s.dives.launchAt),
          isNotNull(s.dives.onBottomAt),
          isNull(s.dives.onDeckAt),
          like(s.telemetryImports.fileName, LIVE_LOG_PATTERN),
        ),
      )
      .orderBy(desc(s.dives.launchAt))
      .get()?.dive;

  /** Brings a dive left behind when the server stopped up to the surface, as the pilot would have. */
  const finish = async (dive: typeof s.dives.$inferSelect, track: Track) => {
    const offBottom = Math.max(lastSampleOf(dive.id) ?? track.onBottom, track.onBottom);
    const onDeck = offBottom + (track.bottom / ASCENT_M_PER_MIN) * 60_000;
    await appendLog(dive, track, offBottom + SAMPLE_MS, onDeck + MARGIN_MS, offBottom);
    setPhase(db, live, dive.id, { phase: 'off-bottom', at: new Date(offBottom).toISOString() }, new Date(clock.now()));
    const digests = { publicUrl: env.PUBLIC_URL, secret: env.AUTH_SECRET };
    setPhase(db, live, dive.id, { phase: 'on-deck', at: new Date(onDeck).toISOString() }, new Date(clock.now()), (tx, d) =>
      queueDigests(tx, digests, d.campaignId, { trigger: 'after-dive', diveId: d.id }),
    );
    deps.mail.kick();
    log.info('demo dive brought on deck', { dive: dive.number });
  };

  /** The next free number of the campaign's VS-nn series. */
  const nextNumber = () => {
    const taken = new Set(
      db
        .select({ n: s.dives.number })
        .from(s.dives)
        .where(eq(s.dives.campaignId, campaign.id))
        .all()
        .map((d) => d.n),
    );
    let n = 1;
    for (const number of taken) {
      const m = /^VS-(\d+)$/.exec(number);
      if (m) n = Math.max(n, Number(m[1]) + 1);
    }
    while (taken.has(`VS-${String(n).padStart(2, '0')}`)) n++;
    return `VS-${String(n).padStart(2, '0')}`;
  };

  const logEntry = async (
    diveId: string,
    who: Colleague | 'pilot',
    title: string,
    kind: ObservationKind,
    tags: string[],
    note: string,
    at: number,
  ) => {
    const input = observationCreateSchema.parse({ kind, title, note, tags, observedAt: new Date(at).toISOString() });
    // The same path as an entry sent from the app: its group commit, its live event, its search triggers.
    await live.inGroupCommit(() =>
      createObservation(db, live, { diveId, campaignId: campaign.id, authorId: ids[who] }, input, new Date(clock.now())),
    );
  };

  const used = new Set(
    db
      .select({ title: s.observations.title })
      .from(s.observations)
      .where(eq(s.observations.campaignId, campaign.id))
      .all()
      .map((o) => o.title),
  );
  const orders: Record<Colleague, { title: string; tags: string[] }[]> = {
    biologist: titleOrder('biologist', rand),
    archaeologist: titleOrder('archaeologist', rand),
  };
  /** The next title of a colleague not yet used in the campaign; once all are, they come round again as a later look. */
  const nextTitle = (who: Colleague) => {
    for (let round = 1; ; round++) {
      for (const t of orders[who]) {
        const title = round === 1 ? t.title : `${t.title} (look ${round})`;
        if (!used.has(title)) {
          used.add(title);
          return { title, tags: t.tags };
        }
      }
    }
  };

  let turn = rand() < 0.5 ? 0 : 1;
  /** One colleague's entry about what the vehicle sees at `at`, written a few seconds later. */
  const colleagueEntry = async (diveId: string, at: number) => {
    // Mostly they take turns; now and then the same person logs twice in a row.
    turn = rand() < 0.8 ? 1 - turn : turn;
    const who: Colleague = turn === 0 ? 'biologist' : 'archaeologist';
    const { title, tags } = nextTitle(who);
    const notes = subjects[who].notes;
    const note = notes[Math.floor(rand() * notes.length)]!.replace('{size}', String(5 + Math.floor(rand() * 40)));
    await logEntry(diveId, who, title, subjects[who].kind, tags, note, at);
  };

  /** Launches a new dive that has been down for a while: on the bottom, with its log up to now. */
  const launch = async () => {
    const now = clock.now();
    const launchAt = Math.floor((now - LAUNCHED_AGO_MS) / 1000) * 1000;
    const bottom = Math.round(588 + rand() * 20);
    const onBottomAt = launchAt + Math.round((bottom / DESCENT_M_PER_MIN) * 60) * 1000;
    const number = nextNumber();
    const created = createDive(db, live, campaign.id, {
      number,
      objectives: 'Live demo dive: a second look along the port side and the cargo mound.',
      plannedMaxDepth: Math.ceil((bottom + 30) / 10) * 10,
      plannedStartAt: new Date(launchAt).toISOString(),
    });
    setPhase(db, live, created.id, { phase: 'launch', at: new Date(launchAt).toISOString() }, new Date(now));
    setPhase(db, live, created.id, { phase: 'on-bottom', at: new Date(onBottomAt).toISOString() }, new Date(now));
    const dive = db.select().from(s.dives).where(eq(s.dives.id, created.id)).get()!;
    const track = trackOf(dive)!;
    await appendLog(dive, track, launchAt - MARGIN_MS, Math.floor(now / 1000) * 1000, null);
    await logEntry(
      dive.id,
      'pilot',
      `${number} launched, all lamps and cameras on`,
      'operations',
      ['equipment'],
      'Clear of the ship at the stern; descending.',
      launchAt + 30_000,
    );
    await logEntry(
      dive.id,
      'pilot',
      `${number} on bottom near the port side`,
      'operations',
      ['equipment'],
      'Seabed in sight; heading for the cargo mound.',
      onBottomAt + 20_000,
    );
    // The work of the bottom time so far: an entry every few minutes.
    for (let at = onBottomAt + 2 * 60_000; at < now - 60_000; at += 3 * 60_000 + Math.floor(rand() * 3 * 60_000)) {
      await colleagueEntry(dive.id, at);
    }
    log.info('demo dive launched', { dive: number });
    return dive;
  };

  // The dive to carry on: the simulator's own, unless it was left too long, then a new one.
  let dive = ownDiveUnderWay();
  if (dive) {
    const track = trackOf(dive)!;
    const last = lastSampleOf(dive.id) ?? track.launch;
    if (clock.now() - last > STALE_MS) {
      await finish(dive, track);
      dive = undefined;
    }
  }
  dive ??= await launch();
  const current = { id: dive.id, number: dive.number };
  const track = trackOf(dive)!;

  // Anything missed since the last sample (a quick restart) is filled in before the first entry.
  await appendLog(
    current,
    track,
    (lastSampleOf(current.id) ?? track.launch - MARGIN_MS) + SAMPLE_MS,
    Math.floor(clock.now() / 1000) * 1000,
    null,
  );

  let stopped = false;
  let timer: unknown = null;
  let inProgress: Promise<void> = Promise.resolve();

  const step = async () => {
    const stillUnderWay = db
      .select({ onDeckAt: s.dives.onDeckAt, offBottomAt: s.dives.offBottomAt })
      .from(s.dives)
      .where(eq(s.dives.id, current.id))
      .get();
    if (!stillUnderWay || stillUnderWay.onDeckAt || stillUnderWay.offBottomAt) {
      // Someone brought the dive up: the simulator leaves it alone from here on.
      stopped = true;
      log.info('demo dive under way ended by hand; the simulator stops', { dive: current.number });
      return;
    }
    const now = clock.now();
    const last = lastSampleOf(current.id) ?? track.launch - MARGIN_MS;
    await appendLog(current, track, last + SAMPLE_MS, Math.floor(now / 1000) * 1000, null);
    // Written a few seconds after it was seen.
    await colleagueEntry(current.id, now - 3000 - Math.floor(rand() * 15_000));
  };

  const schedule = () => {
    if (stopped) return;
    const wait = minWait + Math.floor(rand() * (maxWait - minWait + 1));
    timer = clock.setTimeout(() => {
      timer = null;
      inProgress = step()
        .catch((err: unknown) => log.error('demo dive step failed', { error: err instanceof Error ? err.message : String(err) }))
        .finally(schedule);
    }, wait);
  };
  schedule();

  return {
    diveId: current.id,
    diveNumber: current.number,
    get running() {
      return !stopped;
    },
    idle: () => inProgress,
    stop: async () => {
      stopped = true;
      if (timer !== null) clock.clearTimeout(timer);
      timer = null;
      await inProgress;
      rmSync(workDir, { recursive: true, force: true });
    },
  };
}
