/**
 * Digest mails over real SMTP into the built-in catcher (smtp-server, parsed by mailparser):
 * subscriptions and their filters, the after-dive trigger, "send now", the lead's log, RFC 8058
 * one-click unsubscribe, header injection, inert notes, the 100 KB bound, and the daily schedule
 * across a daylight-saving change with an injected clock.
 */
import path from 'node:path';

import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { caughtMailSchema, digestLogItemSchema, subscriptionSchema, type CaughtMailItem } from '@/lib/schemas';
import { closeContext, createContext } from '@/server/bootstrap';
import { loadEnv } from '@/server/env';
import { queueDigests } from '@/server/services/digests';
import { emails } from '../helpers/demo';
import { startTestServer, type TestServer } from '../helpers/test-server';

let t: TestServer;
let campaignId: string;
const userId = (email: string) => t.ctx.db.$client.prepare('select id from user where email = ?').pluck().get(email) as string;
const digestDeps = () => ({ publicUrl: t.url, secret: t.ctx.env.AUTH_SECRET });

beforeAll(async () => {
  t = await startTestServer({ env: { AUTH_RATE_LIMIT: '500' } });
  // A campaign of its own, so the demo can change freely: the demo's lead leads it, the others join.
  const admin = await t.signIn(emails.admin);
  const res = await admin.post('/api/campaigns').send({
    name: 'Digest trials',
    siteName: 'Test slope',
    datumLat: 36.1,
    datumLon: -7.4,
    timeZone: 'Europe/Lisbon',
    leadEmail: emails.lead,
  });
  expect(res.status).toBe(201);
  campaignId = res.body.id;
  for (const [email, role] of [
    [emails.biologist, 'scientist'],
    [emails.archaeologist, 'scientist'],
    [emails.pilot, 'pilot'],
    [emails.guest, 'guest'],
  ] as const) {
    t.ctx.db.$client
      .prepare('insert into memberships (campaign_id, user_id, role, created_at) values (?, ?, ?, ?)')
      .run(campaignId, userId(email), role, Date.now());
  }
});
afterAll(() => t.close());

async function caught(): Promise<CaughtMailItem[]> {
  await t.ctx.mail.settled();
  const res = await (await t.signIn(emails.admin)).get('/api/dev/outbox?limit=500');
  return (res.body as unknown[]).map((m) => caughtMailSchema.parse(m));
}

async function newDive(number: string) {
  const res = await (await t.signIn(emails.lead)).post(`/api/campaigns/${campaignId}/dives`).send({ number });
  expect(res.status).toBe(201);
  return res.body.id as string;
}

async function log(diveId: string, email: string, body: Record<string, unknown>) {
  const res = await (await t.signIn(email)).post(`/api/dives/${diveId}/observations`).send(body);
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.id as string;
}

async function subscribe(email: string, body: Record<string, unknown>) {
  const res = await (await t.signIn(email)).put(`/api/campaigns/${campaignId}/subscription`).send(body);
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return subscriptionSchema.parse(res.body);
}

const phase = async (diveId: string, p: string) =>
  expect((await (await t.signIn(emails.pilot)).post(`/api/dives/${diveId}/phases`).send({ phase: p })).status).toBe(200);

