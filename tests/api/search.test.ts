import { and, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { memberships, observations } from '@/db/schema';
import { observationSchema, type Observation } from '@/lib/schemas';
import { searchPageSchema, type SearchPage } from '@/lib/schemas/search';
import { demoIds, emails } from '../helpers/demo';
import { startTestServer, type TestServer } from '../helpers/test-server';

/*
 * Every entry here is made by the test with invented words that occur nowhere in the demo, so the
 * demo may change freely.
 */

let t: TestServer;
let ids: ReturnType<typeof demoIds>;

beforeAll(async () => {
  t = await startTestServer({ env: { AUTH_RATE_LIMIT: '200' } });
  ids = demoIds(t.ctx.db);
});
afterAll(() => t.close());

async function log(email: string, diveId: string, body: Record<string, unknown>): Promise<Observation> {
  const res = await (await t.signIn(email)).post(`/api/dives/${diveId}/observations`).send(body);
  expect(res.status).toBe(201);
  return observationSchema.parse(res.body);
}

async function search(email: string, params: Record<string, string>): Promise<SearchPage> {
  const res = await (await t.signIn(email)).get('/api/search').query(params);
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return searchPageSchema.parse(res.body);
}

const titles = (page: SearchPage) => page.items.map((i) => i.title);

describe('who finds what', () => {
  let e2026: Observation;
  let e2024: Observation;

  beforeAll(async () => {
    e2026 = await log(emails.lead, ids.dive2026, {
      kind: 'biology',
      title: 'Vorlintic mat on the keelson',
      note: 'Thick ochre vorlintic growth.',
    });
    e2024 = await log(emails.lead, ids.dive2024, { kind: 'biology', title: 'Vorlintic mat by the rudder', note: 'Older, thinner.' });
  });

  it('a member of both campaigns finds entries of both, each with its campaign and dive', async () => {
    const page = await search(emails.lead, { q: 'vorlintic' });
    expect(page.items.map((i) => i.id).sort()).toEqual([e2026.id, e2024.id].sort());
    const item = page.items.find((i) => i.id === e2024.id)!;
    expect(item.campaignName).toBe('Varn Shoal 2024');
    expect(item.campaignId).toBe(ids.campaign2024);
    expect(item.diveNumber).toBe('VS24-01');
    expect(item.matchedFields).toContain('title');
    expect(item.titleParts).toContainEqual({ text: 'Vorlintic', match: true });
    expect(item.score).toBeGreaterThan(0);
  });

  it('a guest of one campaign finds nothing of the other', async () => {
    const page = await search(emails.guest, { q: 'vorlintic' });
    expect(page.items.map((i) => i.id)).toEqual([e2026.id]);
    expect(page.total).toBe(1);
    // Asking for the other campaign by id reveals nothing either.
    expect((await search(emails.guest, { q: 'vorlintic', campaignId: ids.campaign2024 })).items).toEqual([]);
  });

  it('a member of no campaign finds nothing', async () => {
    const page = await search(emails.outsider, { q: 'vorlintic' });
    expect(page).toMatchObject({ items: [], total: 0, nextCursor: null });
  });

  it('the site administrator finds every campaign', async () => {
    expect((await search(emails.admin, { q: 'vorlintic' })).total).toBe(2);
  });

  it('a removed member stops finding the campaign on the next query', async () => {
    const db = t.ctx.db;
    const bioId = ids.userId(emails.biologist);
    db.insert(memberships).values({ campaignId: ids.campaign2024, userId: bioId, role: 'scientist' }).onConflictDoNothing().run();
    expect((await search(emails.biologist, { q: 'vorlintic' })).total).toBe(2);
    const removed = await (await t.signIn(emails.lead)).delete(`/api/campaigns/${ids.campaign2024}/members/${bioId}`);
    expect(removed.status).toBeLessThan(300);
    expect(
      db
        .select()
        .from(memberships)
        .where(and(eq(memberships.campaignId, ids.campaign2024), eq(memberships.userId, bioId)))
        .get(),
    ).toBeUndefined();
    const after = await search(emails.biologist, { q: 'vorlintic' });
    expect(after.items.map((i) => i.id)).toEqual([e2026.id]);
  });

  it('anonymous callers get 401', async () => {
    const res = await t.anonymous().get('/api/search').query({ q: 'vorlintic' });
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthorized');
  });
});

describe('typos and ranking', () => {
  let plume: Observation;
  let byName: Observation;
  let nameInTitle: Observation;
  let byFind: Observation;
  let findInTitle: Observation;

  beforeAll(async () => {
    plume = await log(emails.lead, ids.dive2026, {
      kind: 'environment',
      title: 'Brackomere plume over the quintessal ridge',
      note: 'A shimmering plume rises from the sediment.',
    });
    // The name typed exactly is this entry's scientific name …
    byName = await log(emails.biologist, ids.dive2026, { kind: 'biology', title: 'Small pale colony', note: 'Two polyps.' });
    const ident = await (
      await t.signIn(emails.biologist)
    )
      .put(`/api/observations/${byName.id}/identification`)
      .send({ version: 1, scientificName: 'Zeltrania fossoria' });
    expect(ident.status).toBe(200);
    // … while this one only has the same words, twice, in its title (a higher-weighted field).
    nameInTitle = await log(emails.biologist, ids.dive2026, {
      kind: 'biology',
      title: 'Zeltrania fossoria look-alike, zeltrania fossoria again',
    });
    byFind = await log(emails.archaeologist, ids.dive2026, { kind: 'archaeology', title: 'Lead sheathing fragment' });
    const find = await (
      await t.signIn(emails.archaeologist)
    )
      .put(`/api/observations/${byFind.id}/find`)
      .send({ version: 1, findNumber: 'QX-7731' });
    expect(find.status).toBe(200);
    findInTitle = await log(emails.archaeologist, ids.dive2026, { kind: 'archaeology', title: 'Near QX 7731, QX 7731 again' });
  });

  it('finds entries through a typo in a long word (two edits) and in a short one (one edit)', async () => {
    expect(titles(await search(emails.lead, { q: 'brackomree' }))).toContain(plume.title);
    expect(titles(await search(emails.lead, { q: 'quintesal ridhe' }))).toContain(plume.title);
    expect(titles(await search(emails.lead, { q: 'plune brackomere' }))).toContain(plume.title);
  });

  it('marks the matched words, typo alternatives included, in the title and the snippet', async () => {
    const page = await search(emails.lead, { q: 'brackomree shimering' });
    const item = page.items.find((i) => i.id === plume.id)!;
    expect(item.titleParts.filter((p) => p.match).map((p) => p.text)).toEqual(['Brackomere']);
    expect(item.snippet.filter((p) => p.match).map((p) => p.text)).toEqual(['shimmering']);
    expect(item.matchedFields).toEqual(['title', 'note']);
    expect(page.terms).toEqual(expect.arrayContaining(['brackomere', 'shimmering']));
  });

  it('matches the last word as a prefix while it is being typed', async () => {
    expect(titles(await search(emails.lead, { q: 'brackomere quintes' }))).toContain(plume.title);
    // A finished word (followed by a space) is not a prefix any more.
    expect(titles(await search(emails.lead, { q: 'brackomere quintes ' }))).not.toContain(plume.title);
  });

  it('a typo that makes another known word is widened when the words as typed find nothing', async () => {
    const near = await log(emails.lead, ids.dive2026, { kind: 'environment', title: 'Brackomore haze' });
    // "brackomore" is a known word, so on its own it finds its own entry and nothing is widened.
    const own = await search(emails.lead, { q: 'brackomore' });
    expect(own.widened).toBe(false);
    expect(own.items.map((i) => i.id)).toEqual([near.id]);
    // With "plume" no entry has both words as typed; widened, the plume entry is found.
    const page = await search(emails.lead, { q: 'brackomore plume' });
    expect(page.widened).toBe(true);
    expect(page.items.map((i) => i.id)).toEqual([plume.id]);
  });

  it('an exact scientific name comes first', async () => {
    const page = await search(emails.lead, { q: 'Zeltrania fossoria' });
    expect(page.items[0]!.id).toBe(byName.id);
    expect(page.items[0]!.exact).toBe(true);
    expect(page.items[0]!.matchedFields).toEqual(['scientificName']);
    expect(page.items.map((i) => i.id)).toContain(nameInTitle.id);
    // Without the exact rule the title's weight would put the other entry first.
    const partial = await search(emails.lead, { q: 'zeltrania fossoria again' });
    expect(partial.items.map((i) => i.id)).toEqual([nameInTitle.id]);
  });

  it('a title holding the typed words side by side comes before one with them scattered', async () => {
    const scattered = await log(emails.lead, ids.dive2026, { kind: 'biology', title: 'Sculpin sculpin, ledge marrowfin ledge marrowfin' });
    const phrase = await log(emails.lead, ids.dive2026, {
      kind: 'biology',
      title: 'Marrowfin ledge sculpin resting under a plank of the hull',
    });
    expect((await search(emails.lead, { q: 'sculpin marrowfin' })).items[0]!.id).toBe(scattered.id);
    expect((await search(emails.lead, { q: 'marrowfin ledge sculpin' })).items.map((i) => i.id)).toEqual([phrase.id, scattered.id]);
    // Also through a typo.
    expect((await search(emails.lead, { q: 'marowfin ledge sculpin' })).items.map((i) => i.id)).toEqual([phrase.id, scattered.id]);
  });

  it('an exact find number comes first', async () => {
    const page = await search(emails.lead, { q: 'qx-7731' });
    expect(page.items.map((i) => i.id)).toEqual([byFind.id, findInTitle.id]);
    expect(page.items[0]!.exact).toBe(true);
    expect(page.items[1]!.exact).toBe(false);
  });
});

describe('filters', () => {
  let deep: Observation;

  beforeAll(async () => {
    deep = await log(emails.lead, ids.dive2026, {
      kind: 'biology',
      title: 'Gorvellic sponge',
      depth: 610,
      observedAt: '2026-05-14T21:14:07.250Z',
      tags: ['gorvellic-tag'],
    });
    await log(emails.lead, ids.dive2026, { kind: 'biology', title: 'Gorvellic sponge, shallow', depth: 480, tags: ['gorvellic-tag'] });
    await log(emails.lead, ids.dive2026, { kind: 'archaeology', title: 'Gorvellic sherd', depth: 615 });
    await log(emails.lead, ids.dive2024, { kind: 'biology', title: 'Gorvellic sponge of 2024', depth: 612, tags: ['gorvellic-tag'] });
  });

  it('combine: kind, tag, depth range, time range, campaign and dive', async () => {
    expect((await search(emails.lead, { q: 'gorvellic' })).total).toBe(4);
    expect((await search(emails.lead, { q: 'gorvellic', kind: 'biology' })).total).toBe(3);
    expect((await search(emails.lead, { q: 'gorvellic', kind: 'biology', minDepth: '600' })).total).toBe(2);
    expect(
      (await search(emails.lead, { q: 'gorvellic', kind: 'biology', minDepth: '600', campaignId: ids.campaign2026 })).items.map(
        (i) => i.id,
      ),
    ).toEqual([deep.id]);
    expect((await search(emails.lead, { q: 'gorvellic', tag: 'GORVELLIC-TAG', maxDepth: '500' })).total).toBe(1);
    expect(
      (
        await search(emails.lead, {
          q: 'gorvellic',
          from: '2026-05-14T21:00:00.000Z',
          to: '2026-05-14T21:30:00.000Z',
          diveId: ids.dive2026,
        })
      ).items.map((i) => i.id),
    ).toEqual([deep.id]);
    expect((await search(emails.lead, { q: 'gorvellic', hasPhotos: 'true' })).total).toBe(0);
    expect((await search(emails.lead, { q: 'gorvellic', verification: 'verified' })).total).toBe(0);
    expect((await search(emails.lead, { q: 'gorvellic', author: ids.userId(emails.biologist) })).total).toBe(0);
  });

  it('pages through results without repeats', async () => {
    const first = await search(emails.lead, { q: 'gorvellic', limit: '3' });
    expect(first.items).toHaveLength(3);
    expect(first.total).toBe(4);
    expect(first.nextCursor).not.toBeNull();
    const second = await search(emails.lead, { q: 'gorvellic', limit: '3', cursor: first.nextCursor! });
    expect(second.items).toHaveLength(1);
    expect(second.nextCursor).toBeNull();
    expect(new Set([...first.items, ...second.items].map((i) => i.id)).size).toBe(4);
  });

  it('refuses a bad filter or cursor with 400 and its field', async () => {
    const lead = await t.signIn(emails.lead);
    for (const [query, field] of [
      [{ q: 'gorvellic', minDepth: 'deep' }, 'minDepth'],
      [{ q: 'gorvellic', from: '2026-05-14 21:00' }, 'from'],
      [{ q: 'gorvellic', kind: 'fish' }, 'kind'],
      [{ q: 'gorvellic', cursor: 'not-a-cursor' }, 'cursor'],
      [{ q: 'gorvellic', sort: 'title' }, ''],
      [{ q: '' }, 'q'],
      [{}, 'q'],
    ] as const) {
      const res = await lead.get('/api/search').query(query);
      expect(res.status, JSON.stringify(query)).toBe(400);
      expect(res.body.error.code).toBe('validation_failed');
      if (field) expect(res.body.error.issues.map((i: { path: string }) => i.path)).toContain(field);
    }
  });
});

describe('download', () => {
  it('gives the same results as CSV, best first, and only of the caller’s campaigns', async () => {
    const lead = await t.signIn(emails.lead);
    const res = await lead
      .get('/api/search/export.csv')
      .query({ q: 'gorvellic', kind: 'biology' })
      .buffer(true)
      .parse((r, done) => {
        let text = '';
        r.setEncoding('utf8');
        r.on('data', (c: string) => (text += c));
        r.on('end', () => done(null, text));
      });
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/^text\/csv/);
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename="bathynote-search-/);
    const lines = (res.body as string)
      .replace(/^\uFEFF/, '')
      .trim()
      .split(/\r?\n/);
    const page = await search(emails.lead, { q: 'gorvellic', kind: 'biology', limit: '50' });
    expect(lines).toHaveLength(1 + page.total);
    for (const [i, item] of page.items.entries()) expect(lines[i + 1]).toContain(item.id);
    // A guest of the 2026 campaign gets its rows only.
    const guest = await (
      await t.signIn(emails.guest)
    )
      .get('/api/search/export.csv')
      .query({ q: 'gorvellic' })
      .buffer(true)
      .parse((r, done) => {
        let text = '';
        r.setEncoding('utf8');
        r.on('data', (c: string) => (text += c));
        r.on('end', () => done(null, text));
      });
    expect((guest.body as string).trim().split(/\r?\n/)).toHaveLength(1 + 3);
    expect((await lead.get('/api/search/export.csv').query({ q: 'gorvellic', limit: '5' })).status).toBe(400);
  });
});

