/**
 * The invented demo: its entries each have a title of their own within a campaign, and its dive
 * under way (the simulator `npm start` runs) logs entries through the same path as the app, grows
 * the dive's telemetry, and stops cleanly. The simulator runs on a hand-moved clock here.
 */
import { rmSync } from 'node:fs';
import path from 'node:path';

import Database from 'better-sqlite3';

import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { random } from '@/db/seed-random';
import { observationPageSchema, searchPageSchema, telemetrySamplesSchema } from '@/lib/schemas';
import type { AppContext } from '@/server/context';
import { loadEnv } from '@/server/env';
import { startDemoLive, type DemoClock, type DemoLive } from '@/server/services/demo-live';
import type { LiveEvent } from '@/server/services/live';

import { demoIds, emails } from '../helpers/demo';
import { startServerProcess } from '../helpers/server-process';
import { startTestServer, type TestServer } from '../helpers/test-server';

let t: TestServer;
let ids: ReturnType<typeof demoIds>;

beforeAll(async () => {
  t = await startTestServer();
  ids = demoIds(t.ctx.db);
});
afterAll(async () => {
  await t.close();
});

/** A clock whose timers run only when the test moves time to them. */
function handClock(start: number) {
  let now = start;
  let next = 1;
  const timers = new Map<number, { at: number; run: () => void }>();
  const clock: DemoClock & { pending: () => number; fireNext: () => number; advance: (ms: number) => void } = {
    now: () => now,
    setTimeout: (run, ms) => {
      const id = next++;
      timers.set(id, { at: now + ms, run });
      return id;
    },
    clearTimeout: (handle) => void timers.delete(handle as number),
    pending: () => timers.size,
    /** Moves time to the earliest timer and runs it; gives how long that was. */
    fireNext: () => {
      const [id, timer] = [...timers.entries()].sort((a, b) => a[1].at - b[1].at)[0]!;
      timers.delete(id);
      const waited = timer.at - now;
      now = timer.at;
      timer.run();
      return waited;
    },
    advance: (ms) => void (now += ms),
  };
  return clock;
}

const demoOn = (ctx: AppContext, live = true): AppContext => ({
  ...ctx,
  env: { ...ctx.env, BATHYNOTE_DEMO: true, BATHYNOTE_DEMO_LIVE: live },
});

const entryCount = () => (t.ctx.db.$client.prepare('select count(*) from observations').pluck().get() as number) ?? 0;

describe('the demo seed', () => {
  it('gives no two entries of a campaign the same title', () => {
    const perCampaign = t.ctx.db.$client
      .prepare(
        `select c.name as campaign, count(*) as entries, count(distinct o.title) as titles
           from observations o join campaigns c on c.id = o.campaign_id group by c.id order by c.name`,
      )
      .all() as { campaign: string; entries: number; titles: number }[];
    expect(perCampaign.map((c) => c.campaign)).toEqual(['Varn Shoal 2024', 'Varn Shoal 2026']);
    for (const c of perCampaign) {
      expect(c.entries, c.campaign).toBeGreaterThan(10);
      expect(c.titles, c.campaign).toBe(c.entries);
    }
  });
});

