import { createHash } from 'node:crypto';

import { count, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { campaigns, observations } from '@/db/schema';
import { campaignSchema, diveSchema, meSchema, observationPageSchema, observationSchema } from '@/lib/schemas';
import { tinyJpeg } from '../fixtures/photos/make';
import { emails } from '../helpers/demo';
import { buildFixtures, fixtureEntries, type Fixtures } from '../helpers/fixtures';
import { FAKE_INDEX, startTestServer, type TestServer } from '../helpers/test-server';

let t: TestServer;
let ids: Fixtures;

beforeAll(async () => {
  t = await startTestServer();
  ids = await buildFixtures(t);
});
afterAll(() => t.close());

const observationCount = () => t.ctx.db.select({ n: count() }).from(observations).get()!.n;

describe('health and the error shape', () => {
  it('answers health without a session', async () => {
    const res = await t.anonymous().get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ ok: true, version: expect.any(String) });
  });

  it('answers an unknown API route with a JSON 404, never the web page', async () => {
    for (const agent of [t.anonymous(), await t.signIn(emails.biologist)]) {
      for (const path of ['/api/no-such-thing', '/api/auth/no-such-thing']) {
        const res = await agent.get(path);
        expect(res.status, path).toBe(404);
        expect(res.headers['content-type'], path).toMatch(/json/);
        expect(res.body.error.code, path).toBe('not_found');
      }
    }
  });

  it('serves the web app for deep links, under a CSP that allows its inline script by hash', async () => {
    const res = await t.anonymous().get('/dives/some-dive-id');
    expect(res.status).toBe(200);
    expect(res.text).toBe(FAKE_INDEX);
    const hash = createHash('sha256').update('window.__bn=1').digest('base64');
    const csp = res.headers['content-security-policy'] as string;
    expect(csp).toContain(`script-src 'self' 'sha256-${hash}'`);
    expect(csp).not.toMatch(/script-src[^;]*unsafe-inline/);
    expect(csp).toContain("frame-ancestors 'none'");
  });

  it('sends security headers and no X-Powered-By', async () => {
    const res = await t.anonymous().get('/api/health');
    expect(res.headers['x-powered-by']).toBeUndefined();
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    // An API answer forbids everything a page could do (OWASP REST Security Cheat Sheet).
    expect(res.headers['content-security-policy']).toBe("default-src 'none'; frame-ancestors 'none'");
    expect(res.headers['referrer-policy']).toBe('no-referrer');
  });
});