describe('after a dive', () => {
  let mails: CaughtMailItem[];
  let diveId: string;
  beforeAll(async () => {
    await subscribe(emails.guest, { frequency: 'after-each-dive', filters: { kinds: ['biology'], tags: ['coral', 'microbial-mat'] } });
    await subscribe(emails.biologist, { frequency: 'after-each-dive' });
    await subscribe(emails.pilot, { frequency: 'after-each-dive', filters: { verifiedOnly: true } });
    await subscribe(emails.archaeologist, { frequency: 'daily' });
    diveId = await newDive('DT-01');
    await phase(diveId, 'launch');
    await log(diveId, emails.biologist, { kind: 'biology', title: 'Lophelia colony on the stern', tags: ['coral'], depth: 512.4 });
    await log(diveId, emails.biologist, {
      kind: 'biology',
      title: 'Orange mat on the hull\r\nBcc: spy@evil.example',
      tags: ['microbial-mat'],
      note: 'Thick mat <script>alert(1)</script><img src=x onerror=alert(2)> spreading **aft**.',
    });
    await log(diveId, emails.biologist, { kind: 'biology', title: 'Squat lobster, untagged' });
    await log(diveId, emails.archaeologist, { kind: 'archaeology', title: 'Amphora neck, coral-encrusted', tags: ['coral'] });
    const retired = await log(diveId, emails.biologist, { kind: 'biology', title: 'Retired coral entry', tags: ['coral'] });
    expect((await (await t.signIn(emails.biologist)).delete(`/api/observations/${retired}`)).status).toBe(200);
    await phase(diveId, 'on-bottom');
    await phase(diveId, 'off-bottom');
    await phase(diveId, 'on-deck');
    mails = (await caught()).filter((m) => m.subject.startsWith('Digest trials: dive DT-01'));
  });

  it('sends each subscriber after each dive the new entries that match their filters, grouped by kind', () => {
    const guest = mails.filter((m) => m.to.includes(emails.guest));
    expect(guest).toHaveLength(1);
    const g = guest[0]!;
    expect(g.text).toContain('Lophelia colony on the stern');
    expect(g.text).toContain('Orange mat on the hull');
    expect(g.text).not.toContain('Squat lobster');
    expect(g.text).not.toContain('Amphora neck');
    expect(g.text).not.toContain('Retired coral entry');
    expect(g.text).toContain('-- Biology (2) --');
    expect(g.text).toMatch(/== Dive DT-01 ==/);
    expect(g.text).toMatch(/max depth 512 m/);
    // Times in UTC and in the campaign's zone (Lisbon).
    expect(g.text).toMatch(/\d{4}-\d{2}-\d{2} \d{2}:\d{2}:\d{2} UTC · \d{2}:\d{2} (WET|WEST|GMT|GMT\+1)/);

    const biologist = mails.filter((m) => m.to.includes(emails.biologist));
    expect(biologist).toHaveLength(1);
    expect(biologist[0]!.text).toContain('Squat lobster');
    expect(biologist[0]!.text).toContain('-- Archaeology (1) --');
  });

  it('sends no mail to a subscriber with nothing new for them, nor to a daily subscriber after a dive', () => {
    expect(mails.filter((m) => m.to.includes(emails.pilot))).toHaveLength(0);
    expect(mails.filter((m) => m.to.includes(emails.archaeologist))).toHaveLength(0);
  });

  it('carries RFC 8058 one-click headers, no injected header, and a note whose script is inert', () => {
    const g = mails.find((m) => m.to.includes(emails.guest))!;
    const headers = Object.fromEntries(Object.entries(g.headers).map(([k, v]) => [k.toLowerCase(), v]));
    expect(headers['list-unsubscribe']).toMatch(/^<http:\/\/127\.0\.0\.1:\d+\/api\/unsubscribe\/[\w-]+\.[\w-]+>$/);
    expect(headers['list-unsubscribe-post']).toBe('List-Unsubscribe=One-Click');
    expect(Object.keys(headers)).not.toContain('bcc');
    expect(JSON.stringify(g.headers)).not.toContain('spy@evil.example');
    expect(g.html).not.toMatch(/<script/i);
    expect(g.html).not.toMatch(/onerror=/i);
    expect(g.html).toContain('Thick mat');
    expect(g.html).not.toContain('<img src=x');
  });

  it('records each digest with its window in the lead’s log, with its mail sent', async () => {
    const res = await (await t.signIn(emails.lead)).get(`/api/campaigns/${campaignId}/digests`);
    expect(res.status).toBe(200);
    const items = (res.body as unknown[]).map((d) => digestLogItemSchema.parse(d)).filter((d) => d.diveId === diveId);
    expect(items.map((d) => d.recipientName).sort()).toEqual(['Cleo Varga', 'Elin Sato']);
    for (const d of items) {
      expect(d).toMatchObject({ trigger: 'after-dive', since: null, mail: { state: 'sent' } });
      expect(Date.parse(d.until!)).toBeLessThanOrEqual(Date.now());
    }
    expect((await (await t.signIn(emails.biologist)).get(`/api/campaigns/${campaignId}/digests`)).status).toBe(403);
  });

  it('sends only what is new or changed since the last digest, marking edits as changed', async () => {
    const lead = await t.signIn(emails.lead);
    // Nothing new for those who had the after-dive digest (the daily subscriber has had none yet).
    const none = await lead.post(`/api/campaigns/${campaignId}/digests`).send({});
    expect(none.status).toBe(201);
    expect(none.body.queued.map((d: { recipientName: string }) => d.recipientName)).toEqual(['Bram Ostrander']);
    const entry = await log(diveId, emails.biologist, { kind: 'biology', title: 'Second coral colony', tags: ['coral'] });
    const now = await lead.post(`/api/campaigns/${campaignId}/digests`).send({ diveId });
    expect(now.status).toBe(201);
    expect(now.body.queued.map((d: { recipientName: string }) => d.recipientName).sort()).toEqual([
      'Bram Ostrander',
      'Cleo Varga',
      'Elin Sato',
    ]);
    const mail = (await caught()).find((m) => m.to.includes(emails.guest) && m.text.includes('Second coral colony'))!;
    expect(mail.text).not.toContain('Lophelia colony');
    const current = (await (await t.signIn(emails.biologist)).get(`/api/observations/${entry}`)).body;
    const edit = await (
      await t.signIn(emails.biologist)
    )
      .patch(`/api/observations/${entry}`)
      .send({ version: current.version, title: 'Second coral colony, two metres wide' });
    expect(edit.status).toBe(200);
    await lead.post(`/api/campaigns/${campaignId}/digests`).send({});
    const changed = (await caught()).find((m) => m.to.includes(emails.guest) && m.text.includes('two metres wide'))!;
    expect(changed.text).toContain('Second coral colony, two metres wide (changed)');
  });

  it('sends nothing to a member removed after the digest was queued', async () => {
    await log(diveId, emails.biologist, { kind: 'biology', title: 'Coral seen just before the removal', tags: ['coral'] });
    const guestId = userId(emails.guest);
    // Queued and the member removed in one go, before the sender can take the mail.
    const { digestIds } = t.ctx.db.transaction((tx) => queueDigests(tx, digestDeps(), campaignId, { trigger: 'manual' }));
    t.ctx.db.$client.prepare('delete from memberships where campaign_id = ? and user_id = ?').run(campaignId, guestId);
    t.ctx.mail.kick();
    try {
      expect(digestIds.length).toBeGreaterThan(0);
      const all = await caught();
      expect(all.some((m) => m.to.includes(emails.guest) && m.text.includes('just before the removal'))).toBe(false);
      expect(all.some((m) => m.to.includes(emails.biologist) && m.text.includes('just before the removal'))).toBe(true);
      const state = t.ctx.db.$client
        .prepare(
          'select m.state, m.last_error as reason from digests d join mail_queue m on m.id = d.mail_id where d.user_id = ? order by d.sent_at desc limit 1',
        )
        .get(guestId);
      expect(state).toEqual({ state: 'cancelled', reason: 'The recipient is no longer a member of the campaign.' });
    } finally {
      t.ctx.db.$client
        .prepare('insert into memberships (campaign_id, user_id, role, created_at) values (?, ?, ?, ?)')
        .run(campaignId, guestId, 'guest', Date.now());
    }
  });
});