describe('the demo dive under way', () => {
  it('is off unless the demo and its live dive are both on', async () => {
    const base = {
      NODE_ENV: 'test' as const,
      DATABASE_PATH: path.join(t.dir, 'env.db'),
      AUTH_SECRET: 'a-secret-that-is-long-enough-for-the-check',
    };
    expect(loadEnv(base as NodeJS.ProcessEnv).BATHYNOTE_DEMO_LIVE).toBe(true);
    expect(loadEnv({ ...base, BATHYNOTE_DEMO_LIVE: '0' }).BATHYNOTE_DEMO_LIVE).toBe(false);
    const before = entryCount();
    const clock = handClock(Date.now());
    for (const ctx of [t.ctx, demoOn(t.ctx, false)]) {
      const sim = await startDemoLive(ctx, { clock });
      expect(sim.diveId).toBeNull();
      expect(sim.running).toBe(false);
      await sim.stop();
    }
    expect(clock.pending()).toBe(0);
    expect(entryCount()).toBe(before);
  });

  let sim: DemoLive;
  let clock: ReturnType<typeof handClock>;
  let diveId: string;
  const heard: LiveEvent[] = [];
  let unsubscribe: () => void;
  let titlesBefore: Set<string>;
  let entriesAtLaunch = 0;

  it('launches a dive of the 2026 campaign that is on the bottom, with its log up to now', async () => {
    titlesBefore = new Set(
      (t.ctx.db.$client.prepare('select title from observations where campaign_id = ?').pluck().all(ids.campaign2026) as string[]) ?? [],
    );
    clock = handClock(Date.now());
    sim = await startDemoLive(demoOn(t.ctx), { clock, random: random(7) });
    expect(sim.running).toBe(true);
    diveId = sim.diveId!;
    const lead = await t.signIn(emails.lead);
    const dive = (await lead.get(`/api/dives/${diveId}`)).body;
    expect(dive).toMatchObject({ campaignId: ids.campaign2026, number: 'VS-05' });
    expect(Date.parse(dive.phases.launch)).toBeLessThan(Date.parse(dive.phases.onBottom));
    expect(Date.parse(dive.phases.onBottom)).toBeLessThan(clock.now());
    expect(dive.phases.offBottom).toBeNull();
    const log = telemetrySamplesSchema.parse((await lead.get(`/api/dives/${diveId}/telemetry`)).body);
    expect(Date.parse(log.span!.lastAt)).toBe(Math.floor(clock.now() / 1000) * 1000);
    expect(log.gaps).toEqual([]);
    expect(log.imports[0]!.fileName).toBe('skerry-vs-05-live.csv');
    expect(clock.pending()).toBe(1);
    // The bottom time so far already has the colleagues' entries, every few minutes, each with the vehicle's depth.
    const so = observationPageSchema.parse((await lead.get(`/api/dives/${diveId}/observations`).query({ limit: 200 })).body).items;
    entriesAtLaunch = so.length;
    const colleagues = so.filter((o) => o.authorId !== ids.userId(emails.pilot));
    expect(colleagues.length).toBeGreaterThanOrEqual(6);
    expect(new Set(colleagues.map((o) => o.authorId)).size).toBe(2);
    for (const o of colleagues) expect(o.depth).toBeGreaterThan(500);
  });

  it('has two colleagues log an entry every 20–60 s, heard live, found by search, with the profile growing', async () => {
    unsubscribe = t.ctx.live.subscribeAll((e) => heard.push(e));
    const lead = await t.signIn(emails.lead);
    const samplesBefore = telemetrySamplesSchema.parse((await lead.get(`/api/dives/${diveId}/telemetry`)).body).sampleCount;
    const groupedBefore = t.ctx.live.groupCommits.changes;
    const steps = 8;
    for (let i = 0; i < steps; i++) {
      const waited = clock.fireNext();
      expect(waited).toBeGreaterThanOrEqual(20_000);
      expect(waited).toBeLessThanOrEqual(60_000);
      await sim.idle();
    }
    const created = heard
      .filter((e) => e.type === 'observation.created' && e.diveId === diveId)
      .map((e) => e.payload as { id: string; title: string; authorId: string; depth: number | null });
    expect(created).toHaveLength(steps);
    expect(t.ctx.live.groupCommits.changes - groupedBefore).toBe(steps);
    const authors = new Set(created.map((o) => o.authorId));
    expect(authors).toEqual(new Set([ids.userId(emails.biologist), ids.userId(emails.archaeologist)]));
    const titles = created.map((o) => o.title);
    expect(new Set(titles).size).toBe(steps);
    for (const title of titles) expect(titlesBefore.has(title), title).toBe(false);
    // Each entry was written after the log reached its time, so it carries the vehicle's depth.
    for (const o of created) expect(o.depth).toBeGreaterThan(500);

    const log = telemetrySamplesSchema.parse((await lead.get(`/api/dives/${diveId}/telemetry`)).body);
    expect(log.sampleCount).toBeGreaterThan(samplesBefore + steps * 19);
    expect(Date.parse(log.span!.lastAt)).toBe(Math.floor(clock.now() / 1000) * 1000);
    expect(log.gaps).toEqual([]);

    const found = searchPageSchema.parse((await lead.get('/api/search').query({ q: titles[0] })).body);
    expect(found.items.map((i) => i.id)).toContain(created[0]!.id);
    const page = observationPageSchema.parse((await lead.get(`/api/dives/${diveId}/observations`).query({ limit: 200 })).body);
    expect(page.items).toHaveLength(entriesAtLaunch + steps);
  });

  it('stops cleanly: the step in progress finishes, and nothing is written after', async () => {
    clock.fireNext();
    const stopping = sim.stop();
    await stopping;
    expect(sim.running).toBe(false);
    expect(clock.pending()).toBe(0);
    const after = entryCount();
    const events = heard.length;
    await new Promise((r) => setTimeout(r, 50));
    expect(entryCount()).toBe(after);
    expect(heard.length).toBe(events);
  });

  it('carries on the same dive after a quick restart, filling in the log it missed', async () => {
    clock.advance(5 * 60_000);
    const again = await startDemoLive(demoOn(t.ctx), { clock, random: random(8) });
    try {
      expect(again.diveId).toBe(diveId);
      const log = telemetrySamplesSchema.parse((await (await t.signIn(emails.lead)).get(`/api/dives/${diveId}/telemetry`)).body);
      expect(Date.parse(log.span!.lastAt)).toBe(Math.floor(clock.now() / 1000) * 1000);
      expect(log.gaps).toEqual([]);
    } finally {
      await again.stop();
    }
  });

  it('brings a dive left for hours on deck and launches the next one', async () => {
    clock.advance(3 * 3_600_000);
    const next = await startDemoLive(demoOn(t.ctx), { clock, random: random(9) });
    try {
      expect(next.diveId).not.toBe(diveId);
      const lead = await t.signIn(emails.lead);
      const old = (await lead.get(`/api/dives/${diveId}`)).body;
      expect(old.phases.offBottom).not.toBeNull();
      expect(old.phases.onDeck).not.toBeNull();
      expect((await lead.get(`/api/dives/${next.diveId}`)).body).toMatchObject({ number: 'VS-06', phases: { onDeck: null } });
    } finally {
      await next.stop();
    }
  });

  it('leaves a dive alone once someone brings it up by hand', async () => {
    const sim = await startDemoLive(demoOn(t.ctx), { clock, random: random(10) });
    const pilot = await t.signIn(emails.pilot);
    expect(
      (await pilot.post(`/api/dives/${sim.diveId}/phases`).send({ phase: 'off-bottom', at: new Date(clock.now()).toISOString() })).status,
    ).toBe(200);
    const before = entryCount();
    clock.fireNext();
    await sim.idle();
    expect(sim.running).toBe(false);
    expect(clock.pending()).toBe(0);
    expect(entryCount()).toBe(before);
    await sim.stop();
    unsubscribe();
  });
});