describe('sign-in', () => {
  it('gives the same 401 body for a wrong password and an unknown address', async () => {
    const wrong = await t
      .anonymous()
      .post('/api/auth/sign-in/email')
      .set('Origin', t.url)
      .send({ email: emails.biologist, password: 'not-the-password' });
    const unknown = await t
      .anonymous()
      .post('/api/auth/sign-in/email')
      .set('Origin', t.url)
      .send({ email: 'nobody@bathynote.test', password: 'not-the-password' });
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(unknown.body).toEqual(wrong.body);
    expect(wrong.body.error).toEqual({ code: expect.any(String), message: expect.any(String) });
  });

  it('refuses passwords of 7 and 129 characters with field issues', async () => {
    for (const password of ['x'.repeat(7), 'x'.repeat(129)]) {
      const res = await t.anonymous().post('/api/auth/sign-in/email').set('Origin', t.url).send({ email: emails.biologist, password });
      expect(res.status).toBe(400);
      expect(res.body.error.issues).toContainEqual(expect.objectContaining({ path: 'password' }));
    }
  });

  it('keeps open sign-up off', async () => {
    const res = await t
      .anonymous()
      .post('/api/auth/sign-up/email')
      .set('Origin', t.url)
      .send({ email: 'newcomer@bathynote.test', password: 'long-enough-password', name: 'Newcomer' });
    expect(res.status).toBeGreaterThanOrEqual(400);
    expect(res.body.error).toBeDefined();
    const again = await t
      .anonymous()
      .post('/api/auth/sign-in/email')
      .set('Origin', t.url)
      .send({ email: 'newcomer@bathynote.test', password: 'long-enough-password' });
    expect(again.status).toBe(401);
  });

  it('sets an HttpOnly, SameSite=Lax session cookie', async () => {
    const res = await t
      .anonymous()
      .post('/api/auth/sign-in/email')
      .set('Origin', t.url)
      .send({ email: emails.guest, password: 'bathynote-demo' });
    expect(res.status).toBe(200);
    const cookie = ([] as string[]).concat(res.headers['set-cookie'] ?? []).find((c) => c.includes('session_token'));
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
  });

  it('refuses a sign-in posted from a foreign origin', async () => {
    const res = await t
      .anonymous()
      .post('/api/auth/sign-in/email')
      .set('Origin', 'https://evil.example')
      .send({ email: emails.guest, password: 'bathynote-demo' });
    expect(res.status).toBe(403);
  });

  it('refuses a change posted from another site to any API route, and nothing is stored', async () => {
    const agent = await t.signIn(emails.biologist);
    const path = `/api/dives/${ids.dive}/observations`;
    const count = async () => observationPageSchema.parse((await agent.get(`${path}?limit=200`)).body).items.length;
    const before = await count();
    const body = { kind: 'biology', title: 'Posted from elsewhere' };
    // Another port of the same host still gets the SameSite=Lax cookie; its Origin gives it away.
    for (const origin of ['https://evil.example', 'http://localhost:1']) {
      const res = await agent.post(path).set('Origin', origin).send(body);
      expect(res.status, origin).toBe(403);
      expect(res.body.error.code).toBe('foreign_origin');
    }
    const noOrigin = await agent.post(path).set('Sec-Fetch-Site', 'same-site').send(body);
    expect(noOrigin.status).toBe(403);
    expect(await count()).toBe(before);

    const here = await agent
      .post(path)
      .set('Origin', t.url)
      .send({ ...body, title: 'Posted here' });
    const hereToo = await agent
      .post(path)
      .set('Sec-Fetch-Site', 'same-origin')
      .send({ ...body, title: 'Posted here too' });
    expect([here.status, hereToo.status]).toEqual([201, 201]);
    expect((await agent.get(path).set('Origin', 'https://evil.example')).status).toBe(200);
    // Leave the dive as the other tests know it.
    for (const res of [here, hereToo])
      expect((await agent.delete(`/api/observations/${res.body.id}`).set('Origin', t.url)).status).toBe(200);
  });

  it('signs out: the old cookie then gets 401', async () => {
    const agent = await t.freshSignIn(emails.pilot);
    expect((await agent.get('/api/me')).status).toBe(200);
    const out = await agent.post('/api/auth/sign-out').set('Origin', t.url).send({});
    expect(out.status).toBe(200);
    expect((await agent.get('/api/me')).status).toBe(401);
  });
});