describe('retired entries', () => {
  it('are never found, and a restored one is found again', async () => {
    const entry = await log(emails.lead, ids.dive2026, { kind: 'operations', title: 'Tramblewick clamp adjusted', tags: ['tramblewick'] });
    const lead = await t.signIn(emails.lead);
    expect((await search(emails.lead, { q: 'tramblewick' })).total).toBe(1);
    expect((await lead.delete(`/api/observations/${entry.id}`)).status).toBeLessThan(300);
    expect((await search(emails.lead, { q: 'tramblewick' })).total).toBe(0);
    expect((await search(emails.admin, { q: 'tramblewick' })).total).toBe(0);
    expect((await lead.post(`/api/observations/${entry.id}/restore`)).status).toBe(200);
    expect((await search(emails.lead, { q: 'tramblewick' })).items.map((i) => i.id)).toEqual([entry.id]);
  });

  it('edits and tag renames reach the index at once', async () => {
    const entry = await log(emails.lead, ids.dive2026, { kind: 'biology', title: 'Plain crab', tags: ['skellamine'] });
    const lead = await t.signIn(emails.lead);
    expect((await lead.patch(`/api/observations/${entry.id}`).send({ version: 1, title: 'Ombrastic crab' })).status).toBe(200);
    expect((await search(emails.lead, { q: 'ombrastic' })).items.map((i) => i.id)).toEqual([entry.id]);
    expect((await search(emails.lead, { q: 'plain crab' })).items.map((i) => i.id)).not.toContain(entry.id);

    const tags = (await lead.get(`/api/campaigns/${ids.campaign2026}/tags`)).body as { id: string; name: string }[];
    const tag = tags.find((x) => x.name === 'skellamine')!;
    expect((await lead.patch(`/api/tags/${tag.id}`).send({ name: 'frondovar' })).status).toBe(200);
    const page = await search(emails.lead, { q: 'frondovar' });
    expect(page.items.map((i) => i.id)).toEqual([entry.id]);
    expect(page.items[0]!.matchedFields).toEqual(['tags']);
    expect((await search(emails.lead, { q: 'skellamine' })).total).toBe(0);
  });
});