describe('one-click unsubscribe', () => {
  it('turns off only the subscription it names, without signing in, once; forged, altered and GET requests change nothing', async () => {
    await subscribe(emails.guest, { frequency: 'after-each-dive', filters: {} });
    await subscribe(emails.biologist, { frequency: 'after-each-dive', filters: {} });
    const diveId = await newDive('DT-02');
    await log(diveId, emails.biologist, { kind: 'environment', title: 'Bottom water 13.1 °C' });
    await (await t.signIn(emails.lead)).post(`/api/campaigns/${campaignId}/digests`).send({ diveId });
    const mail = (await caught()).find((m) => m.to.includes(emails.guest) && m.text.includes('Bottom water 13.1'))!;
    const header = Object.entries(mail.headers).find(([k]) => k.toLowerCase() === 'list-unsubscribe')![1];
    const url = new URL(header.slice(1, -1));
    const token = url.pathname.split('/').pop()!;
    const anon = t.anonymous();

    expect((await anon.get(url.pathname)).status).toBe(404);
    const [body, sig] = token.split('.');
    const altered = `${body}.${sig!.slice(0, -2)}${sig!.endsWith('AA') ? 'BB' : 'AA'}`;
    expect((await anon.post(`/api/unsubscribe/${altered}`)).status).toBe(404);
    const forged = `${Buffer.from(JSON.stringify([campaignId, userId(emails.biologist), 'x'])).toString('base64url')}.${sig}`;
    expect((await anon.post(`/api/unsubscribe/${forged}`)).status).toBe(404);
    expect(
      subscriptionSchema.parse((await (await t.signIn(emails.guest)).get(`/api/campaigns/${campaignId}/subscription`)).body).frequency,
    ).toBe('after-each-dive');

    // As a mail provider posts it (RFC 8058 §3.2): form body, no cookie, from its own servers.
    const res = await anon.post(url.pathname).set('Origin', 'https://mail.example').type('form').send('List-Unsubscribe=One-Click');
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ unsubscribed: true, campaignName: 'Digest trials' });
    expect(
      subscriptionSchema.parse((await (await t.signIn(emails.guest)).get(`/api/campaigns/${campaignId}/subscription`)).body).frequency,
    ).toBe('off');
    expect(
      subscriptionSchema.parse((await (await t.signIn(emails.biologist)).get(`/api/campaigns/${campaignId}/subscription`)).body).frequency,
    ).toBe('after-each-dive');
    expect((await anon.post(url.pathname)).status).toBe(404);
  });
});