describe('who sees what', () => {
  it('asks anonymous callers to sign in on every API route', async () => {
    const anon = t.anonymous();
    for (const path of [
      '/api/me',
      '/api/campaigns',
      `/api/campaigns/${ids.campaign}`,
      `/api/campaigns/${ids.campaign}/dives`,
      `/api/campaigns/${ids.campaign}/members`,
      `/api/campaigns/${ids.campaign}/tags`,
      `/api/dives/${ids.dive}`,
      `/api/dives/${ids.dive}/observations`,
    ]) {
      const res = await anon.get(path);
      expect(res.status, path).toBe(401);
      expect(res.body.error.code, path).toBe('unauthorized');
    }
    const post = await anon.post(`/api/dives/${ids.dive}/observations`).send({ kind: 'biology', title: 'x' });
    expect(post.status).toBe(401);
  });

  it('tells a member who they are and where they belong', async () => {
    const agent = await t.signIn(emails.biologist);
    const me = meSchema.parse((await agent.get('/api/me')).body);
    expect(me.user.email).toBe(emails.biologist);
    expect(me.siteRole).toBe('user');
    expect(me.memberships).toEqual(
      expect.arrayContaining([
        { campaignId: ids.campaign, role: 'scientist' },
        { campaignId: ids.otherCampaign, role: 'scientist' },
      ]),
    );
  });

  it('lists only the campaigns a person belongs to; all of them for the site administrator', async () => {
    const list = async (email: string) =>
      ((await (await t.signIn(email)).get('/api/campaigns')).body as { id: string }[]).map((c) => c.id).sort();
    // The demo's campaigns are there too; only the tests' own are looked at.
    const ours = async (email: string) => (await list(email)).filter((id) => id === ids.campaign || id === ids.otherCampaign);
    expect(await list(emails.outsider)).toEqual([]);
    expect(await ours(emails.guest)).toEqual([ids.campaign]);
    expect(await ours(emails.biologist)).toEqual([ids.otherCampaign, ids.campaign].sort());
    expect(await ours(emails.admin)).toEqual([ids.otherCampaign, ids.campaign].sort());
    const every = t.ctx.db.select({ id: campaigns.id }).from(campaigns).all();
    expect(await list(emails.admin)).toEqual(every.map((c) => c.id).sort());
  });

  it('hides a campaign and everything in it from non-members with a 404', async () => {
    const outsider = await t.signIn(emails.outsider);
    const guest = await t.signIn(emails.guest);
    const someEntry = observationPageSchema.parse(
      (await (await t.signIn(emails.lead)).get(`/api/dives/${ids.otherDive}/observations`)).body,
    ).items[0]!;
    const before = observationCount();
    for (const [agent, paths] of [
      [
        outsider,
        [
          `/api/campaigns/${ids.campaign}`,
          `/api/campaigns/${ids.campaign}/dives`,
          `/api/dives/${ids.dive}`,
          `/api/dives/${ids.dive}/observations`,
        ],
      ],
      [
        guest,
        [
          `/api/campaigns/${ids.otherCampaign}`,
          `/api/dives/${ids.otherDive}`,
          `/api/dives/${ids.otherDive}/observations`,
          `/api/observations/${someEntry.id}`,
        ],
      ],
    ] as const) {
      for (const path of paths) {
        const res = await agent.get(path);
        expect(res.status, path).toBe(404);
        expect(res.body).toEqual((await agent.get('/api/campaigns/no-such-campaign')).body);
      }
    }
    const post = await guest.post(`/api/dives/${ids.otherDive}/observations`).send({ kind: 'biology', title: 'Sneaky' });
    expect(post.status).toBe(404);
    expect(observationCount()).toBe(before);
  });

  it('answers a member with the campaign, its dives and a dive', async () => {
    const agent = await t.signIn(emails.guest);
    const campaign = campaignSchema.parse((await agent.get(`/api/campaigns/${ids.campaign}`)).body);
    expect(campaign).toMatchObject({ name: ids.campaignName, myRole: 'guest', diveCount: 1, observationCount: fixtureEntries.length });
    const dives = (await agent.get(`/api/campaigns/${ids.campaign}/dives`)).body.map((d: unknown) => diveSchema.parse(d));
    expect(dives.map((d: { number: string }) => d.number)).toEqual(['T-01']);
    const dive = diveSchema.parse((await agent.get(`/api/dives/${ids.dive}`)).body);
    expect(dive.number).toBe('T-01');
    expect(dive.phases.launch).toMatch(/Z$/);
  });
});

