import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { observationSchema, reportSchema, type Observation, type Report } from '@/lib/schemas';
import { emails } from '../helpers/demo';
import { buildFixtures, fixtureEntries, type Fixtures } from '../helpers/fixtures';
import { startTestServer, type TestServer } from '../helpers/test-server';

let t: TestServer;
let ids: Fixtures;
let late: string;
let fault: Observation;
let amphora: Observation;

beforeAll(async () => {
  t = await startTestServer();
  ids = await buildFixtures(t, { telemetry: true });
  const lead = await t.signIn(emails.lead);
  const biologist = await t.signIn(emails.biologist);
  const archaeologist = await t.signIn(emails.archaeologist);

  // Launched at 23:30 UTC on the 13th, which is 00:30 on the 14th in Lisbon (WEST, UTC+1): the
  // campaign's display zone puts it on the 14th.
  const dive = await lead.post(`/api/campaigns/${ids.campaign}/dives`).send({ number: 'T-02', plannedStartAt: '2026-05-13T23:30:00.000Z' });
  expect(dive.status, JSON.stringify(dive.body)).toBe(201);
  late = dive.body.id as string;
  const logged = await lead
    .post(`/api/dives/${late}/observations`)
    .send({ kind: 'operations', title: 'Thruster 3 tripped', tags: ['fault'] });
  expect(logged.status, JSON.stringify(logged.body)).toBe(201);
  fault = observationSchema.parse(logged.body);

  const entries = await biologist.get(`/api/dives/${ids.dive}/observations?limit=200`);
  const items = (entries.body as { items: Observation[] }).items;
  amphora = items.find((o) => o.title === 'Amphora on its side')!;
  const find = await archaeologist
    .put(`/api/observations/${amphora.id}/find`)
    .send({ version: amphora.version, findNumber: 'TF-001', objectType: 'amphora', material: 'ceramic', state: 'recovered' });
  expect(find.status, JSON.stringify(find.body)).toBe(200);
  const custody = await archaeologist
    .post(`/api/observations/${amphora.id}/custody`)
    .send({ holder: 'Conservation lab', since: '2026-05-13T23:30:00.000Z', location: 'Wet lab, tank 2' });
  expect(custody.status, JSON.stringify(custody.body)).toBe(201);
  const core = items.find((o) => o.title === 'Push core of the mat')!;
  const sample = await biologist.put(`/api/observations/${core.id}/sample`).send({ sampleNumber: 'TS-001', sampleType: 'sediment' });
  expect(sample.status, JSON.stringify(sample.body)).toBe(200);

  const plan = await lead.put(`/api/campaigns/${ids.campaign}/watches`).send({
    watches: [
      { name: 'Morning', start: '08:00', end: '20:00', memberIds: [ids.userId(emails.biologist)] },
      { name: 'Night', start: '20:00', end: '08:00', memberIds: [ids.userId(emails.archaeologist)] },
    ],
  });
  expect(plan.status, JSON.stringify(plan.body)).toBe(200);
});
afterAll(() => t.close());

async function report(path: string, who: keyof typeof emails = 'guest'): Promise<Report> {
  const res = await (await t.signIn(emails[who])).get(path);
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return reportSchema.parse(res.body);
}