describe('the size bound', () => {
  it('keeps a digest of 2,000 matching entries under 100 KB and says how many more there are', async () => {
    await subscribe(emails.guest, { frequency: 'after-each-dive', filters: { kinds: ['biology'] } });
    const diveId = await newDive('DT-03');
    const insert = t.ctx.db.$client.prepare(
      `insert into observations (id, dive_id, campaign_id, observed_at, kind, title, note, depth, author_id, created_at, updated_at)
       values (?, ?, ?, ?, 'biology', ?, ?, ?, ?, ?, ?)`,
    );
    const author = userId(emails.biologist);
    const now = Date.now();
    t.ctx.db.$client.transaction(() => {
      for (let i = 0; i < 2000; i++) {
        insert.run(
          crypto.randomUUID(),
          diveId,
          campaignId,
          now - i * 1000,
          `Bulk entry ${i}: sponge field`,
          'A long note. '.repeat(40),
          500 + i / 10,
          author,
          now,
          now,
        );
      }
    })();
    const res = await (await t.signIn(emails.lead)).post(`/api/campaigns/${campaignId}/digests`).send({ diveId });
    expect(res.status).toBe(201);
    const mail = (await caught()).find((m) => m.to.includes(emails.guest) && m.text.includes('Bulk entry'))!;
    const size = Buffer.byteLength(mail.html) + Buffer.byteLength(mail.text) + Buffer.byteLength(JSON.stringify(mail.headers));
    expect(size).toBeLessThan(100 * 1024);
    const shown = (mail.text.match(/Bulk entry/g) ?? []).length;
    expect(shown).toBeGreaterThan(20);
    expect(mail.text).toContain(`And ${2000 - shown} more entries — open the dive log`);
    expect(mail.html).toContain(`And ${2000 - shown} more entries`);
  });
});

describe('the daily digest', () => {
  it('goes at 07:00 Lisbon time on both sides of the spring daylight-saving change, once, and once after a restart that missed it', async () => {
    // This test drives the schedule with its own clock only.
    t.ctx.digests.stop();
    const archaeologist = userId(emails.archaeologist);
    await subscribe(emails.archaeologist, { frequency: 'daily' });
    const diveId = await newDive('DT-04');
    const entry = await log(diveId, emails.archaeologist, { kind: 'archaeology', title: 'Daily amphora' });
    const set = (sql: string, ...args: unknown[]) => t.ctx.db.$client.prepare(sql).run(...args);
    const at = (iso: string) => Date.parse(iso);
    // Europe/Lisbon moves from WET (UTC+0) to WEST (UTC+1) at 01:00 UTC on 2026-03-29 (IANA tz database).
    set(
      'update subscriptions set daily_done_for = ?, last_digest_at = ? where campaign_id = ? and user_id = ?',
      at('2026-03-28T07:00:00Z'),
      at('2026-03-28T07:00:00Z'),
      campaignId,
      archaeologist,
    );
    set(
      'update observations set created_at = ?, updated_at = ? where id = ?',
      at('2026-03-28T20:00:00Z'),
      at('2026-03-28T20:00:00Z'),
      entry,
    );
    const daily = () =>
      t.ctx.db.$client
        .prepare("select until from digests where user_id = ? and trigger = 'daily' order by until")
        .pluck()
        .all(archaeologist) as number[];

    expect(t.ctx.digests.tick(new Date('2026-03-29T05:59:59Z'))).toBe(0);
    expect(t.ctx.digests.tick(new Date('2026-03-29T06:00:00Z'))).toBe(1);
    expect(t.ctx.digests.tick(new Date('2026-03-29T06:30:00Z'))).toBe(0);
    expect(daily()).toEqual([at('2026-03-29T06:00:00Z')]);

    // Nothing new on the next day: no mail, but the day counts as done.
    expect(t.ctx.digests.tick(new Date('2026-03-30T06:00:00Z'))).toBe(0);

    // Down from the 30th to the 2nd: on coming back, one digest for what it missed, not one per day.
    set('update observations set updated_at = ? where id = ?', at('2026-03-31T10:00:00Z'), entry);
    const restarted = await createContext(
      loadEnv({
        NODE_ENV: 'test',
        DATABASE_PATH: path.join(t.dir, 'bathynote.db'),
        UPLOADS_DIR: path.join(t.dir, 'uploads'),
        PUBLIC_URL: t.url,
        AUTH_SECRET: t.ctx.env.AUTH_SECRET,
        LOG_LEVEL: 'silent',
        SMTP_URL: 'smtp://127.0.0.1:9',
        MAIL_RETRY_BASE_MS: '600000',
      }),
      { now: () => new Date('2026-04-02T12:00:00Z') },
    );
    try {
      expect(restarted.digests.tick(new Date('2026-04-02T12:05:00Z'))).toBe(0);
    } finally {
      await closeContext(restarted);
    }
    expect(daily()).toEqual([at('2026-03-29T06:00:00Z'), at('2026-04-02T12:00:00Z')]);
  });
});