describe('the dive log', () => {
  it('lists a dive newest first, in pages that do not overlap', async () => {
    const agent = await t.signIn(emails.biologist);
    const seen: string[] = [];
    const times: number[] = [];
    let cursor: string | null = null;
    do {
      const res = await agent.get(`/api/dives/${ids.dive}/observations`).query({ limit: 7, ...(cursor ? { cursor } : {}) });
      expect(res.status).toBe(200);
      const page = observationPageSchema.parse(res.body);
      seen.push(...page.items.map((o) => o.id));
      times.push(...page.items.map((o) => Date.parse(o.observedAt)));
      cursor = page.nextCursor;
    } while (cursor);
    expect(new Set(seen).size).toBe(seen.length);
    expect(seen.length).toBe(20);
    expect(times).toEqual([...times].sort((a, b) => b - a));
  });

  it('refuses a forged cursor and nonsense filters with 400', async () => {
    const agent = await t.signIn(emails.biologist);
    const bad = await agent.get(`/api/dives/${ids.dive}/observations`).query({ cursor: 'not-a-cursor' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.issues[0].path).toBe('cursor');
    const kind = await agent.get(`/api/dives/${ids.dive}/observations`).query({ kind: "biology' OR 1=1 --" });
    expect(kind.status).toBe(400);
    const tag = await agent.get(`/api/dives/${ids.dive}/observations`).query({ tag: "x' OR '1'='1" });
    expect(tag.status).toBe(200);
    expect(tag.body.items).toEqual([]);
  });

  it('filters by kind and by tag', async () => {
    const agent = await t.signIn(emails.biologist);
    const bio = observationPageSchema.parse(
      (await agent.get(`/api/dives/${ids.dive}/observations`).query({ kind: 'biology', limit: 200 })).body,
    );
    expect(bio.items.length).toBeGreaterThan(0);
    expect(bio.items.every((o) => o.kind === 'biology')).toBe(true);
    const tagged = observationPageSchema.parse(
      (await agent.get(`/api/dives/${ids.dive}/observations`).query({ tag: 'AMPHORA', limit: 200 })).body,
    );
    expect(tagged.items.length).toBeGreaterThan(0);
    expect(tagged.items.every((o) => o.tags.includes('amphora'))).toBe(true);
  });

  it('filters by photos, verification and author, and sorts by depth, kind and author', async () => {
    const agent = await t.signIn(emails.biologist);
    const list = async (query: Record<string, string>) =>
      observationPageSchema.parse((await agent.get(`/api/dives/${ids.dive}/observations`).query({ limit: 200, ...query })).body).items;
    // The fixtures have no photos: one frame grab on one of the biologist's entries.
    const framed = (await list({})).find((o) => o.authorId === ids.userId(emails.biologist))!;
    const attached = await agent.post(`/api/observations/${framed.id}/photos`).attach('photo', await tinyJpeg(), {
      filename: 'frame.jpg',
      contentType: 'image/jpeg',
    });
    expect(attached.status).toBe(201);
    const all = await list({});
    const withPhotos = await list({ hasPhotos: 'true' });
    expect(withPhotos.map((o) => o.id)).toContain(framed.id);
    const without = await list({ hasPhotos: 'false' });
    expect(withPhotos.length).toBeGreaterThan(0);
    expect(withPhotos.every((o) => o.photoCount > 0)).toBe(true);
    expect(without.every((o) => o.photoCount === 0)).toBe(true);
    expect(withPhotos.length + without.length).toBe(all.length);

    // And one name verified by the lead (identified by someone else).
    const named = all.find((o) => o.identification && o.identification.verificationStatus !== 'verified')!;
    const lead = await t.signIn(emails.lead);
    const verifying = await lead
      .post(`/api/observations/${named.id}/identification/verify`)
      .send({ version: named.version, status: 'verified' });
    expect(verifying.status, JSON.stringify(verifying.body)).toBe(200);
    const verified = await list({ verification: 'verified' });
    expect(verified.map((o) => o.id)).toContain(named.id);
    expect(verified.length).toBe((await list({})).filter((o) => o.identification?.verificationStatus === 'verified').length);
    expect(verified.every((o) => o.identification?.verificationStatus === 'verified')).toBe(true);
    const author = all[0]!.authorId;
    const mine = await list({ author });
    expect(mine.length).toBe(all.filter((o) => o.authorId === author).length);
    expect(mine.every((o) => o.authorId === author)).toBe(true);

    const inOrder = <T>(values: T[], before: (a: T, b: T) => boolean) => values.every((v, i) => i === 0 || !before(v, values[i - 1]!));
    const deepest = (await list({ sort: 'depth', order: 'desc' })).map((o) => o.depth);
    const known = deepest.filter((d): d is number => d !== null);
    expect(inOrder(known, (a, b) => a > b)).toBe(true);
    // Entries without a depth come last, in either order.
    expect(deepest.slice(known.length).every((d) => d === null)).toBe(true);
    expect(
      inOrder(
        (await list({ sort: 'kind' })).map((o) => o.kind),
        (a, b) => a < b,
      ),
    ).toBe(true);
    const names = (await list({ sort: 'author', order: 'desc' })).map((o) => o.authorName.toLowerCase());
    expect(inOrder(names, (a, b) => a > b)).toBe(true);
    expect(new Set(names).size).toBeGreaterThan(1);
  });
});

describe('logging an observation', () => {
  it('creates one and reads it back, for the author and for another member', async () => {
    const biologist = await t.signIn(emails.biologist);
    const body = {
      kind: 'biology',
      title: 'Microbial mat on the port frames',
      observedAt: '2026-05-13T21:14:07.250Z',
      depth: 598.4,
      note: 'Filamentous *mat*, about **40 %** cover.',
      tags: ['microbial-mat', 'Hull'],
    };
    const res = await biologist.post(`/api/dives/${ids.dive}/observations`).send(body);
    expect(res.status).toBe(201);
    const created = observationSchema.parse(res.body);
    expect(res.headers.location).toBe(`/api/observations/${created.id}`);
    expect(created).toMatchObject({
      diveId: ids.dive,
      kind: 'biology',
      title: body.title,
      observedAt: '2026-05-13T21:14:07.250Z',
      depth: 598.4,
      depthSource: 'manual',
      tags: ['hull', 'microbial-mat'],
      version: 1,
      retired: false,
      authorId: ids.userId(emails.biologist),
    });
    const lead = await t.signIn(emails.lead);
    const read = observationSchema.parse((await lead.get(`/api/observations/${created.id}`)).body);
    expect(read).toEqual(created);
    const log = observationPageSchema.parse((await lead.get(`/api/dives/${ids.dive}/observations`).query({ limit: 200 })).body);
    expect(log.items.map((o) => o.id)).toContain(created.id);
  });

  it('defaults the time to now, in UTC', async () => {
    const agent = await t.signIn(emails.guest);
    const before = Date.now();
    const res = await agent.post(`/api/dives/${ids.dive}/observations`).send({ kind: 'environment', title: 'Turbidity rising' });
    expect(res.status).toBe(201);
    const at = Date.parse(res.body.observedAt);
    expect(at).toBeGreaterThanOrEqual(before - 5);
    expect(at).toBeLessThanOrEqual(Date.now() + 5);
    expect(res.body.observedAt).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}\.\d{3}Z$/);
    expect(res.body.depth).toBeNull();
    expect(res.body.depthSource).toBeNull();
  });

  it('reads an offset time as the instant it names', async () => {
    const agent = await t.signIn(emails.biologist);
    const res = await agent
      .post(`/api/dives/${ids.dive}/observations`)
      .send({ kind: 'biology', title: 'Offset', observedAt: '2026-05-13T23:14:07+02:00' });
    expect(res.status).toBe(201);
    expect(res.body.observedAt).toBe('2026-05-13T21:14:07.000Z');
  });

  it.each([
    ['malformed JSON', '{"kind": "biology", "title": ', 'malformed_json', undefined],
    ['an unknown kind', { kind: 'geology', title: 'Rock' }, 'validation_failed', 'kind'],
    ['a missing title', { kind: 'biology' }, 'validation_failed', 'title'],
    ['a blank title', { kind: 'biology', title: '   ' }, 'validation_failed', 'title'],
    ['a depth as text', { kind: 'biology', title: 'x', depth: '600' }, 'validation_failed', 'depth'],
    ['a depth deeper than the ocean', { kind: 'biology', title: 'x', depth: 12000 }, 'validation_failed', 'depth'],
    ['a local time without zone', { kind: 'biology', title: 'x', observedAt: '2026-05-13T21:14:07' }, 'validation_failed', 'observedAt'],
    ['a time that is not ISO 8601', { kind: 'biology', title: 'x', observedAt: '13/05/2026 21:14' }, 'validation_failed', 'observedAt'],
    ['latitude without longitude', { kind: 'biology', title: 'x', lat: 36.1 }, 'validation_failed', 'lon'],
    ['a smuggled author', { kind: 'biology', title: 'x', authorId: 'someone-else' }, 'validation_failed', '(body)'],
    ['a smuggled campaign', { kind: 'biology', title: 'x', campaignId: 'elsewhere' }, 'validation_failed', '(body)'],
    ['a tag with a comma', { kind: 'biology', title: 'x', tags: ['a,b'] }, 'validation_failed', 'tags.0'],
  ])('refuses %s with 400 and stores nothing', async (_name, body, code, path) => {
    const agent = await t.signIn(emails.biologist);
    const before = observationCount();
    const req = agent.post(`/api/dives/${ids.dive}/observations`).set('content-type', 'application/json');
    const res = await req.send(typeof body === 'string' ? body : JSON.stringify(body));
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe(code);
    if (path) expect(res.body.error.issues.map((i: { path: string }) => i.path)).toContain(path);
    expect(observationCount()).toBe(before);
  });

  it('refuses a body over the size limit with 413', async () => {
    const agent = await t.signIn(emails.biologist);
    const res = await agent.post(`/api/dives/${ids.dive}/observations`).send({ kind: 'biology', title: 'big', note: 'x'.repeat(300_000) });
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('too_large');
  });

  it('keeps a tag unknown to a closed vocabulary out, as a field error', async () => {
    t.ctx.db.$client.prepare('update campaigns set allow_free_tags = 0 where id = ?').run(ids.campaign);
    try {
      const agent = await t.signIn(emails.biologist);
      const res = await agent
        .post(`/api/dives/${ids.dive}/observations`)
        .send({ kind: 'biology', title: 'x', tags: ['coral', 'not-in-vocabulary'] });
      expect(res.status).toBe(400);
      expect(res.body.error.issues).toEqual([expect.objectContaining({ path: 'tags.1' })]);
    } finally {
      t.ctx.db.$client.prepare('update campaigns set allow_free_tags = 1 where id = ?').run(ids.campaign);
    }
  });

  it('stores nothing of a create whose tag step fails half way', async () => {
    const agent = await t.signIn(emails.biologist);
    const before = observationCount();
    const tagsBefore = t.ctx.db.$client.prepare('select count(*) n from tags').get() as { n: number };
    t.ctx.db.$client.prepare('update campaigns set allow_free_tags = 0 where id = ?').run(ids.campaign);
    try {
      await agent.post(`/api/dives/${ids.dive}/observations`).send({ kind: 'biology', title: 'x', tags: ['brand-new-tag'] });
    } finally {
      t.ctx.db.$client.prepare('update campaigns set allow_free_tags = 1 where id = ?').run(ids.campaign);
    }
    expect(observationCount()).toBe(before);
    expect(t.ctx.db.$client.prepare('select count(*) n from tags').get()).toEqual(tagsBefore);
    const row = t.ctx.db.select().from(observations).where(eq(observations.title, 'x')).all();
    expect(row).toEqual([]);
  });
});

describe('timing', () => {
  it('tells how long the server took, apart from the link', async () => {
    const res = await (await t.signIn(emails.biologist)).get(`/api/dives/${ids.dive}/observations`);
    expect(res.headers['server-timing']).toMatch(/^app;dur=\d+(\.\d)?$/);
  });
});