describe('a dive report', () => {
  it('carries the header from the campaign and the dive, and its day in the display zone', async () => {
    const r = await report(`/api/dives/${ids.dive}/report`);
    expect(r.scope).toBe('dive');
    expect(r.header).toMatchObject({ campaign: ids.campaignName, site: 'Test site', timeZone: 'Europe/Lisbon', permit: null });
    expect(r.date).toBe('2026-05-13');
    expect(r.dives).toHaveLength(1);
    expect(r.dives[0]!.dive.number).toBe('T-01');
  });

  it('lists every live entry once, by kind in the contract order, with statistics from the log', async () => {
    const [part] = (await report(`/api/dives/${ids.dive}/report`)).dives;
    expect(part!.entries.map((g) => g.kind)).toEqual(['biology', 'archaeology', 'environment', 'operations']);
    const titles = part!.entries.flatMap((g) => g.items.map((i) => i.title));
    expect(titles.sort()).toEqual(fixtureEntries.map((e) => e.body.title).sort());
    for (const g of part!.entries) expect(g.items.every((i) => i.kind === g.kind)).toBe(true);
    expect(part!.summary.maxDepthSource).toBe('telemetry');
    expect(part!.entries.flatMap((g) => g.items).every((i) => i.photo === null)).toBe(true);
  });

  it('gives finds their state and custody, samples their custody, and the taxa seen', async () => {
    const [part] = (await report(`/api/dives/${ids.dive}/report`)).dives;
    expect(part!.finds).toEqual([
      expect.objectContaining({
        findNumber: 'TF-001',
        state: 'recovered',
        custodySteps: 1,
        heldBy: 'Conservation lab',
        location: 'Wet lab, tank 2',
      }),
    ]);
    expect(part!.samples).toEqual([expect.objectContaining({ sampleNumber: 'TS-001', custodySteps: 0, noCustodySinceRecovery: true })]);
    expect(part!.taxa.map((x) => x.scientificName)).toEqual(['Madrepora oculata']);
    expect(part!.operations.map((o) => o.title)).toEqual(['Mosaic line started', 'Holding station for the survey', 'Laser scaler checked']);
    expect(part!.operations.every((o) => !o.fault)).toBe(true);
  });

  it('names who stood watch from launch to on deck', async () => {
    // Launch 18:40 and on deck 00:05 Lisbon time: the Morning watch's end and the Night watch.
    const r = await report(`/api/dives/${ids.dive}/report`);
    expect(r.watches.map((w) => [w.watch, w.start, w.end])).toEqual([
      ['Morning', '2026-05-13T07:00:00.000Z', '2026-05-13T19:00:00.000Z'],
      ['Night', '2026-05-13T19:00:00.000Z', '2026-05-14T07:00:00.000Z'],
    ]);
    expect(r.watches[1]!.members.map((m) => m.id)).toEqual([ids.userId(emails.archaeologist)]);
  });

  it('marks an operations entry tagged as a fault', async () => {
    const r = await report(`/api/dives/${late}/report`);
    expect(r.date).toBe('2026-05-14');
    expect(r.dives[0]!.operations).toEqual([expect.objectContaining({ id: fault.id, fault: true })]);
  });

  it('is hidden from people outside the campaign', async () => {
    const res = await (await t.signIn(emails.guest)).get(`/api/dives/${ids.otherDive}/report`);
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not_found');
  });
});

describe('a day report', () => {
  it('gathers the dives of the day in the display zone, not in UTC', async () => {
    const on13 = await report(`/api/campaigns/${ids.campaign}/reports/2026-05-13`);
    expect(on13.scope).toBe('day');
    expect(on13.dives.map((d) => d.dive.number)).toEqual(['T-01']);
    const on14 = await report(`/api/campaigns/${ids.campaign}/reports/2026-05-14`);
    expect(on14.dives.map((d) => d.dive.number)).toEqual(['T-02']);
  });

  it('covers the watches from midnight to midnight in the display zone', async () => {
    const r = await report(`/api/campaigns/${ids.campaign}/reports/2026-05-13`);
    expect(r.watches.map((w) => w.watch)).toEqual(['Night', 'Morning', 'Night']);
    expect(r.watches[0]!.end).toBe('2026-05-13T07:00:00.000Z');
  });

  it('takes the day whole on the day the clocks go forward', async () => {
    // Lisbon moves from WET (UTC+0) to WEST (UTC+1) at 01:00 UTC on 29 March 2026 (EU rule: last
    // Sunday of March, Directive 2000/84/EC), so that day is 23 hours long.
    const r = await report(`/api/campaigns/${ids.campaign}/reports/2026-03-29`);
    expect(r.watches.map((w) => [w.watch, w.start, w.end])).toEqual([
      ['Night', '2026-03-28T20:00:00.000Z', '2026-03-29T07:00:00.000Z'],
      ['Morning', '2026-03-29T07:00:00.000Z', '2026-03-29T19:00:00.000Z'],
      ['Night', '2026-03-29T19:00:00.000Z', '2026-03-30T07:00:00.000Z'],
    ]);
  });

  it('answers an empty day with no dives rather than an error', async () => {
    const r = await report(`/api/campaigns/${ids.campaign}/reports/2026-06-01`);
    expect(r.dives).toEqual([]);
  });

  it('refuses a date that is not on the calendar with a field issue', async () => {
    const lead = await t.signIn(emails.lead);
    for (const bad of ['2026-02-30', '13-05-2026', 'today']) {
      const res = await lead.get(`/api/campaigns/${ids.campaign}/reports/${bad}`);
      expect(res.status, bad).toBe(400);
      expect(res.body.error.issues[0].path).toBe('date');
    }
  });

  it('is hidden from people outside the campaign', async () => {
    const res = await (await t.signIn(emails.guest)).get(`/api/campaigns/${ids.otherCampaign}/reports/2026-05-13`);
    expect(res.status).toBe(404);
  });
});
