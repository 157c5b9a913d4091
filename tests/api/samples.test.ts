import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { compareSampleNumbers } from '@/lib/sample-numbers';
import { observationDetailSchema, observationPageSchema, observationSchema, type Observation } from '@/lib/schemas';
import { emails } from '../helpers/demo';
import { buildFixtures, type Fixtures } from '../helpers/fixtures';
import { startTestServer, type TestServer } from '../helpers/test-server';

let t: TestServer;
let ids: Fixtures;

beforeAll(async () => {
  t = await startTestServer();
  ids = await buildFixtures(t);
});
afterAll(() => t.close());

async function log(diveId: string, kind: Observation['kind'], title: string): Promise<Observation> {
  const res = await (await t.signIn(emails.biologist)).post(`/api/dives/${diveId}/observations`).send({ kind, title });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return observationSchema.parse(res.body);
}

async function putSample(id: string, body: Record<string, unknown>, by: keyof typeof emails = 'biologist') {
  return (await t.signIn(emails[by])).put(`/api/observations/${id}/sample`).send(body);
}

describe('the sample register', () => {
  it('records a sample on a biology entry and answers it on the entry, its detail and the dive log', async () => {
    const o = await log(ids.dive, 'biology', 'Sponge fragment');
    expect(o.sample).toBeNull();
    const res = await putSample(o.id, {
      sampleNumber: 'S-001',
      sampleType: 'biological',
      gear: 'suction sampler',
      container: 'biobox 3',
      preservation: '96 % ethanol',
      lab: 'Shore lab, invertebrates',
    });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const detail = observationDetailSchema.parse(res.body);
    expect(detail.sample).toEqual({
      sampleNumber: 'S-001',
      sampleType: 'biological',
      gear: 'suction sampler',
      container: 'biobox 3',
      preservation: '96 % ethanol',
      parentSampleNumber: null,
      lab: 'Shore lab, invertebrates',
    });
    expect(detail.version).toBe(o.version + 1);

    const list = await (await t.signIn(emails.guest)).get(`/api/dives/${ids.dive}/observations`);
    expect(list.status).toBe(200);
    const item = observationPageSchema.parse(list.body).items.find((i) => i.id === o.id);
    expect(item?.sample?.sampleNumber).toBe('S-001');
  });

  it('refuses a number already used in the campaign with 409 naming the next free one, whatever its case', async () => {
    const first = await log(ids.dive, 'environment', 'Sediment core');
    expect((await putSample(first.id, { sampleNumber: 'S-009', sampleType: 'sediment' })).status).toBe(200);
    const o = await log(ids.dive, 'biology', 'Second sponge');
    const res = await putSample(o.id, { sampleNumber: 's-009', sampleType: 'biological' });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('duplicate_sample_number');
    // S-001 and S-009 are taken: one more than the highest, at the same width.
    expect(res.body.error.message).toContain('S-010');
    // Saving the same entry again with its own number is a correction, not a clash.
    expect((await putSample(first.id, { sampleNumber: 'S-009', sampleType: 'sediment', gear: 'push core' })).status).toBe(200);
  });

  it('lets another campaign use the same number', async () => {
    const o = await log(ids.otherDive, 'biology', 'Coral branch');
    expect((await putSample(o.id, { sampleNumber: 'S-001', sampleType: 'biological' })).status).toBe(200);
  });

  it('points a subsample at its parent, and refuses a missing parent or itself', async () => {
    const o = await log(ids.dive, 'biology', 'Sponge tissue for genetics');
    const missing = await putSample(o.id, { sampleNumber: 'S-001.1', sampleType: 'biological', parentSampleNumber: 'S-404' });
    expect(missing.status).toBe(400);
    expect(missing.body.error.issues[0].path).toBe('parentSampleNumber');
    const itself = await putSample(o.id, { sampleNumber: 'S-001.1', sampleType: 'biological', parentSampleNumber: 'S-001.1' });
    expect(itself.status).toBe(400);
    const res = await putSample(o.id, {
      sampleNumber: 'S-001.1',
      sampleType: 'biological',
      parentSampleNumber: 'S-001',
      preservation: 'RNA stabiliser',
    });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.sample.parentSampleNumber).toBe('S-001');

    // A subsample numbered past the last whole sample does not move the next proposal on.
    const late = await log(ids.dive, 'biology', 'Sponge tissue, second cut');
    expect((await putSample(late.id, { sampleNumber: 'S-900', sampleType: 'biological', parentSampleNumber: 'S-001' })).status).toBe(200);
    const clash = await putSample(late.id, { sampleNumber: 'S-001', sampleType: 'biological' });
    expect(clash.status).toBe(409);
    expect(clash.body.error.message).toContain('S-010');
  });

  it('keeps a custody trail for a registered sample without any tag', async () => {
    const o = await log(ids.dive, 'environment', 'Water at the mat');
    const before = await (
      await t.signIn(emails.biologist)
    )
      .post(`/api/observations/${o.id}/custody`)
      .send({ holder: 'Cleo Varga', since: '2026-05-13T23:20:00.000Z', location: 'Wet lab' });
    expect(before.status).toBe(409);
    expect(before.body.error.code).toBe('not_in_custody');
    expect((await putSample(o.id, { sampleNumber: 'S-020', sampleType: 'water', gear: 'water bottle' })).status).toBe(200);
    const res = await (
      await t.signIn(emails.biologist)
    )
      .post(`/api/observations/${o.id}/custody`)
      .send({ holder: 'Cleo Varga', since: '2026-05-13T23:20:00.000Z', location: 'Wet lab', container: 'bottle 2' });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.custody).toHaveLength(1);
  });

  it('carries samples on biology and environment entries only, and checks the body', async () => {
    const o = await log(ids.dive, 'archaeology', 'Amphora handle');
    const res = await putSample(o.id, { sampleNumber: 'S-050', sampleType: 'concretion' });
    expect(res.status).toBe(400);
    expect(res.body.error.issues[0].path).toBe('kind');
    const bio = await log(ids.dive, 'biology', 'Anemone');
    expect((await putSample(bio.id, { sampleNumber: 'S-051', sampleType: 'plankton' })).status).toBe(400);
    expect((await putSample(bio.id, { sampleType: 'biological' })).status).toBe(400);
    expect((await putSample(bio.id, { sampleNumber: 'S 051', sampleType: 'biological' })).status).toBe(400);
  });

  it('refuses a stale version when one is sent', async () => {
    const o = await log(ids.dive, 'biology', 'Brittle star');
    const res = await putSample(o.id, { version: o.version + 5, sampleNumber: 'S-060', sampleType: 'biological' });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('stale_version');
  });

  it('lets a lead record a sample on someone else’s entry, but not another scientist', async () => {
    const o = await log(ids.dive, 'biology', 'Sea pen');
    expect((await putSample(o.id, { sampleNumber: 'S-070', sampleType: 'biological' }, 'lead')).status).toBe(200);
    const other = await putSample(o.id, { sampleNumber: 'S-071', sampleType: 'biological' }, 'archaeologist');
    expect(other.status).toBe(403);
  });
});

describe('natural order of sample numbers', () => {
  it('compares runs of digits as numbers', () => {
    const sorted = ['S-10', 'S-2', 's-1', 'S-10.2', 'S-10.10', 'S-9'].sort(compareSampleNumbers);
    expect(sorted).toEqual(['s-1', 'S-2', 'S-9', 'S-10', 'S-10.2', 'S-10.10']);
  });
});
