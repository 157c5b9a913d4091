/**
 * Counts, cover and sizes on biology entries, the substrate vocabulary, the species list import and
 * the taxa a dive or campaign saw, over real HTTP on the tests' own campaign.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { standardSubstrates } from '@/lib/substrates';
import { emails } from '../helpers/demo';
import { buildFixtures, type Fixtures } from '../helpers/fixtures';
import { startTestServer, type TestServer } from '../helpers/test-server';

let t: TestServer;
let ids: Fixtures;

beforeAll(async () => {
  t = await startTestServer({ env: { AUTH_RATE_LIMIT: '500' } });
  ids = await buildFixtures(t);
});
afterAll(() => t.close());

const at = (minute: number) => new Date(Date.UTC(2026, 4, 13, 19, minute)).toISOString();

async function log(body: Record<string, unknown>, by = emails.biologist) {
  return (await t.signIn(by)).post(`/api/dives/${ids.dive}/observations`).send(body);
}

describe('counts, cover and sizes', () => {
  it('keeps a count, a quantity with its type and sizes on a biology entry, and shows them on the entry', async () => {
    const res = await log({
      kind: 'biology',
      title: 'Squat lobsters on the capstan',
      observedAt: at(1),
      individualCount: 7,
      sizes: [
        { dimension: 'width', valueCm: 3.5, method: 'estimated' },
        { dimension: 'length', valueCm: 6, method: 'measured' },
      ],
    });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ individualCount: 7, organismQuantity: null, organismQuantityType: null, substrate: null });
    // Length before width, whatever order they were sent in.
    expect(res.body.sizes).toEqual([
      { dimension: 'length', valueCm: 6, method: 'measured' },
      { dimension: 'width', valueCm: 3.5, method: 'estimated' },
    ]);
    const cover = await log({
      kind: 'biology',
      title: 'Hydroid turf on the rail',
      observedAt: at(2),
      organismQuantity: 35,
      organismQuantityType: '% cover',
    });
    expect(cover.status).toBe(201);
    expect(cover.body).toMatchObject({ organismQuantity: 35, organismQuantityType: '% cover' });
  });

  it.each([
    [{ individualCount: -1 }, 'individualCount', 'A count cannot be negative'],
    [{ individualCount: 2.5 }, 'individualCount', 'A count is a whole number'],
    [{ organismQuantity: 120, organismQuantityType: '% cover' }, 'organismQuantity', 'Cover is a percentage, 0 to 100'],
    [{ organismQuantity: 12 }, 'organismQuantityType', 'Give a quantity with its type, or neither'],
    [{ organismQuantity: -3, organismQuantityType: 'individuals' }, 'organismQuantity', 'A quantity cannot be negative'],
    [
      {
        sizes: [
          { dimension: 'length', valueCm: 2, method: 'measured' },
          { dimension: 'length', valueCm: 3, method: 'measured' },
        ],
      },
      'sizes',
      'Give each dimension once',
    ],
    [{ sizes: [{ dimension: 'length', valueCm: 0, method: 'measured' }] }, 'sizes.0.valueCm', 'A size is more than 0 cm'],
  ])('refuses %j with a message on %s', async (extra, field, message) => {
    const before = (await (await t.signIn(emails.biologist)).get(`/api/dives/${ids.dive}/observations?limit=200`)).body.items.length;
    const res = await log({ kind: 'biology', title: 'Refused count', ...extra });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
    expect(res.body.error.issues).toContainEqual(expect.objectContaining({ path: field, message }));
    const after = (await (await t.signIn(emails.biologist)).get(`/api/dives/${ids.dive}/observations?limit=200`)).body.items.length;
    expect(after).toBe(before);
  });

  it('refuses counts on an entry that is not biology', async () => {
    const res = await log({ kind: 'archaeology', title: 'Counted amphorae', individualCount: 4 });
    expect(res.status).toBe(400);
    expect(res.body.error.issues).toEqual([{ path: 'individualCount', message: 'Counts, cover and sizes belong to biology entries' }]);
  });

  it('an edit changes the count, replaces the sizes and keeps what it does not name', async () => {
    const bio = await t.signIn(emails.biologist);
    const made = await log({
      kind: 'biology',
      title: 'Brittle stars on the ballast',
      observedAt: at(3),
      individualCount: 12,
      sizes: [{ dimension: 'length', valueCm: 4, method: 'estimated' }],
    });
    const edited = await bio.patch(`/api/observations/${made.body.id}`).send({ version: 1, individualCount: 15, sizes: [] });
    expect(edited.status).toBe(200);
    expect(edited.body).toMatchObject({ individualCount: 15, sizes: [], title: 'Brittle stars on the ballast' });
    const renamed = await bio.patch(`/api/observations/${made.body.id}`).send({ version: 2, title: 'Brittle stars on the ballast mound' });
    expect(renamed.body.individualCount).toBe(15);
    const history = await bio.get(`/api/observations/${made.body.id}/revisions`);
    expect(history.status).toBe(200);
  });
});

describe('substrate vocabulary', () => {
  it('starts from the standard classes, and an entry names one in any case', async () => {
    const lead = await t.signIn(emails.lead);
    const list = await lead.get(`/api/campaigns/${ids.campaign}/substrates`);
    expect(list.status).toBe(200);
    expect(list.body.items.map((s: { name: string }) => s.name)).toEqual(standardSubstrates.map((s) => s.name));
    // FGDC-STD-018-2012 (CMECS): the anthropogenic origin includes metal, on which a steel hull's fauna sits.
    expect(list.body.items.find((s: { name: string }) => s.name === 'Metal')).toMatchObject({
      origin: 'anthropogenic',
      standardName: 'Metal',
      entryCount: 0,
    });
    const res = await log({ kind: 'biology', title: 'Anemones on the boiler', observedAt: at(4), substrate: 'metal' });
    expect(res.status).toBe(201);
    expect(res.body.substrate).toBe('Metal');
    const counted = await lead.get(`/api/campaigns/${ids.campaign}/substrates`);
    expect(counted.body.items.find((s: { name: string }) => s.name === 'Metal').entryCount).toBe(1);
  });

  it('a rename reaches the entries; a retired class stays on its entries but is not given to new ones', async () => {
    const lead = await t.signIn(emails.lead);
    const made = await lead.post(`/api/campaigns/${ids.campaign}/substrates`).send({ name: 'Ballast stone heap', origin: 'anthropogenic' });
    expect(made.status).toBe(201);
    const twice = await lead.post(`/api/campaigns/${ids.campaign}/substrates`).send({ name: 'ballast STONE heap' });
    expect(twice.status).toBe(409);
    expect(twice.body.error.code).toBe('duplicate_substrate');
    const entry = await log({ kind: 'biology', title: 'Sponge on the ballast', observedAt: at(5), substrate: 'Ballast stone heap' });
    expect(entry.body.substrate).toBe('Ballast stone heap');
    const renamed = await lead.patch(`/api/substrates/${made.body.id}`).send({ name: 'Ballast mound' });
    expect(renamed.status).toBe(200);
    const bio = await t.signIn(emails.biologist);
    expect((await bio.get(`/api/observations/${entry.body.id}`)).body.substrate).toBe('Ballast mound');
    await lead.patch(`/api/substrates/${made.body.id}`).send({ retired: true });
    const refused = await log({ kind: 'biology', title: 'Another on the mound', substrate: 'Ballast mound' });
    expect(refused.status).toBe(400);
    expect(refused.body.error.issues).toEqual([{ path: 'substrate', message: 'No substrate class named Ballast mound in this campaign' }]);
    // The entry that had it keeps it through an edit of something else.
    const kept = await bio
      .patch(`/api/observations/${entry.body.id}`)
      .send({ version: 1, title: 'Sponge on the ballast mound', substrate: 'Ballast mound' });
    expect(kept.status).toBe(200);
    expect(kept.body.substrate).toBe('Ballast mound');
  });

  it('only a lead changes the vocabulary', async () => {
    const bio = await t.signIn(emails.biologist);
    const res = await bio.post(`/api/campaigns/${ids.campaign}/substrates`).send({ name: 'Not mine to add' });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('forbidden');
  });
});

describe('species list', () => {
  const csv = [
    'scientificName,scientificNameAuthorship,taxonRank,scientificNameID,vernacularName',
    'Lophelia pertusa,"(Linnaeus, 1758)",species,urn:lsid:marinespecies.org:taxname:135161,stony coral',
    'Acesta excavata,,species,,',
    'Munida,,genus,,squat lobsters',
    ',,,,',
    'lophelia Pertusa,,species,,',
    'Paragorgia cf. arborea,,species,,',
    'Brisinga endecacnemos,,speices,,',
    'Geodia barretti,,species,not-an-id,',
    'Lophelia pertusa,,species,,',
    'Echinus esculentus Linnaeus 1758,,,,',
  ].join('\n');

  it('takes the good rows and reports every bad one by line, and a second import updates rather than doubles', async () => {
    const lead = await t.signIn(emails.lead);
    const res = await lead
      .post(`/api/campaigns/${ids.campaign}/checklist`)
      .attach('file', Buffer.from(csv), { filename: 'species.csv', contentType: 'text/csv' });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ taken: 4, added: 4, updated: 0, total: 10 });
    expect(res.body.rejected.map((r: { line: number; code: string }) => [r.line, r.code])).toEqual([
      [5, 'missing_name'],
      [6, 'bad_name'],
      [7, 'bad_name'],
      [8, 'bad_rank'],
      [9, 'bad_identifier'],
      [10, 'duplicate_in_file'],
    ]);
    const list = await lead.get(`/api/campaigns/${ids.campaign}/checklist`);
    const echinus = list.body.items.find((i: { scientificName: string }) => i.scientificName === 'Echinus esculentus');
    expect(echinus).toMatchObject({ genus: 'Echinus', specificEpithet: 'esculentus', authorship: 'Linnaeus 1758', taxonRank: 'species' });
    const lophelia = list.body.items.find((i: { scientificName: string }) => i.scientificName === 'Lophelia pertusa');
    expect(lophelia).toMatchObject({
      authorship: '(Linnaeus, 1758)',
      identifier: 'urn:lsid:marinespecies.org:taxname:135161',
      vernacularName: 'stony coral',
    });

    const again = await lead
      .post(`/api/campaigns/${ids.campaign}/checklist`)
      .attach('file', Buffer.from('scientificName,vernacularName\nMunida,squat lobster genus\n'), {
        filename: 'more.csv',
        contentType: 'text/csv',
      });
    expect(again.body).toMatchObject({ taken: 1, added: 0, updated: 1, rejected: [] });
    expect((await lead.get(`/api/campaigns/${ids.campaign}/checklist`)).body.items).toHaveLength(4);
  });

  it('refuses a file without a name column, an empty one and one that is not text, and keeps the list', async () => {
    const lead = await t.signIn(emails.lead);
    const bad = await lead
      .post(`/api/campaigns/${ids.campaign}/checklist`)
      .attach('file', Buffer.from('taxon_id,notes\n1,x\n'), { filename: 'x.csv', contentType: 'text/csv' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toContain('no scientific name column');
    const empty = await lead
      .post(`/api/campaigns/${ids.campaign}/checklist`)
      .attach('file', Buffer.alloc(0), { filename: 'x.csv', contentType: 'text/csv' });
    expect(empty.status).toBe(400);
    const png = Buffer.from('89504e470d0a1a0a0000000d49484452', 'hex');
    const binary = await lead
      .post(`/api/campaigns/${ids.campaign}/checklist`)
      .attach('file', png, { filename: 'x.csv', contentType: 'text/csv' });
    expect(binary.status).toBe(415);
    expect(binary.body.error.code).toBe('unsupported_type');
    expect((await lead.get(`/api/campaigns/${ids.campaign}/checklist`)).body.items).toHaveLength(4);
  });

  it('suggests names from the list and from names already used, marking which is which', async () => {
    const bio = await t.signIn(emails.biologist);
    const made = await log({ kind: 'biology', title: 'Pale octocoral fan', observedAt: at(6) });
    await bio
      .put(`/api/observations/${made.body.id}/identification`)
      .send({ version: 1, scientificName: 'Primnoa resedaeformis', taxonRank: 'species' });
    const res = await bio.get(`/api/campaigns/${ids.campaign}/names?q=p`);
    expect(res.status).toBe(200);
    expect(res.body.hasChecklist).toBe(true);
    const byName = new Map(res.body.items.map((s: { scientificName: string; onChecklist: boolean }) => [s.scientificName, s.onChecklist]));
    expect(byName.get('Lophelia pertusa')).toBe(true);
    expect(byName.get('Primnoa resedaeformis')).toBe(false);
    const vernacular = await bio.get(`/api/campaigns/${ids.campaign}/names?q=squat`);
    expect(vernacular.body.items.map((s: { scientificName: string }) => s.scientificName)).toEqual(['Munida']);
  });
});

describe('taxa seen', () => {
  it('lists each taxon of a dive with entries, total count, first and last seen, depth range and share verified', async () => {
    const bio = await t.signIn(emails.biologist);
    const lead = await t.signIn(emails.lead);
    const a = await log({ kind: 'biology', title: 'Squat lobster in a porthole', observedAt: at(10), depth: 610, individualCount: 2 });
    const b = await log({
      kind: 'biology',
      title: 'Squat lobsters under the windlass',
      observedAt: at(20),
      depth: 604.5,
      individualCount: 5,
    });
    const c = await log({ kind: 'biology', title: 'Squat lobster, size unclear', observedAt: at(30), depth: 612 });
    for (const e of [a, b, c]) {
      await bio.put(`/api/observations/${e.body.id}/identification`).send({ version: 1, scientificName: 'Munida', taxonRank: 'genus' });
    }
    await lead.post(`/api/observations/${a.body.id}/identification/verify`).send({ version: 2, status: 'verified' });
    const res = await bio.get(`/api/dives/${ids.dive}/taxa?sort=entries`);
    expect(res.status).toBe(200);
    const munida = res.body.items.find((i: { scientificName: string }) => i.scientificName === 'Munida');
    expect(munida).toMatchObject({
      taxonRank: 'genus',
      onChecklist: true,
      entries: 3,
      totalCount: 7,
      firstSeen: at(10),
      lastSeen: at(30),
      depthMin: 604.5,
      depthMax: 612,
    });
    expect(munida.verifiedShare).toBeCloseTo(1 / 3, 10);
    expect(munida.observationIds.sort()).toEqual([a.body.id, b.body.id, c.body.id].sort());
    expect(res.body.items[0].scientificName).toBe('Munida');
    const primnoa = res.body.items.find((i: { scientificName: string }) => i.scientificName === 'Primnoa resedaeformis');
    expect(primnoa.onChecklist).toBe(false);
    const campaign = await bio.get(`/api/campaigns/${ids.campaign}/taxa`);
    expect(campaign.body.items.find((i: { scientificName: string }) => i.scientificName === 'Munida').entries).toBe(3);
    // The other campaign's dive sees none of this campaign's taxa.
    const other = await lead.get(`/api/dives/${ids.otherDive}/taxa`);
    expect(other.body.items.find((i: { scientificName: string }) => i.scientificName === 'Munida')).toBeUndefined();
  });

  it('a retired entry drops out of the taxa', async () => {
    const bio = await t.signIn(emails.biologist);
    const e = await log({ kind: 'biology', title: 'Single sea pen', observedAt: at(40) });
    await bio.put(`/api/observations/${e.body.id}/identification`).send({ version: 1, scientificName: 'Funiculina quadrangularis' });
    expect(
      (await bio.get(`/api/dives/${ids.dive}/taxa`)).body.items.some(
        (i: { scientificName: string }) => i.scientificName === 'Funiculina quadrangularis',
      ),
    ).toBe(true);
    await bio.delete(`/api/observations/${e.body.id}`);
    expect(
      (await bio.get(`/api/dives/${ids.dive}/taxa`)).body.items.some(
        (i: { scientificName: string }) => i.scientificName === 'Funiculina quadrangularis',
      ),
    ).toBe(false);
  });
});

describe('sample register', () => {
  it('lists samples in natural order with their custody, and flags one with no step since its dive came on deck', async () => {
    const bio = await t.signIn(emails.biologist);
    const made = async (title: string, n: string, parent?: string) => {
      const e = await log({ kind: 'biology', title, observedAt: at(50) });
      const s = await bio
        .put(`/api/observations/${e.body.id}/sample`)
        .send({ sampleNumber: n, sampleType: 'biological', gear: 'suction sampler', parentSampleNumber: parent ?? null });
      expect(s.status).toBe(200);
      return e.body.id as string;
    };
    const ten = await made('Sponge fragment for genetics', 'REG-10');
    const two = await made('Coral branch for isotopes', 'REG-2');
    await made('Subsample of the coral branch', 'REG-2a', 'REG-2');
    // The fixture dive is on deck at 23:05 UTC: a step after it clears the flag, one before does not.
    await bio
      .post(`/api/observations/${two}/custody`)
      .send({ holder: 'Wet lab', since: '2026-05-13T23:20:00.000Z', location: 'Freezer 2' });
    await bio
      .post(`/api/observations/${ten}/custody`)
      .send({ holder: 'Vehicle drawer', since: '2026-05-13T22:00:00.000Z', location: 'Drawer 3' });
    const res = await bio.get(`/api/dives/${ids.dive}/samples`);
    expect(res.status).toBe(200);
    const mine = res.body.items.filter((s: { sampleNumber: string }) => s.sampleNumber.startsWith('REG-'));
    expect(mine.map((s: { sampleNumber: string }) => s.sampleNumber)).toEqual(['REG-2', 'REG-2a', 'REG-10']);
    const by = new Map(mine.map((s: { sampleNumber: string }) => [s.sampleNumber, s]));
    expect(by.get('REG-2')).toMatchObject({ custodySteps: 1, heldBy: 'Wet lab', noCustodySinceRecovery: false, gear: 'suction sampler' });
    expect(by.get('REG-2a')).toMatchObject({ custodySteps: 0, heldBy: null, noCustodySinceRecovery: true, parentSampleNumber: 'REG-2' });
    expect(by.get('REG-10')).toMatchObject({ custodySteps: 1, heldBy: 'Vehicle drawer', noCustodySinceRecovery: true });
    const campaign = await bio.get(`/api/campaigns/${ids.campaign}/samples`);
    expect(campaign.body.items.filter((s: { sampleNumber: string }) => s.sampleNumber.startsWith('REG-'))).toHaveLength(3);
    const other = await (await t.signIn(emails.lead)).get(`/api/dives/${ids.otherDive}/samples`);
    expect(other.body.items.some((s: { sampleNumber: string }) => s.sampleNumber.startsWith('REG-'))).toBe(false);
  });
});
