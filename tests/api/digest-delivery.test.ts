/**
 * Digest delivery when things go wrong, over real SMTP (smtp-server, parsed by mailparser): a mail
 * server that is down while a digest waits, then back; a digest that failed for good, shown to the
 * lead with the reason and sent again; and a server stopped between queueing a daily digest and
 * sending it, restarted twice at the same 07:00: the digest goes out once and is never queued again.
 */
import path from 'node:path';

import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';

import { digestLogItemSchema, type DigestLogItem } from '@/lib/schemas';
import { closeContext, createContext } from '@/server/bootstrap';
import { loadEnv } from '@/server/env';
import { emails } from '../helpers/demo';
import { freePort } from '../helpers/server-process';
import { smtpOn } from '../helpers/smtp';
import { startTestServer, type TestServer } from '../helpers/test-server';

let t: TestServer;
let port: number;
let smtp: ReturnType<typeof smtpOn>;
let campaignId: string;
const userId = (email: string) => t.ctx.db.$client.prepare('select id from user where email = ?').pluck().get(email) as string;

beforeAll(async () => {
  port = await freePort();
  smtp = smtpOn(port);
  // Four attempts, 150 ms, 600 ms and 2.4 s apart: long enough to bring the mail server back in between.
  t = await startTestServer({
    env: { SMTP_URL: `smtp://127.0.0.1:${port}`, MAIL_ATTEMPTS: '4', MAIL_RETRY_BASE_MS: '150', AUTH_RATE_LIMIT: '500' },
  });
  const res = await (await t.signIn(emails.admin)).post('/api/campaigns').send({
    name: 'Delivery trials',
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
    [emails.guest, 'guest'],
  ] as const) {
    t.ctx.db.$client
      .prepare('insert into memberships (campaign_id, user_id, role, created_at) values (?, ?, ?, ?)')
      .run(campaignId, userId(email), role, Date.now());
  }
});
afterAll(async () => {
  await t.close();
  await smtp.stop();
});

async function newDive(number: string) {
  const res = await (await t.signIn(emails.lead)).post(`/api/campaigns/${campaignId}/dives`).send({ number });
  expect(res.status).toBe(201);
  return res.body.id as string;
}

async function log(diveId: string, title: string) {
  const res = await (await t.signIn(emails.biologist)).post(`/api/dives/${diveId}/observations`).send({ kind: 'biology', title });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.id as string;
}

async function subscribe(email: string, frequency: string) {
  const res = await (await t.signIn(email)).put(`/api/campaigns/${campaignId}/subscription`).send({ frequency, filters: {} });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
}

async function digestLog(): Promise<DigestLogItem[]> {
  const res = await (await t.signIn(emails.lead)).get(`/api/campaigns/${campaignId}/digests`);
  expect(res.status).toBe(200);
  return (res.body as unknown[]).map((d) => digestLogItemSchema.parse(d));
}

const toGuest = (title: string) => smtp.received.filter((m) => m.to.includes(emails.guest) && m.text.includes(title));

