import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import {
  diveSchema,
  measurementListSchema,
  measurementSchema,
  observationDetailSchema,
  observationSchema,
  type Observation,
} from '@/lib/schemas';
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

let shade = 0;
/** A 400 × 300 PNG, a different one each time (the same file twice on one entry is kept once). */
async function png(): Promise<Buffer> {
  shade++;
  return sharp({ create: { width: 400, height: 300, channels: 3, background: { r: shade % 256, g: 60, b: 90 } } })
    .png()
    .toBuffer();
}

async function entryWithPhoto(kind: Observation['kind']): Promise<{ entry: Observation; photoId: string }> {
  const agent = await t.signIn(emails.biologist);
  const created = await agent.post(`/api/dives/${ids.dive}/observations`).send({ kind, title: 'Measured subject' });
  expect(created.status, JSON.stringify(created.body)).toBe(201);
  const entry = observationSchema.parse(created.body);
  const up = await agent
    .post(`/api/observations/${entry.id}/photos`)
    .attach('photo', await png(), { filename: 'frame.png', contentType: 'image/png' });
  expect(up.status).toBe(201);
  return { entry, photoId: up.body.photos[0].id as string };
}

// Laser dots 100 px apart at 10 cm spacing: 0.1 cm per pixel.
const bar = {
  spacingCm: 10,
  laser: [
    [100, 100],
    [200, 100],
  ],
  kind: 'length',
  points: [
    [50, 250],
    [350, 250],
  ],
};

const countRows = () => t.ctx.db.$client.prepare('select count(*) from photo_measurements').pluck().get() as number;

async function detail(id: string) {
  const res = await (await t.signIn(emails.lead)).get(`/api/observations/${id}`);
  expect(res.status).toBe(200);
  return observationDetailSchema.parse(res.body);
}

