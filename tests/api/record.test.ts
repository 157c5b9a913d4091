import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { observationDetailSchema, observationPageSchema, observationSchema, revisionSchema } from '@/lib/schemas';
import { emails } from '../helpers/demo';
import { buildFixtures, type Fixtures } from '../helpers/fixtures';
import { startTestServer, type TestServer } from '../helpers/test-server';

let t: TestServer;
let ids: Fixtures;

beforeAll(async () => {
  t = await startTestServer({ env: { AUTH_RATE_LIMIT: '200' } });
  ids = await buildFixtures(t);
});
afterAll(() => t.close());

async function logAs(email: string, body: Record<string, unknown>) {
  const res = await (await t.signIn(email)).post(`/api/dives/${ids.dive}/observations`).send(body);
  expect(res.status).toBe(201);
  return observationSchema.parse(res.body);
}

const detail = async (id: string) =>
  observationDetailSchema.parse((await (await t.signIn(emails.lead)).get(`/api/observations/${id}`)).body);

describe('edits carry a version', () => {
  it('applies an edit, bumps the version and keeps every earlier state', async () => {
    const created = await logAs(emails.biologist, { kind: 'biology', title: 'Sponge at the sternpost', depth: 590, tags: ['sponge'] });
    const bio = await t.signIn(emails.biologist);
    const edit = await bio
      .patch(`/api/observations/${created.id}`)
      .send({ version: 1, title: 'Glass sponge at the sternpost', note: 'Vase-shaped.' });
    expect(edit.status).toBe(200);
    expect(edit.body).toMatchObject({
      title: 'Glass sponge at the sternpost',
      note: 'Vase-shaped.',
      version: 2,
      depth: 590,
      depthSource: 'manual',
      tags: ['sponge'],
    });

    const revisions = (await bio.get(`/api/observations/${created.id}/revisions`)).body.map((r: unknown) => revisionSchema.parse(r));
    expect(revisions.map((r: { version: number; action: string }) => [r.version, r.action])).toEqual([
      [2, 'updated'],
      [1, 'created'],
    ]);
    expect(revisions[1].snapshot.title).toBe('Sponge at the sternpost');
    expect(revisions[0].snapshot.title).toBe('Glass sponge at the sternpost');
    expect(revisions[0].editedByName).toBe('Cleo Varga');
    expect(Date.parse(revisions[0].editedAt)).not.toBeNaN();
  });

  it('refuses a stale version with 409 and overwrites nothing', async () => {
    const created = await logAs(emails.biologist, { kind: 'biology', title: 'Anemone' });
    const bio = await t.signIn(emails.biologist);
    const lead = await t.signIn(emails.lead);
    expect((await lead.patch(`/api/observations/${created.id}`).send({ version: 1, title: 'Anemone on an amphora neck' })).status).toBe(
      200,
    );
    const stale = await bio.patch(`/api/observations/${created.id}`).send({ version: 1, title: 'Anemone (mine)' });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('stale_version');
    const now = await detail(created.id);
    expect(now.title).toBe('Anemone on an amphora neck');
    expect(now.version).toBe(2);
  });

  it('lets only the author and leads edit; another scientist gets 403 and a reason', async () => {
    const created = await logAs(emails.guest, { kind: 'biology', title: 'Brittle stars from the feed' });
    const other = await (await t.signIn(emails.archaeologist)).patch(`/api/observations/${created.id}`).send({ version: 1, title: 'x' });
    expect(other.status).toBe(403);
    expect(other.body.error.message).toMatch(/author/);
    const own = await (
      await t.signIn(emails.guest)
    )
      .patch(`/api/observations/${created.id}`)
      .send({ version: 1, title: 'Brittle stars, 10–20 per frame' });
    expect(own.status).toBe(200);
    const outsider = await (await t.signIn(emails.outsider)).patch(`/api/observations/${created.id}`).send({ version: 2, title: 'x' });
    expect(outsider.status).toBe(404);
    expect((await detail(created.id)).title).toBe('Brittle stars, 10–20 per frame');
  });

  it('refuses edits that smuggle fields or carry bad values, changing nothing', async () => {
    const created = await logAs(emails.biologist, { kind: 'biology', title: 'Keep me' });
    const bio = await t.signIn(emails.biologist);
    for (const body of [
      { title: 'x' },
      { version: 1, authorId: ids.userId(emails.lead) },
      { version: 1, retired: true },
      { version: 1, kind: 'geology' },
      { version: 1, observedAt: '2026-05-13 21:00' },
      { version: 1, lat: 36.1 },
    ]) {
      const res = await bio.patch(`/api/observations/${created.id}`).send(body);
      expect(res.status, JSON.stringify(body)).toBe(400);
    }
    const now = await detail(created.id);
    expect(now).toMatchObject({ title: 'Keep me', version: 1, retired: false, authorId: ids.userId(emails.biologist) });
  });

  it('clears a typed depth back to no value, and changes the time', async () => {
    const created = await logAs(emails.biologist, { kind: 'biology', title: 'Depth to clear', depth: 601 });
    // Hours before the dive's launch, where no telemetry log reaches.
    const res = await (
      await t.signIn(emails.biologist)
    )
      .patch(`/api/observations/${created.id}`)
      .send({ version: 1, depth: null, observedAt: '2026-05-13T03:00:00.000Z' });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ depth: null, depthSource: null, observedAt: '2026-05-13T03:00:00.000Z' });
  });
});