describe('npm start with the demo', () => {
  it('has a dive under way, says how to turn it off, and stops it on SIGTERM', async () => {
    const server = await startServerProcess({ BATHYNOTE_DEMO_LIVE: '1', LOG_LEVEL: 'info' }, { keepDir: true });
    try {
      expect(server.output()).toContain('Dive VS-05 is under way');
      expect(server.output()).toContain('BATHYNOTE_DEMO_LIVE=0 turns it off');
    } finally {
      await server.stop();
    }
    try {
      expect(server.child.exitCode).toBe(0);
      const db = new Database(path.join(server.dir, 'bathynote.db'), { readonly: true });
      const dive = db.prepare("select launch_at, on_bottom_at, on_deck_at from dives where number = 'VS-05'").get() as {
        launch_at: number;
        on_bottom_at: number;
        on_deck_at: number | null;
      };
      const entries = db
        .prepare("select count(*) from observations o join dives d on d.id = o.dive_id where d.number = 'VS-05'")
        .pluck()
        .get();
      db.close();
      expect(dive.on_bottom_at).toBeGreaterThan(dive.launch_at);
      expect(dive.on_deck_at).toBeNull();
      expect(entries).toBeGreaterThan(6);
    } finally {
      rmSync(server.dir, { recursive: true, force: true });
    }
  });

  it('has none when BATHYNOTE_DEMO_LIVE=0', async () => {
    const server = await startServerProcess({ LOG_LEVEL: 'info' });
    try {
      expect(server.output()).toContain('Demo sign-ins');
      expect(server.output()).not.toContain('is under way');
    } finally {
      await server.stop();
    }
  });
});