describe('measuring on a photo', () => {
  it('answers the length and its uncertainty, keeps it with the photo and the entry, and makes it the entry’s length', async () => {
    const { entry, photoId } = await entryWithPhoto('biology');
    const res = await (await t.signIn(emails.biologist)).post(`/api/photos/${photoId}/measurements`).send(bar);
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const m = measurementSchema.parse(res.body);
    expect(m.unit).toBe('cm');
    expect(m.value).toBeCloseTo(30, 9); // worked here: 300 px · 10 cm / 100 px
    expect(m.uncertainty).toBeCloseTo(0.4 * Math.sqrt(5), 6); // worked here: see tests/unit/laser-scale.test.ts
    expect(m.createdBy).toBe(ids.userId(emails.biologist));
    expect(m.createdAt).toMatch(/^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z$/);

    const after = await detail(entry.id);
    expect(after.sizes).toEqual([{ dimension: 'length', valueCm: 30, method: 'measured' }]);
    expect(after.version).toBe(entry.version + 1);

    const guest = await t.signIn(emails.guest);
    const onPhoto = measurementListSchema.parse((await guest.get(`/api/photos/${photoId}/measurements`)).body);
    expect(onPhoto.items.map((i) => i.id)).toEqual([m.id]);
    expect(onPhoto.items[0]!.createdByName).not.toBe('');
    const onEntry = measurementListSchema.parse((await guest.get(`/api/observations/${entry.id}/measurements`)).body);
    expect(onEntry.items.map((i) => i.id)).toEqual([m.id]);
  });

  it('answers an area in cm² and leaves a non-biology entry’s record alone', async () => {
    const { entry, photoId } = await entryWithPhoto('archaeology');
    const res = await (await t.signIn(emails.lead)).post(`/api/photos/${photoId}/measurements`).send({
      ...bar,
      kind: 'area',
      points: [
        [0, 0],
        [100, 0],
        [100, 100],
        [0, 100],
      ],
      placementPx: 1,
    });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.unit).toBe('cm²');
    expect(res.body.value).toBeCloseTo(100, 9); // worked here: 10000 px² · 0.01 cm²/px²
    expect(res.body.uncertainty).toBeCloseTo(Math.sqrt(10), 6); // worked here: 2√10 at ±2 px, halved at ±1 px
    const after = await detail(entry.id);
    expect(after.sizes).toEqual([]);
    expect(after.version).toBe(entry.version);
  });

  it('takes a finer placement, as points placed zoomed in are, into the uncertainty and keeps it', async () => {
    const { photoId } = await entryWithPhoto('archaeology');
    const res = await (await t.signIn(emails.biologist)).post(`/api/photos/${photoId}/measurements`).send({ ...bar, placementPx: 0.5 });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const m = measurementSchema.parse(res.body);
    expect(m.value).toBeCloseTo(30, 9);
    expect(m.uncertainty).toBeCloseTo(0.1 * Math.sqrt(5), 6); // worked here: 0.4√5 at ±2 px, a quarter at ±0.5 px
    expect(m.placementPx).toBe(0.5);
    const tooFine = await (
      await t.signIn(emails.biologist)
    )
      .post(`/api/photos/${photoId}/measurements`)
      .send({ ...bar, placementPx: 0.01 });
    expect(tooFine.status).toBe(400);
    expect(tooFine.body.error.issues[0].path).toBe('placementPx');
  });

  it('refuses callers who may not edit the entry, and hides it from outsiders; nothing is stored', async () => {
    const { photoId } = await entryWithPhoto('biology');
    const before = countRows();
    for (const who of ['guest', 'pilot', 'archaeologist', 'admin'] as const) {
      const res = await (await t.signIn(emails[who])).post(`/api/photos/${photoId}/measurements`).send(bar);
      expect(res.status, who).toBe(403);
      expect(res.body.error.code).toBe('forbidden');
    }
    const outsider = await (await t.signIn(emails.outsider)).post(`/api/photos/${photoId}/measurements`).send(bar);
    expect(outsider.status).toBe(404);
    expect((await (await t.signIn(emails.outsider)).get(`/api/photos/${photoId}/measurements`)).status).toBe(404);
    expect((await t.anonymous().post(`/api/photos/${photoId}/measurements`).send(bar)).status).toBe(401);
    expect(countRows()).toBe(before);
  });

  it('refuses bad input with 400 naming the field, and stores nothing', async () => {
    const { entry, photoId } = await entryWithPhoto('biology');
    const agent = await t.signIn(emails.biologist);
    const before = countRows();
    const cases: [Record<string, unknown>, string][] = [
      [
        {
          ...bar,
          laser: [
            [100, 100],
            [105, 104],
          ],
        },
        'laser',
      ], // 6.4 px apart
      [
        {
          ...bar,
          laser: [
            [100, 100],
            [100, 100],
          ],
        },
        'laser',
      ],
      [
        {
          ...bar,
          points: [
            [50, 250],
            [401, 250],
          ],
        },
        'points.1',
      ], // past the right edge of a 400 px photo
      [
        {
          ...bar,
          laser: [
            [100, -3],
            [200, 100],
          ],
        },
        'laser.0',
      ],
      [{ ...bar, kind: 'area' }, 'points'], // two points make no polygon
      [{ ...bar, points: [[50, 250]] }, 'points'],
      [{ ...bar, spacingCm: 0 }, 'spacingCm'],
      [{ ...bar, kind: 'volume' }, 'kind'],
      [{ ...bar, laser: [[100, 100]] }, 'laser'],
      [{ ...bar, value: 12 }, ''],
    ];
    for (const [body, path] of cases) {
      const res = await agent.post(`/api/photos/${photoId}/measurements`).send(body);
      expect(res.status, JSON.stringify(body)).toBe(400);
      expect(res.body.error.code).toBe('validation_failed');
      expect(typeof res.body.error.message).toBe('string');
      if (path) expect(res.body.error.issues.map((i: { path: string }) => i.path).join(' '), JSON.stringify(body)).toContain(path);
    }
    expect(countRows()).toBe(before);
    expect((await detail(entry.id)).sizes).toEqual([]);
  });

  it('lets the maker or a lead remove a measurement, and nobody else', async () => {
    const { photoId } = await entryWithPhoto('biology');
    const mine = (await (await t.signIn(emails.biologist)).post(`/api/photos/${photoId}/measurements`).send(bar)).body.id as string;
    const byLead = (await (await t.signIn(emails.lead)).post(`/api/photos/${photoId}/measurements`).send(bar)).body.id as string;
    expect((await (await t.signIn(emails.guest)).delete(`/api/measurements/${mine}`)).status).toBe(403);
    // The entry's author may edit it, but the lead's measurement is the lead's to remove.
    expect((await (await t.signIn(emails.biologist)).delete(`/api/measurements/${byLead}`)).status).toBe(403);
    expect((await (await t.signIn(emails.outsider)).delete(`/api/measurements/${mine}`)).status).toBe(404);
    expect((await (await t.signIn(emails.biologist)).delete(`/api/measurements/${mine}`)).status).toBe(204);
    expect((await (await t.signIn(emails.lead)).delete(`/api/measurements/${byLead}`)).status).toBe(204);
    expect((await (await t.signIn(emails.lead)).delete(`/api/measurements/${byLead}`)).status).toBe(404);
    const left = measurementListSchema.parse((await (await t.signIn(emails.lead)).get(`/api/photos/${photoId}/measurements`)).body);
    expect(left.items).toEqual([]);
  });

  it('answers 404 for a retired photo', async () => {
    const { photoId } = await entryWithPhoto('biology');
    const agent = await t.signIn(emails.biologist);
    expect((await agent.delete(`/api/photos/${photoId}`)).status).toBe(204);
    expect((await agent.post(`/api/photos/${photoId}/measurements`).send(bar)).status).toBe(404);
    expect((await agent.get(`/api/photos/${photoId}/measurements`)).status).toBe(404);
  });
});