describe('retiring', () => {
  it('hides a retired entry from the log, keeps it, and lets a lead restore it', async () => {
    const created = await logAs(emails.pilot, { kind: 'operations', title: 'Manipulator check' });
    const pilot = await t.signIn(emails.pilot);
    const inLog = async () =>
      observationPageSchema
        .parse((await pilot.get(`/api/dives/${ids.dive}/observations`).query({ limit: 200 })).body)
        .items.some((o) => o.id === created.id);
    expect(await inLog()).toBe(true);

    expect((await (await t.signIn(emails.biologist)).delete(`/api/observations/${created.id}`)).status).toBe(403);
    const retired = await pilot.delete(`/api/observations/${created.id}`);
    expect(retired.status).toBe(200);
    expect(retired.body.retired).toBe(true);
    expect(await inLog()).toBe(false);
    expect((await pilot.get(`/api/observations/${created.id}`)).body.retired).toBe(true);

    const lead = await t.signIn(emails.lead);
    const list = observationPageSchema.parse(
      (await lead.get(`/api/dives/${ids.dive}/observations`).query({ retired: 'only', limit: 200 })).body,
    );
    expect(list.items.map((o) => o.id)).toContain(created.id);
    expect((await pilot.get(`/api/dives/${ids.dive}/observations`).query({ retired: 'only' })).status).toBe(403);

    expect((await pilot.post(`/api/observations/${created.id}/restore`)).status).toBe(403);
    expect((await lead.post(`/api/observations/${created.id}/restore`)).status).toBe(200);
    expect(await inLog()).toBe(true);
    const actions = (await lead.get(`/api/observations/${created.id}/revisions`)).body.map((r: { action: string }) => r.action);
    expect(actions).toEqual(['restored', 'retired', 'created']);
  });

  it('keeps retired entries in the database: nothing is hard-deleted', async () => {
    const created = await logAs(emails.biologist, { kind: 'biology', title: 'Short-lived' });
    await (await t.signIn(emails.biologist)).delete(`/api/observations/${created.id}`);
    const row = t.ctx.db.$client.prepare('select retired from observations where id = ?').get(created.id) as { retired: number };
    expect(row.retired).toBe(1);
  });
});