describe('the index follows every change', () => {
  it('a search asked again gives nothing kept from before a change: an edit, a new entry, a retired one', async () => {
    const lead = await t.signIn(emails.lead);
    const first = await log(emails.lead, ids.dive2026, { kind: 'biology', title: 'Quillomantic fan worm' });
    // Asked twice in a row: the second answer is the same ranking.
    expect((await search(emails.lead, { q: 'quillomantic' })).items.map((i) => i.id)).toEqual([first.id]);
    expect((await search(emails.lead, { q: 'quillomantic' })).items.map((i) => i.id)).toEqual([first.id]);
    const second = await log(emails.lead, ids.dive2024, { kind: 'biology', title: 'Quillomantic tube' });
    expect((await search(emails.lead, { q: 'quillomantic' })).items.map((i) => i.id).sort()).toEqual([first.id, second.id].sort());
    expect((await lead.patch(`/api/observations/${first.id}`).send({ version: 1, title: 'Fan worm' })).status).toBe(200);
    expect((await search(emails.lead, { q: 'quillomantic' })).items.map((i) => i.id)).toEqual([second.id]);
    expect((await lead.delete(`/api/observations/${second.id}`)).status).toBeLessThan(300);
    expect(await search(emails.lead, { q: 'quillomantic' })).toMatchObject({ items: [], total: 0 });
    // Another person with other campaigns asking the same gets their own answer, not the lead's.
    const again = await log(emails.lead, ids.dive2024, { kind: 'biology', title: 'Quillomantic cluster' });
    expect((await search(emails.lead, { q: 'quillomantic' })).items.map((i) => i.id)).toEqual([again.id]);
    expect((await search(emails.guest, { q: 'quillomantic' })).total).toBe(0);
  });

  it('a new entry is found by each of its tags, and a tag put on or taken off in an edit counts at once', async () => {
    const entry = await log(emails.lead, ids.dive2026, { kind: 'biology', title: 'Brittle star', tags: ['vornellic', 'quastrine'] });
    for (const q of ['vornellic', 'quastrine']) {
      const page = await search(emails.lead, { q });
      expect(page.items.map((i) => i.id)).toEqual([entry.id]);
      expect(page.items[0]!.matchedFields).toEqual(['tags']);
    }
    const lead = await t.signIn(emails.lead);
    const edit = await lead.patch(`/api/observations/${entry.id}`).send({ version: 1, tags: ['vornellic', 'drummelite'] });
    expect(edit.status).toBe(200);
    expect((await search(emails.lead, { q: 'drummelite' })).items.map((i) => i.id)).toEqual([entry.id]);
    expect((await search(emails.lead, { q: 'quastrine' })).total).toBe(0);
    expect((await search(emails.lead, { q: 'vornellic' })).items.map((i) => i.id)).toEqual([entry.id]);
  });

  it('a tag merged into another is found under the name it went into', async () => {
    const entry = await log(emails.lead, ids.dive2026, { kind: 'biology', title: 'Sea pen', tags: ['plovantic'] });
    const lead = await t.signIn(emails.lead);
    const created = await lead.post(`/api/campaigns/${ids.campaign2026}/tags`).send({ name: 'grellwort' });
    expect(created.status).toBe(201);
    const tags = (await lead.get(`/api/campaigns/${ids.campaign2026}/tags`)).body as { id: string; name: string }[];
    const from = tags.find((x) => x.name === 'plovantic')!;
    expect((await lead.patch(`/api/tags/${from.id}`).send({ mergeInto: created.body.id })).status).toBe(200);
    expect((await search(emails.lead, { q: 'grellwort' })).items.map((i) => i.id)).toEqual([entry.id]);
    expect((await search(emails.lead, { q: 'plovantic' })).total).toBe(0);
  });

  it('a scientific name given or changed later is found, and a word first seen after the first search is found through a typo', async () => {
    // The index's words are read into memory by this first search …
    await search(emails.lead, { q: 'anything' });
    const entry = await log(emails.biologist, ids.dive2026, { kind: 'biology', title: 'Pale stalked form' });
    const bio = await t.signIn(emails.biologist);
    expect(
      (await bio.put(`/api/observations/${entry.id}/identification`).send({ version: 1, scientificName: 'Quassimora velutina' })).status,
    ).toBe(200);
    // … and words that came later are found by a typo too.
    expect((await search(emails.lead, { q: 'quasimora' })).items.map((i) => i.id)).toEqual([entry.id]);
    expect(
      (await bio.put(`/api/observations/${entry.id}/identification`).send({ version: 2, scientificName: 'Trellicaria velutina' })).status,
    ).toBe(200);
    expect((await search(emails.lead, { q: 'quassimora' })).total).toBe(0);
    const page = await search(emails.lead, { q: 'trelicaria velutina' });
    expect(page.items.map((i) => i.id)).toEqual([entry.id]);
    expect(page.items[0]!.matchedFields).toEqual(['scientificName']);
  });
});