describe('removing a measurement and the entry’s length', () => {
  /** A length on the bar, its ends `px` apart: `px` · 0.1 cm (worked here: 10 cm over 100 px). */
  const lengthOf = (px: number) => ({
    ...bar,
    points: [
      [50, 250],
      [50 + px, 250],
    ],
  });
  const sizesOf = async (id: string) => (await detail(id)).sizes;

  it('takes the length again from the latest measurement left, and clears it when none is left', async () => {
    const { entry, photoId } = await entryWithPhoto('biology');
    const bio = await t.signIn(emails.biologist);
    const post = async (px: number) =>
      measurementSchema.parse((await bio.post(`/api/photos/${photoId}/measurements`).send(lengthOf(px))).body);
    const first = await post(300); // 30 cm
    const second = await post(200); // 20 cm
    expect(await sizesOf(entry.id)).toEqual([{ dimension: 'length', valueCm: 20, method: 'measured' }]);

    // Removing the older one leaves the length taken from the newer alone.
    const v = (await detail(entry.id)).version;
    expect((await bio.delete(`/api/measurements/${first.id}`)).status).toBe(204);
    expect(await sizesOf(entry.id)).toEqual([{ dimension: 'length', valueCm: 20, method: 'measured' }]);
    expect((await detail(entry.id)).version).toBe(v);

    // Removing the one it came from takes the latest left: a third, 25 cm, made after the first.
    const third = await post(250);
    expect((await bio.delete(`/api/measurements/${third.id}`)).status).toBe(204);
    expect(await sizesOf(entry.id)).toEqual([{ dimension: 'length', valueCm: 20, method: 'measured' }]);
    const fourth = await post(250);
    expect((await bio.delete(`/api/measurements/${second.id}`)).status).toBe(204);
    expect(await sizesOf(entry.id)).toEqual([{ dimension: 'length', valueCm: 25, method: 'measured' }]);
    const before = (await detail(entry.id)).version;
    expect((await bio.delete(`/api/measurements/${fourth.id}`)).status).toBe(204);
    const after = await detail(entry.id);
    expect(after.sizes).toEqual([]);
    expect(after.version).toBe(before + 1);
  });

  it('leaves a length a person gave, and an area’s removal leaves the length alone', async () => {
    const { entry, photoId } = await entryWithPhoto('biology');
    const bio = await t.signIn(emails.biologist);
    const m = measurementSchema.parse((await bio.post(`/api/photos/${photoId}/measurements`).send(lengthOf(300))).body);
    const area = measurementSchema.parse(
      (
        await bio.post(`/api/photos/${photoId}/measurements`).send({
          ...bar,
          kind: 'area',
          points: [
            [0, 0],
            [100, 0],
            [100, 100],
          ],
        })
      ).body,
    );
    expect((await bio.delete(`/api/measurements/${area.id}`)).status).toBe(204);
    expect(await sizesOf(entry.id)).toEqual([{ dimension: 'length', valueCm: 30, method: 'measured' }]);

    // Sent back unchanged beside a new width, the length still counts as taken from the photo.
    let version = (await detail(entry.id)).version;
    const kept = await bio.patch(`/api/observations/${entry.id}`).send({
      version,
      sizes: [
        { dimension: 'length', valueCm: 30, method: 'measured' },
        { dimension: 'width', valueCm: 4, method: 'estimated' },
      ],
    });
    expect(kept.status, JSON.stringify(kept.body)).toBe(200);
    const again = measurementSchema.parse((await bio.post(`/api/photos/${photoId}/measurements`).send(lengthOf(300))).body);
    expect((await bio.delete(`/api/measurements/${again.id}`)).status).toBe(204);
    expect((await bio.delete(`/api/measurements/${m.id}`)).status).toBe(204);
    expect(await sizesOf(entry.id)).toEqual([{ dimension: 'width', valueCm: 4, method: 'estimated' }]);

    // A length typed by hand, even one marked measured, is the person's: removing a measurement leaves it.
    const third = measurementSchema.parse((await bio.post(`/api/photos/${photoId}/measurements`).send(lengthOf(300))).body);
    version = (await detail(entry.id)).version;
    const typed = await bio
      .patch(`/api/observations/${entry.id}`)
      .send({ version, sizes: [{ dimension: 'length', valueCm: 31, method: 'measured' }] });
    expect(typed.status, JSON.stringify(typed.body)).toBe(200);
    expect((await bio.delete(`/api/measurements/${third.id}`)).status).toBe(204);
    expect(await sizesOf(entry.id)).toEqual([{ dimension: 'length', valueCm: 31, method: 'measured' }]);
  });
});