describe('identifications', () => {
  it('are proposed by scientists and verified by someone else', async () => {
    const created = await logAs(emails.biologist, { kind: 'biology', title: 'Coral on the stern rail' });
    const bio = await t.signIn(emails.biologist);
    const proposed = await bio.put(`/api/observations/${created.id}/identification`).send({
      version: 1,
      scientificName: 'Desmophyllum pertusum',
      taxonRank: 'species',
      qualifier: 'cf.',
      confidence: 'medium',
      taxonId: 'urn:lsid:marinespecies.org:taxname:1245747',
    });
    expect(proposed.status).toBe(200);
    expect(proposed.body.version).toBe(2);
    expect(proposed.body.identificationDetail).toMatchObject({
      scientificName: 'Desmophyllum pertusum',
      verificationStatus: 'unverified',
      identifiedByName: 'Cleo Varga',
    });
    expect(proposed.body.identification).toEqual({
      scientificName: 'Desmophyllum pertusum',
      qualifier: 'cf.',
      verificationStatus: 'unverified',
    });

    const self = await bio.post(`/api/observations/${created.id}/identification/verify`).send({ version: 2, status: 'verified' });
    expect(self.status).toBe(403);
    const guest = await (
      await t.signIn(emails.guest)
    )
      .post(`/api/observations/${created.id}/identification/verify`)
      .send({ version: 2, status: 'verified' });
    expect(guest.status).toBe(403);
    const pilot = await (
      await t.signIn(emails.pilot)
    )
      .post(`/api/observations/${created.id}/identification/verify`)
      .send({ version: 2, status: 'verified' });
    expect(pilot.status).toBe(403);

    const other = await (
      await t.signIn(emails.archaeologist)
    )
      .post(`/api/observations/${created.id}/identification/verify`)
      .send({ version: 2, status: 'verified', note: 'Polyps clear on the still.' });
    expect(other.status).toBe(200);
    expect(other.body.identificationDetail).toMatchObject({
      verificationStatus: 'verified',
      verifiedByName: 'Bram Ostrander',
      verificationNote: 'Polyps clear on the still.',
    });

    const filtered = observationPageSchema.parse(
      (await bio.get(`/api/dives/${ids.dive}/observations`).query({ verification: 'verified', limit: 200 })).body,
    );
    expect(filtered.items.map((o) => o.id)).toContain(created.id);
    expect(filtered.items.every((o) => o.identification?.verificationStatus === 'verified')).toBe(true);

    // A different name starts unverified again.
    const renamed = await (
      await t.signIn(emails.lead)
    )
      .put(`/api/observations/${created.id}/identification`)
      .send({ version: 3, scientificName: 'Madrepora oculata' });
    expect(renamed.body.identificationDetail).toMatchObject({ verificationStatus: 'unverified', verifiedBy: null });
  });

  it('belong to biology entries only, and refuse a bad taxon identifier', async () => {
    const arch = await logAs(emails.archaeologist, { kind: 'archaeology', title: 'Amphora' });
    const res = await (
      await t.signIn(emails.archaeologist)
    )
      .put(`/api/observations/${arch.id}/identification`)
      .send({ version: 1, scientificName: 'x' });
    expect(res.status).toBe(400);
    const bio = await logAs(emails.biologist, { kind: 'biology', title: 'Something' });
    const bad = await (
      await t.signIn(emails.biologist)
    )
      .put(`/api/observations/${bio.id}/identification`)
      .send({ version: 1, scientificName: 'Munida', taxonId: 'javascript:alert(1)' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.issues[0].path).toBe('taxonId');
  });
});

describe('finds and their custody', () => {
  it('numbers finds uniquely in the campaign and proposes the next free number', async () => {
    const arch = await t.signIn(emails.archaeologist);
    const taken = t.ctx.db.$client.prepare('select find_number from finds where campaign_id = ?').pluck().all(ids.campaign) as string[];
    // "Test campaign 2026" numbers its finds TC26-001, TC26-002, …: the proposal is the next of that series.
    const highest = Math.max(0, ...taken.filter((n) => n.startsWith('TC26-')).map((n) => Number(n.slice(5))));
    const expected = (n: number) => `TC26-${String(n).padStart(3, '0')}`;
    const next = (await arch.get(`/api/campaigns/${ids.campaign}/finds/next-number`)).body.findNumber;
    expect(next).toBe(expected(highest + 1));
    const a = await logAs(emails.archaeologist, { kind: 'archaeology', title: 'Amphora with stopper' });
    const first = await arch
      .put(`/api/observations/${a.id}/find`)
      .send({ version: 1, findNumber: next, objectType: 'amphora', material: 'ceramic', condition: 'complete', state: 'in-situ' });
    expect(first.status).toBe(200);
    expect(first.body.find).toMatchObject({ findNumber: next, state: 'in-situ' });
    expect((await arch.get(`/api/campaigns/${ids.campaign}/finds/next-number`)).body.findNumber).toBe(expected(highest + 2));

    const b = await logAs(emails.archaeologist, { kind: 'archaeology', title: 'Second amphora' });
    const duplicate = await arch.put(`/api/observations/${b.id}/find`).send({ version: 1, findNumber: next.toLowerCase() });
    expect(duplicate.status).toBe(409);
    expect(duplicate.body.error.code).toBe('duplicate_find_number');
    expect(duplicate.body.error.message).toContain(expected(highest + 2));
    expect((await detail(b.id)).find).toBeNull();
  });

  it('keeps a custody trail for recovered finds, not for ones left in situ', async () => {
    const a = await logAs(emails.archaeologist, { kind: 'archaeology', title: 'Coarse ware bowl' });
    const arch = await t.signIn(emails.archaeologist);
    expect((await arch.put(`/api/observations/${a.id}/find`).send({ version: 1, findNumber: 'VS26-050', state: 'in-situ' })).status).toBe(
      200,
    );
    const step = { holder: 'Bram Ostrander', since: '2026-05-16T23:10:00.000Z', location: 'Wet lab, tank 2', container: 'Bag 14' };
    expect((await arch.post(`/api/observations/${a.id}/custody`).send(step)).status).toBe(409);
    expect((await arch.put(`/api/observations/${a.id}/find`).send({ version: 2, findNumber: 'VS26-050', state: 'recovered' })).status).toBe(
      200,
    );
    const added = await arch.post(`/api/observations/${a.id}/custody`).send(step);
    expect(added.status).toBe(201);
    const second = await (
      await t.signIn(emails.lead)
    )
      .post(`/api/observations/${a.id}/custody`)
      .send({ holder: 'Conservator ashore', since: '2026-05-19T09:00:00.000Z', location: 'Conservation lab' });
    expect(second.status).toBe(201);
    expect(second.body.custody.map((c: { holder: string }) => c.holder)).toEqual(['Bram Ostrander', 'Conservator ashore']);
    expect((await arch.post(`/api/observations/${a.id}/custody`).send({ holder: '', since: 'yesterday', location: '' })).status).toBe(400);
  });

  it('keeps a custody trail for samples (entries tagged "sample"), a tag the lead cannot rename, merge or retire away', async () => {
    const bio = await t.signIn(emails.biologist);
    const step = { holder: 'Cleo Varga', since: '2026-05-16T23:40:00.000Z', location: 'Cold room, rack B', container: 'Vial S-07' };
    const plain = await logAs(emails.biologist, { kind: 'biology', title: 'Mat seen, nothing taken', tags: ['microbial-mat'] });
    expect((await bio.post(`/api/observations/${plain.id}/custody`).send(step)).body.error.code).toBe('not_in_custody');
    const sampled = await logAs(emails.biologist, { kind: 'biology', title: 'Push core of the mat', tags: ['sample', 'microbial-mat'] });
    expect((await bio.post(`/api/observations/${sampled.id}/custody`).send(step)).status).toBe(201);

    const lead = await t.signIn(emails.lead);
    const vocabulary = (await lead.get(`/api/campaigns/${ids.campaign}/tags`)).body as { id: string; name: string }[];
    const sample = vocabulary.find((v) => v.name === 'sample')!;
    const other = vocabulary.find((v) => v.name === 'microbial-mat')!;
    for (const change of [{ name: 'samples' }, { retired: true }, { mergeInto: other.id }]) {
      const res = await lead.patch(`/api/tags/${sample.id}`).send(change);
      expect(res.status, JSON.stringify(change)).toBe(409);
      expect(res.body.error.code).toBe('reserved_tag');
    }
    expect((await lead.patch(`/api/tags/${sample.id}`).send({ name: 'Sample' })).status).toBe(200);
    expect((await detail(sampled.id)).tags).toContain('Sample');

    // A trail once begun goes on after the entry loses its tag.
    const version = (await detail(sampled.id)).version;
    expect((await bio.patch(`/api/observations/${sampled.id}`).send({ version, tags: ['microbial-mat'] })).status).toBe(200);
    const next = await bio.post(`/api/observations/${sampled.id}/custody`).send({ ...step, holder: 'Courier to the lab ashore' });
    expect(next.status).toBe(201);
    expect(next.body.custody).toHaveLength(2);
  });
});

const revisionCount = (id: string) =>
  t.ctx.db.$client.prepare('select count(*) from observation_revisions where observation_id = ?').pluck().get(id) as number;

describe('identifications and finds carry the version too', () => {
  it('refuses an identification from a stale version with 409 and keeps the first writer’s name', async () => {
    const created = await logAs(emails.biologist, { kind: 'biology', title: 'Fish in the bow section' });
    const lead = await t.signIn(emails.lead);
    const bio = await t.signIn(emails.biologist);
    const first = await lead.put(`/api/observations/${created.id}/identification`).send({ version: 1, scientificName: 'Conger conger' });
    expect(first.status).toBe(200);
    expect(first.body.version).toBe(2);

    // The biologist's form opened at version 1 too.
    const stale = await bio
      .put(`/api/observations/${created.id}/identification`)
      .send({ version: 1, scientificName: 'Phycis blennoides', confidence: 'low' });
    expect(stale.status).toBe(409);
    expect(stale.body.error).toMatchObject({ code: 'stale_version' });
    expect(stale.body.error.message).toMatch(/version 2/);
    const now = await detail(created.id);
    expect(now.version).toBe(2);
    expect(now.identificationDetail).toMatchObject({ scientificName: 'Conger conger', confidence: null, identifiedByName: 'Ada Lumen' });
    expect(revisionCount(created.id)).toBe(2);

    // Having seen version 2, the biologist may replace it knowingly.
    const fresh = await bio.put(`/api/observations/${created.id}/identification`).send({ version: 2, scientificName: 'Phycis blennoides' });
    expect(fresh.status).toBe(200);
    expect(fresh.body.version).toBe(3);
    expect(fresh.body.identificationDetail.scientificName).toBe('Phycis blennoides');
    expect(revisionCount(created.id)).toBe(3);
  });

  it('refuses a find from a stale version with 409 and keeps the first writer’s find', async () => {
    const created = await logAs(emails.archaeologist, { kind: 'archaeology', title: 'Lead sheathing fragment' });
    const arch = await t.signIn(emails.archaeologist);
    const lead = await t.signIn(emails.lead);
    const first = await arch
      .put(`/api/observations/${created.id}/find`)
      .send({ version: 1, findNumber: 'VS26-071', material: 'lead', state: 'in-situ' });
    expect(first.status).toBe(200);
    expect(first.body.version).toBe(2);

    const stale = await lead
      .put(`/api/observations/${created.id}/find`)
      .send({ version: 1, findNumber: 'VS26-072', material: 'copper', state: 'recovered' });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('stale_version');
    const now = await detail(created.id);
    expect(now.version).toBe(2);
    expect(now.find).toMatchObject({ findNumber: 'VS26-071', material: 'lead', state: 'in-situ' });
    expect(revisionCount(created.id)).toBe(2);

    const fresh = await lead
      .put(`/api/observations/${created.id}/find`)
      .send({ version: 2, findNumber: 'VS26-071', material: 'lead', condition: 'folded', state: 'in-situ' });
    expect(fresh.status).toBe(200);
    expect(fresh.body.version).toBe(3);
    expect(fresh.body.find).toMatchObject({ condition: 'folded' });
  });

  it('shares one version with the entry’s edits, and refuses a body without one', async () => {
    const created = await logAs(emails.biologist, { kind: 'biology', title: 'Shrimp on the windlass' });
    const bio = await t.signIn(emails.biologist);
    expect((await bio.patch(`/api/observations/${created.id}`).send({ version: 1, note: 'Red, ~3 cm.' })).status).toBe(200);
    const afterEdit = await bio.put(`/api/observations/${created.id}/identification`).send({ version: 1, scientificName: 'Plesionika' });
    expect(afterEdit.status).toBe(409);
    const missing = await bio.put(`/api/observations/${created.id}/identification`).send({ scientificName: 'Plesionika' });
    expect(missing.status).toBe(400);
    expect(missing.body.error.issues.map((i: { path: string }) => i.path)).toContain('version');
    const arch = await logAs(emails.archaeologist, { kind: 'archaeology', title: 'Sounding lead' });
    const noVersion = await (
      await t.signIn(emails.archaeologist)
    )
      .put(`/api/observations/${arch.id}/find`)
      .send({ findNumber: 'VS26-073' });
    expect(noVersion.status).toBe(400);
    expect((await detail(arch.id)).find).toBeNull();
    // A stale identification PUT does not stop the entry's own edits from the current version.
    const named = await bio.put(`/api/observations/${created.id}/identification`).send({ version: 2, scientificName: 'Plesionika' });
    expect(named.body.version).toBe(3);
    expect((await bio.patch(`/api/observations/${created.id}`).send({ version: 2, title: 'x' })).status).toBe(409);
    expect((await detail(created.id)).title).toBe('Shrimp on the windlass');
  });
});

describe('who verifies an identification', () => {
  it('refuses a verification of a name changed since the verifier looked', async () => {
    const created = await logAs(emails.guest, { kind: 'biology', title: 'Eel from the feed' });
    const bio = await t.signIn(emails.biologist);
    expect(
      (await bio.put(`/api/observations/${created.id}/identification`).send({ version: 1, scientificName: 'Conger conger' })).body.version,
    ).toBe(2);
    // The lead looks at version 2; meanwhile the biologist changes her mind.
    expect(
      (await bio.put(`/api/observations/${created.id}/identification`).send({ version: 2, scientificName: 'Synaphobranchus kaupii' }))
        .status,
    ).toBe(200);
    const lead = await t.signIn(emails.lead);
    const stale = await lead.post(`/api/observations/${created.id}/identification/verify`).send({ version: 2, status: 'verified' });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('stale_version');
    expect((await detail(created.id)).identificationDetail).toMatchObject({
      scientificName: 'Synaphobranchus kaupii',
      verificationStatus: 'unverified',
      verifiedBy: null,
    });
    const fresh = await lead.post(`/api/observations/${created.id}/identification/verify`).send({ version: 3, status: 'verified' });
    expect(fresh.status).toBe(200);
    expect(fresh.body).toMatchObject({
      version: 4,
      identificationDetail: { verificationStatus: 'verified', verifiedByName: 'Ada Lumen' },
    });
  });

  it('lets nobody verify a name they proposed or an entry they wrote, leads included', async () => {
    const lead = await t.signIn(emails.lead);
    // The lead names a scientist's entry: she may not verify her own name; another scientist may.
    const a = await logAs(emails.archaeologist, { kind: 'biology', title: 'Sea urchin on a timber' });
    await lead.put(`/api/observations/${a.id}/identification`).send({ version: 1, scientificName: 'Cidaris cidaris' });
    const own = await lead.post(`/api/observations/${a.id}/identification/verify`).send({ version: 2, status: 'verified' });
    expect(own.status).toBe(403);
    expect(own.body.error.message).toMatch(/proposed the name or wrote the entry/);
    const author = await (
      await t.signIn(emails.archaeologist)
    )
      .post(`/api/observations/${a.id}/identification/verify`)
      .send({ version: 2, status: 'verified' });
    expect(author.status).toBe(403);
    const other = await (
      await t.signIn(emails.biologist)
    )
      .post(`/api/observations/${a.id}/identification/verify`)
      .send({ version: 2, status: 'disputed' });
    expect(other.status).toBe(200);
    expect(other.body.identificationDetail).toMatchObject({ verificationStatus: 'disputed', verifiedByName: 'Cleo Varga' });

    // The lead's own entry, named by a scientist: not the lead either.
    const b = await logAs(emails.lead, { kind: 'biology', title: 'Starfish on the ballast' });
    await (
      await t.signIn(emails.biologist)
    )
      .put(`/api/observations/${b.id}/identification`)
      .send({ version: 1, scientificName: 'Asteroidea' });
    expect((await lead.post(`/api/observations/${b.id}/identification/verify`).send({ version: 2, status: 'verified' })).status).toBe(403);
    expect((await detail(b.id)).identificationDetail?.verificationStatus).toBe('unverified');

    // Someone else's entry and someone else's name: the lead verifies it.
    const c = await logAs(emails.guest, { kind: 'biology', title: 'Octopus in an amphora' });
    await (
      await t.signIn(emails.biologist)
    )
      .put(`/api/observations/${c.id}/identification`)
      .send({ version: 1, scientificName: 'Octopus vulgaris' });
    const ok = await lead.post(`/api/observations/${c.id}/identification/verify`).send({ version: 2, status: 'verified' });
    expect(ok.status).toBe(200);
    expect(ok.body.identificationDetail.verificationStatus).toBe('verified');
  });
});

describe('retired tags', () => {
  it('takes a merged tag as the one it went into, keeps new entries whole, and lets no edit add a retired tag', async () => {
    const lead = await t.signIn(emails.lead);
    const bio = await t.signIn(emails.biologist);
    const plain = (await lead.post(`/api/campaigns/${ids.campaign}/tags`).send({ name: 'old-survey' })).body as { id: string };
    const merged = (await lead.post(`/api/campaigns/${ids.campaign}/tags`).send({ name: 'scleractinia' })).body as { id: string };
    const tagged = await logAs(emails.biologist, { kind: 'biology', title: 'Tagged before retiring', tags: ['old-survey'] });

    expect((await lead.patch(`/api/tags/${plain.id}`).send({ retired: true })).status).toBe(200);
    const tagList = (await lead.get(`/api/campaigns/${ids.campaign}/tags`)).body as { id: string; name: string }[];
    const coral = tagList.find((x) => x.name === 'coral')!;
    expect((await lead.patch(`/api/tags/${merged.id}`).send({ mergeInto: coral.id })).status).toBe(200);

    // A new entry (perhaps logged offline before the change) is never refused for its tags: a
    // merged tag stands for the one it went into, a retired one stays.
    const created = await bio
      .post(`/api/dives/${ids.dive}/observations`)
      .send({ kind: 'biology', title: 'Uses retired tags', tags: ['sponge', 'Old-Survey', 'scleractinia', 'coral'] });
    expect(created.status).toBe(201);
    expect([...created.body.tags].sort()).toEqual(['coral', 'old-survey', 'sponge']);

    // The entry that had it keeps it, also through an edit that sends it back...
    expect((await detail(tagged.id)).tags).toEqual(['old-survey']);
    const kept = await bio.patch(`/api/observations/${tagged.id}`).send({ version: 1, tags: ['old-survey', 'sponge'] });
    expect(kept.status).toBe(200);
    expect(kept.body.tags).toEqual(['old-survey', 'sponge']);
    // ...but an edit may not add a retired tag to an entry that did not have it.
    const other = await logAs(emails.biologist, { kind: 'biology', title: 'Untagged', tags: ['sponge'] });
    const added = await bio.patch(`/api/observations/${other.id}`).send({ version: 1, tags: ['sponge', 'old-survey'] });
    expect(added.status).toBe(400);
    expect(added.body.error.issues[0].path).toBe('tags.1');
    expect(added.body.error.issues[0].message).toMatch(/"old-survey" has been retired/);
    expect((await detail(other.id)).tags).toEqual(['sponge']);
    const mergedIn = await bio.patch(`/api/observations/${other.id}`).send({ version: 1, tags: ['sponge', 'scleractinia'] });
    expect(mergedIn.status).toBe(200);
    expect([...mergedIn.body.tags].sort()).toEqual(['coral', 'sponge']);
  });
});

describe('dives, phases and the vocabulary', () => {
  it('lets pilots and leads plan dives and mark phases in order', async () => {
    const pilot = await t.signIn(emails.pilot);
    const planned = await pilot
      .post(`/api/campaigns/${ids.campaign}/dives`)
      .send({ number: 'VS-05', objectives: 'Bow mosaic', plannedMaxDepth: 640 });
    expect(planned.status).toBe(201);
    expect((await pilot.post(`/api/campaigns/${ids.campaign}/dives`).send({ number: 'VS-05' })).status).toBe(409);
    expect((await (await t.signIn(emails.biologist)).post(`/api/campaigns/${ids.campaign}/dives`).send({ number: 'VS-06' })).status).toBe(
      403,
    );

    const diveId = planned.body.id as string;
    const launch = await pilot.post(`/api/dives/${diveId}/phases`).send({ phase: 'launch', at: '2026-05-17T18:00:00.000Z' });
    expect(launch.status).toBe(200);
    expect(launch.body.phases.launch).toBe('2026-05-17T18:00:00.000Z');
    const early = await pilot.post(`/api/dives/${diveId}/phases`).send({ phase: 'on-bottom', at: '2026-05-17T17:00:00.000Z' });
    expect(early.status).toBe(400);
    expect((await (await t.signIn(emails.guest)).post(`/api/dives/${diveId}/phases`).send({ phase: 'on-deck' })).status).toBe(403);
    const now = await pilot.post(`/api/dives/${diveId}/phases`).send({ phase: 'on-bottom' });
    expect(Date.parse(now.body.phases.onBottom)).toBeGreaterThan(Date.parse('2026-05-17T18:00:00.000Z'));
  });

  it('edits a dive with a version; a stale one is a 409', async () => {
    const pilot = await t.signIn(emails.pilot);
    const dive = (await pilot.get(`/api/dives/${ids.dive}`)).body;
    const ok = await pilot
      .patch(`/api/dives/${ids.dive}`)
      .send({ version: dive.version, recordingStartAt: '2026-05-13T17:35:00.000Z', frameRate: '29.97 DF' });
    expect(ok.status).toBe(200);
    expect(ok.body.recording).toEqual({ startAt: '2026-05-13T17:35:00.000Z', frameRate: '29.97 DF' });
    expect((await pilot.patch(`/api/dives/${ids.dive}`).send({ version: dive.version, objectives: 'x' })).status).toBe(409);
    expect((await pilot.patch(`/api/dives/${ids.dive}`).send({ version: ok.body.version, frameRate: '31' })).status).toBe(400);
  });

  it('lets the lead add, rename and merge tags without losing any tagging', async () => {
    const lead = await t.signIn(emails.lead);
    const added = await lead.post(`/api/campaigns/${ids.campaign}/tags`).send({ name: 'bryozoan' });
    expect(added.status).toBe(201);
    expect((await lead.post(`/api/campaigns/${ids.campaign}/tags`).send({ name: 'Bryozoan' })).status).toBe(409);
    expect((await (await t.signIn(emails.biologist)).post(`/api/campaigns/${ids.campaign}/tags`).send({ name: 'x' })).status).toBe(403);

    const tagged = await logAs(emails.biologist, { kind: 'biology', title: 'Lace-like colony', tags: ['bryozoan'] });
    const renamed = await lead.patch(`/api/tags/${added.body.id}`).send({ name: 'bryozoa' });
    expect(renamed.body.name).toBe('bryozoa');
    expect((await detail(tagged.id)).tags).toEqual(['bryozoa']);

    const tagList = (await lead.get(`/api/campaigns/${ids.campaign}/tags`)).body as { id: string; name: string }[];
    const coral = tagList.find((x) => x.name === 'coral')!;
    const merged = await lead.patch(`/api/tags/${added.body.id}`).send({ mergeInto: coral.id });
    expect(merged.status).toBe(200);
    expect((await detail(tagged.id)).tags).toEqual(['coral']);
    const after = (await lead.get(`/api/campaigns/${ids.campaign}/tags`)).body as { name: string; retired: boolean }[];
    expect(after.find((x) => x.name === 'bryozoa')?.retired).toBe(true);
  });

  it('keeps quick marks per campaign, defined by the lead', async () => {
    const lead = await t.signIn(emails.lead);
    const made = await lead
      .post(`/api/campaigns/${ids.campaign}/quick-marks`)
      .send({ label: 'Ripple marks', kind: 'environment', tags: ['sediment'] });
    expect(made.status).toBe(201);
    expect(
      (await (await t.signIn(emails.pilot)).post(`/api/campaigns/${ids.campaign}/quick-marks`).send({ label: 'x', kind: 'operations' }))
        .status,
    ).toBe(403);
    const list = (await (await t.signIn(emails.guest)).get(`/api/campaigns/${ids.campaign}/quick-marks`)).body;
    expect(list).toContainEqual(expect.objectContaining({ label: 'Ripple marks', kind: 'environment', tags: ['sediment'] }));
    expect((await lead.delete(`/api/quick-marks/${made.body.id}`)).status).toBe(204);
    const after = (await lead.get(`/api/campaigns/${ids.campaign}/quick-marks`)).body as { id: string }[];
    expect(after.map((q) => q.id)).not.toContain(made.body.id);
    expect(after.length).toBe(list.length - 1);
  });

  it('carries a tag rename, merge or retirement into the quick marks, so a tap never fails on its tags', async () => {
    const lead = await t.signIn(emails.lead);
    const scour = await lead.post(`/api/campaigns/${ids.campaign}/tags`).send({ name: 'scour-pit' });
    const ripple = await lead.post(`/api/campaigns/${ids.campaign}/tags`).send({ name: 'ripple-field' });
    const mark = await lead
      .post(`/api/campaigns/${ids.campaign}/quick-marks`)
      .send({ label: 'Scour at the stern', kind: 'environment', tags: ['scour-pit', 'ripple-field', 'coral'] });
    expect(mark.status).toBe(201);
    const tagsOfMark = async () =>
      ((await lead.get(`/api/campaigns/${ids.campaign}/quick-marks`)).body as { id: string; tags: string[] }[]).find(
        (q) => q.id === mark.body.id,
      )!.tags;

    expect((await lead.patch(`/api/tags/${scour.body.id}`).send({ name: 'scour' })).status).toBe(200);
    expect(await tagsOfMark()).toEqual(['scour', 'ripple-field', 'coral']);
    const coral = ((await lead.get(`/api/campaigns/${ids.campaign}/tags`)).body as { id: string; name: string }[]).find(
      (x) => x.name === 'coral',
    )!;
    expect((await lead.patch(`/api/tags/${scour.body.id}`).send({ mergeInto: coral.id })).status).toBe(200);
    expect(await tagsOfMark()).toEqual(['coral', 'ripple-field']);
    expect((await lead.patch(`/api/tags/${ripple.body.id}`).send({ retired: true })).status).toBe(200);
    expect(await tagsOfMark()).toEqual(['coral']);
    // Nothing merges into a retired tag.
    const stray = await lead.post(`/api/campaigns/${ids.campaign}/tags`).send({ name: 'stray' });
    const intoRetired = await lead.patch(`/api/tags/${stray.body.id}`).send({ mergeInto: ripple.body.id });
    expect(intoRetired.status).toBe(400);
    expect(intoRetired.body.error.issues[0].path).toBe('mergeInto');

    // Tapping the mark logs an entry with its tags, as the app does.
    const tapped = await (
      await t.signIn(emails.biologist)
    )
      .post(`/api/dives/${ids.dive}/observations`)
      .send({ kind: 'environment', title: 'Scour at the stern', tags: await tagsOfMark() });
    expect(tapped.status).toBe(201);
  });
});

describe('sorting and filtering the log', () => {
  it('sorts by depth, shallowest first, with unknown depths last', async () => {
    const page = observationPageSchema.parse(
      (await (await t.signIn(emails.lead)).get(`/api/dives/${ids.dive}/observations`).query({ sort: 'depth', limit: 200 })).body,
    );
    const depths = page.items.map((o) => o.depth);
    const known = depths.filter((d): d is number => d !== null);
    expect(known).toEqual([...known].sort((a, b) => a - b));
    expect(depths.slice(known.length).every((d) => d === null)).toBe(true);
  });

  it('pages a non-time sort without repeating entries', async () => {
    const lead = await t.signIn(emails.lead);
    const seen: string[] = [];
    let cursor: string | null = null;
    do {
      const page = observationPageSchema.parse(
        (await lead.get(`/api/dives/${ids.dive}/observations`).query({ sort: 'author', limit: 6, ...(cursor ? { cursor } : {}) })).body,
      );
      seen.push(...page.items.map((o) => o.id));
      cursor = page.nextCursor;
    } while (cursor);
    expect(new Set(seen).size).toBe(seen.length);
  });
});

describe('sending the same entry twice', () => {
  it('stores it once when the device sends it again with the same clientRef', async () => {
    const bio = await t.signIn(emails.biologist);
    const body = { kind: 'biology', title: 'Sent over a dropping link', clientRef: 'device-7f3a9c21-0001' };
    const first = await bio.post(`/api/dives/${ids.dive}/observations`).send(body);
    const again = await bio.post(`/api/dives/${ids.dive}/observations`).send(body);
    expect(first.status).toBe(201);
    expect(again.status).toBe(200);
    expect(again.body.id).toBe(first.body.id);
    const n = t.ctx.db.$client.prepare("select count(*) from observations where title = 'Sent over a dropping link'").pluck().get();
    expect(n).toBe(1);
    // Another person's device may happen to use the same reference: that is a different entry.
    const other = await (await t.signIn(emails.guest)).post(`/api/dives/${ids.dive}/observations`).send(body);
    expect(other.status).toBe(201);
    expect(other.body.id).not.toBe(first.body.id);
  });
});