describe('with the mail server down', () => {
  it('keeps the digest queued with the reason while retrying, and sends it once when the server is back', async () => {
    await subscribe(emails.guest, 'after-each-dive');
    const diveId = await newDive('DD-01');
    await log(diveId, 'Coral seen while the mail server was down');
    const sent = await (await t.signIn(emails.lead)).post(`/api/campaigns/${campaignId}/digests`).send({ diveId });
    expect(sent.status).toBe(201);
    const digestId = (sent.body.queued as DigestLogItem[]).find((d) => d.userId === userId(emails.guest))!.id;
    const mine = async () => (await digestLog()).find((d) => d.id === digestId)!;

    // A failed attempt leaves it queued for the next one, with what the connection said.
    await vi.waitFor(async () => expect((await mine()).mail).toMatchObject({ state: 'queued', attempts: 1 }), { timeout: 5000 });
    expect((await mine()).mail!.reason).toMatch(/ECONNREFUSED/);
    expect((await mine()).mail!.nextAttemptAt).not.toBeNull();

    await smtp.start();
    await vi.waitFor(async () => expect((await mine()).mail?.state).toBe('sent'), { timeout: 10_000 });
    expect((await mine()).mail!.attempts).toBeGreaterThanOrEqual(2);
    await t.ctx.mail.settled();
    expect(toGuest('Coral seen while the mail server was down')).toHaveLength(1);
  });

  it('marks a digest failed with the reason after its last attempt, and sends it once when sent again', async () => {
    await smtp.stop();
    const diveId = await newDive('DD-02');
    await log(diveId, 'Sponge logged during the long outage');
    const sent = await (await t.signIn(emails.lead)).post(`/api/campaigns/${campaignId}/digests`).send({ diveId });
    const digestId = (sent.body.queued as DigestLogItem[]).find((d) => d.userId === userId(emails.guest))!.id;
    const mine = async () => (await digestLog()).find((d) => d.id === digestId)!;

    await vi.waitFor(async () => expect((await mine()).mail?.state).toBe('failed'), { timeout: 10_000 });
    expect((await mine()).mail).toMatchObject({ attempts: 4, nextAttemptAt: null, sentAt: null });
    expect((await mine()).mail!.reason).toMatch(/ECONNREFUSED/);

    await smtp.start();
    const again = await (await t.signIn(emails.admin)).post(`/api/admin/mail/${(await mine()).mail!.id}/retry`);
    expect(again.status).toBe(200);
    await vi.waitFor(async () => expect((await mine()).mail?.state).toBe('sent'), { timeout: 5000 });
    await t.ctx.mail.settled();
    expect(toGuest('Sponge logged during the long outage')).toHaveLength(1);
  });
});

describe('a restart during the daily schedule', () => {
  it('sends the daily digest queued before the stop once, and queues no second one for the same 07:00', async () => {
    // This test drives the schedule with its own clock only.
    t.ctx.digests.stop();
    await subscribe(emails.guest, 'daily');
    const guest = userId(emails.guest);
    const diveId = await newDive('DD-03');
    const entry = await log(diveId, 'Amphora neck found overnight');
    const set = (sql: string, ...args: unknown[]) => t.ctx.db.$client.prepare(sql).run(...args);
    const at = (iso: string) => Date.parse(iso);
    set(
      'update subscriptions set daily_done_for = ?, last_digest_at = ? where campaign_id = ? and user_id = ?',
      at('2026-06-09T06:00:00Z'),
      at('2026-06-09T06:00:00Z'),
      campaignId,
      guest,
    );
    set(
      'update observations set created_at = ?, updated_at = ? where id = ?',
      at('2026-06-09T22:00:00Z'),
      at('2026-06-09T22:00:00Z'),
      entry,
    );
    const daily = () =>
      t.ctx.db.$client
        .prepare("select id from digests where user_id = ? and campaign_id = ? and trigger = 'daily'")
        .pluck()
        .all(guest, campaignId) as string[];

    // 07:00 in Lisbon (summer time, UTC+1): the digest is recorded and its mail queued, and the
    // server stops before its sender takes the mail, as a crash or a power cut would leave it.
    await t.ctx.mail.stop();
    expect(t.ctx.digests.tick(new Date('2026-06-10T06:00:00Z'))).toBe(1);
    expect(daily()).toHaveLength(1);
    expect(toGuest('Amphora neck found overnight')).toHaveLength(0);

    const env = loadEnv({
      NODE_ENV: 'test',
      DATABASE_PATH: path.join(t.dir, 'bathynote.db'),
      UPLOADS_DIR: path.join(t.dir, 'uploads'),
      PUBLIC_URL: t.url,
      AUTH_SECRET: t.ctx.env.AUTH_SECRET,
      LOG_LEVEL: 'silent',
      SMTP_URL: `smtp://127.0.0.1:${port}`,
    });
    // Started twice within the same 07:00 hour: each start runs the schedule at once.
    for (const minute of ['05', '20']) {
      const restarted = await createContext(env, { now: () => new Date(`2026-06-10T06:${minute}:00Z`) });
      try {
        await restarted.mail.settled();
        expect(restarted.digests.tick()).toBe(0);
      } finally {
        await closeContext(restarted);
      }
    }
    expect(daily()).toHaveLength(1);
    expect(toGuest('Amphora neck found overnight')).toHaveLength(1);
    const item = (await digestLog()).find((d) => d.id === daily()[0]);
    expect(item).toMatchObject({ trigger: 'daily', mail: { state: 'sent', attempts: 1 } });
  });
});