describe('hostile input', () => {
  it('SQL and FTS5 syntax are harmless: normal results or 400, never 500, schema intact', async () => {
    await log(emails.lead, ids.dive2026, { kind: 'biology', title: 'Quorraline "quoted" - starred* entry', note: 'NEAR( OR AND NOT' });
    const before = t.ctx.db.select().from(observations).all().length;
    const lead = await t.signIn(emails.lead);
    const inputs = [
      '"',
      '""',
      '"quorraline',
      'quorraline"',
      '*',
      'quorraline*',
      '*quorraline',
      'NEAR(',
      'NEAR(quorraline starred, 2)',
      'quorraline OR',
      'OR',
      'AND',
      'NOT quorraline',
      '-',
      '-quorraline',
      'quorraline -starred',
      'title:quorraline',
      '{title note}: quorraline',
      '^quorraline',
      '(quorraline',
      "'; drop table observations; --",
      "quorraline' or '1'='1",
      '%',
      '_',
      '\\',
      '\u0000',
      'quorraline\u0000',
      'ünïcödé quorraline',
      'a'.repeat(200),
      '😀 quorraline',
    ];
    for (const q of inputs) {
      const res = await lead.get('/api/search').query({ q });
      expect([200, 400], `${JSON.stringify(q)} → ${res.status} ${JSON.stringify(res.body)}`).toContain(res.status);
      if (res.status === 200) searchPageSchema.parse(res.body);
    }
    // Words inside the syntax still find the entry.
    for (const q of ['"quorraline', 'NEAR(quorraline starred)', '-quorraline', 'quorraline OR', 'quorraline:']) {
      expect(titles(await search(emails.lead, { q })), q).toContain('Quorraline "quoted" - starred* entry');
    }
    expect((await lead.get('/api/search').query({ q: 'a'.repeat(201) })).status).toBe(400);
    expect((await lead.get('/api/search?q=a&q=b')).status).toBe(400);
    expect(t.ctx.db.select().from(observations).all().length).toBe(before);
  });
});