describe('retiring a photo and the entry’s length', () => {
  it('takes the length again from the entry’s other photos when the photo it was measured on is retired, and clears it when none is left', async () => {
    const { entry, photoId: first } = await entryWithPhoto('biology');
    const bio = await t.signIn(emails.biologist);
    const up = await bio
      .post(`/api/observations/${entry.id}/photos`)
      .attach('photo', await png(), { filename: 'second.png', contentType: 'image/png' });
    expect(up.status).toBe(201);
    const second = up.body.photos[0].id as string;
    const length = (px: number) => ({
      ...bar,
      points: [
        [50, 250],
        [50 + px, 250],
      ],
    });
    // Worked here: 10 cm over 100 px is 0.1 cm a pixel, so 200 px is 20 cm and 300 px 30 cm.
    expect((await bio.post(`/api/photos/${second}/measurements`).send(length(200))).status).toBe(201);
    expect((await bio.post(`/api/photos/${first}/measurements`).send(length(300))).status).toBe(201);
    expect((await detail(entry.id)).sizes).toEqual([{ dimension: 'length', valueCm: 30, method: 'measured' }]);

    const v = (await detail(entry.id)).version;
    expect((await bio.delete(`/api/photos/${first}`)).status).toBe(204);
    const after = await detail(entry.id);
    expect(after.sizes).toEqual([{ dimension: 'length', valueCm: 20, method: 'measured' }]);
    expect(after.version).toBe(v + 1);

    expect((await bio.delete(`/api/photos/${second}`)).status).toBe(204);
    expect((await detail(entry.id)).sizes).toEqual([]);
  });
});

describe('the dive’s laser spacing', () => {
  const getDive = async () => diveSchema.parse((await (await t.signIn(emails.lead)).get(`/api/dives/${ids.dive}`)).body);

  it('is set and cleared by the lead, and bad values are refused with nothing stored lost', async () => {
    const lead = await t.signIn(emails.lead);
    const start = await getDive();
    const set = await lead.patch(`/api/dives/${ids.dive}`).send({ version: start.version, laserSpacingCm: 12.5 });
    expect(set.status, JSON.stringify(set.body)).toBe(200);
    expect(diveSchema.parse(set.body).laserSpacingCm).toBe(12.5);
    const stored = await getDive();
    expect(stored.laserSpacingCm).toBe(12.5);
    expect(stored.objectives).toBe(start.objectives);
    expect(stored.telemetryGapS).toBe(start.telemetryGapS);

    for (const bad of [0, -3, 0.5, 501, '10', true, [10]]) {
      const res = await lead.patch(`/api/dives/${ids.dive}`).send({ version: stored.version, laserSpacingCm: bad, objectives: 'Lost?' });
      expect(res.status, JSON.stringify(bad)).toBe(400);
      expect(res.body.error.code).toBe('validation_failed');
      expect(typeof res.body.error.message).toBe('string');
      expect(res.body.error.issues.map((i: { path: string }) => i.path)).toContain('laserSpacingCm');
    }
    expect(await getDive()).toEqual(stored);

    const guest = await t.signIn(emails.guest);
    expect((await guest.patch(`/api/dives/${ids.dive}`).send({ version: stored.version, laserSpacingCm: 20 })).status).toBe(403);
    expect((await getDive()).laserSpacingCm).toBe(12.5);

    const cleared = await lead.patch(`/api/dives/${ids.dive}`).send({ version: stored.version, laserSpacingCm: null });
    expect(cleared.status).toBe(200);
    expect((await getDive()).laserSpacingCm).toBeNull();
  });
});
