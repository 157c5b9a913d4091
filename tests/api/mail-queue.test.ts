/**
 * The mail queue: a change and its mail are one transaction, the mail goes out after the answer
 * with retries, a mail server that refuses never turns a change into a 500, a failed mail can be
 * sent again, and a restart sends what was queued exactly once.
 */
import path from 'node:path';

import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';

import { closeContext, createContext } from '@/server/bootstrap';
import { loadEnv } from '@/server/env';
import { INTERRUPTED } from '@/server/services/mail-queue';
import { invitationSchema, mailLogSchema, type Invitation } from '@/lib/schemas';
import { demoIds, emails } from '../helpers/demo';
import { freePort } from '../helpers/server-process';
import { smtpOn } from '../helpers/smtp';
import { startTestServer, type TestServer } from '../helpers/test-server';

describe('with the mail server down', () => {
  let t: TestServer;
  let port: number;
  let smtp: ReturnType<typeof smtpOn>;
  beforeAll(async () => {
    port = await freePort();
    smtp = smtpOn(port);
    t = await startTestServer({ env: { SMTP_URL: `smtp://127.0.0.1:${port}`, MAIL_ATTEMPTS: '3', MAIL_RETRY_BASE_MS: '40' } });
  });
  afterAll(async () => {
    await t.close();
    await smtp.stop();
  });

  it('creates the campaign and its lead’s invitation, queues the mail, retries it, marks it failed, and sends it again once the server is back', async () => {
    const admin = await t.signIn(emails.admin);
    const res = await admin.post('/api/campaigns').send({
      name: 'Varn Shoal 2028',
      siteName: 'Varn Shoal merchant wreck',
      datumLat: 36.145,
      datumLon: -7.432,
      leadEmail: 'offline.lead@bathynote.test',
    });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ name: 'Varn Shoal 2028', leadInvited: true });
    const invitation = invitationSchema.parse(res.body.leadInvitation);
    expect(invitation).toMatchObject({ email: 'offline.lead@bathynote.test', role: 'lead', status: 'pending' });
    expect(invitation.mail?.state).toBe('queued');

    // The site administrator follows it in the mail log (the lead has not joined yet).
    const mailOf = async () => {
      const log = mailLogSchema.parse((await admin.get('/api/admin/mail?kind=invitation')).body);
      return log.items.filter((m) => m.to === 'offline.lead@bathynote.test');
    };
    // Three attempts (40 ms, then 160 ms apart), then failed with what the connection said.
    await vi.waitFor(async () => expect((await mailOf())[0]?.state).toBe('failed'), { timeout: 10_000 });
    const [failed] = await mailOf();
    expect(failed).toMatchObject({ id: invitation.mail!.id, attempts: 3, nextAttemptAt: null, sentAt: null });
    expect(failed!.reason).toMatch(/ECONNREFUSED/);
    const row = t.ctx.db.$client.prepare('select status, sent_at from invitations where id = ?').get(invitation.id);
    expect(row).toEqual({ status: 'pending', sent_at: null });

    const log = mailLogSchema.parse((await admin.get('/api/admin/mail')).body);
    expect(log.caught).toBeNull();
    expect(log.counts.failed).toBeGreaterThanOrEqual(1);
    expect(log.items.find((m) => m.id === failed!.id)).toMatchObject({ kind: 'invitation', campaignId: res.body.id });

    // The mail server is back: "send again" sends one new mail, and the link in it works.
    await smtp.start();
    // The lead has not joined, so the site administrator sends it again from the mail log.
    expect((await admin.post(`/api/invitations/${invitation.id}/resend`)).status).toBe(403);
    const again = await admin.post(`/api/admin/mail/${failed!.id}/retry`);
    expect(again.status).toBe(200);
    expect(again.body).toMatchObject({ state: 'queued', attempts: 0 });
    await vi.waitFor(async () => expect((await mailOf())[0]?.state).toBe('sent'), { timeout: 5000 });
    const sent = smtp.received.filter((m) => m.to.includes('offline.lead@bathynote.test'));
    expect(sent).toHaveLength(1);
    expect(sent[0]!.subject).toBe('Site Administrator invites you to Varn Shoal 2028 in Bathynote');
    expect(sent[0]!.text).toMatch(/\/api\/auth\/magic-link\/verify\?token=/);
    const states = await mailOf();
    expect(states.map((m) => m.state)).toEqual(['sent']);
    expect((await admin.post('/api/admin/mail/no-such-mail/retry')).status).toBe(404);
  });

  it('answers a resend whose mail fails with the invitation and its queued mail, not a 500', async () => {
    await smtp.stop();
    const lead = await t.signIn(emails.lead);
    const ids = demoIds(t.ctx.db);
    const res = await lead.post(`/api/campaigns/${ids.campaign2026}/invitations`).send({ email: 'storm@bathynote.test', role: 'guest' });
    expect(res.status).toBe(201);
    const resent = await lead.post(`/api/invitations/${res.body.id}/resend`);
    expect(resent.status).toBe(200);
    expect(invitationSchema.parse(resent.body).mail?.state).toBe('queued');
  });
});

describe('a restart', () => {
  it('sends the mail queued before it exactly once, and never re-sends one left half-sent', async () => {
    const port = await freePort();
    const smtp = smtpOn(port);
    // The first server cannot reach its mail server and waits long before retrying.
    const first = await startTestServer({ env: { SMTP_URL: `smtp://127.0.0.1:${port}`, MAIL_RETRY_BASE_MS: '600000' } });
    try {
      const lead = await first.signIn(emails.lead);
      const ids = demoIds(first.ctx.db);
      const queued = await lead
        .post(`/api/campaigns/${ids.campaign2026}/invitations`)
        .send({ email: 'after-restart@bathynote.test', role: 'guest' });
      const halfSent = await lead
        .post(`/api/campaigns/${ids.campaign2026}/invitations`)
        .send({ email: 'half-sent@bathynote.test', role: 'guest' });
      expect([queued.status, halfSent.status]).toEqual([201, 201]);
      await first.ctx.mail.settled();
      await first.ctx.mail.stop();
      // As a crash in the middle of handing a mail over would leave it.
      first.ctx.db.$client.prepare("update mail_queue set state = 'sending' where ref = ?").run(halfSent.body.id);
      first.ctx.db.$client.prepare('update mail_queue set next_attempt_at = ? where ref = ?').run(Date.now(), queued.body.id);

      await smtp.start();
      const env = loadEnv({
        NODE_ENV: 'test',
        DATABASE_PATH: path.join(first.dir, 'bathynote.db'),
        UPLOADS_DIR: path.join(first.dir, 'uploads'),
        PUBLIC_URL: first.url,
        AUTH_SECRET: 'test-secret-that-is-long-enough-for-better-auth',
        LOG_LEVEL: 'silent',
        SMTP_URL: `smtp://127.0.0.1:${port}`,
      });
      for (let round = 0; round < 2; round++) {
        const second = await createContext(env);
        await second.mail.settled();
        await closeContext(second);
      }
      expect(smtp.received.filter((m) => m.to.includes('after-restart@bathynote.test'))).toHaveLength(1);
      expect(smtp.received.filter((m) => m.to.includes('half-sent@bathynote.test'))).toHaveLength(0);
      const rows = first.ctx.db.$client
        .prepare('select ref, state, last_error as reason from mail_queue where ref in (?, ?)')
        .all(queued.body.id, halfSent.body.id) as { ref: string; state: string; reason: string | null }[];
      expect(rows.find((r) => r.ref === queued.body.id)).toMatchObject({ state: 'sent' });
      expect(rows.find((r) => r.ref === halfSent.body.id)).toMatchObject({ state: 'failed', reason: INTERRUPTED });
      const list = (await lead.get(`/api/campaigns/${ids.campaign2026}/invitations`)).body as Invitation[];
      expect(list.find((i) => i.id === halfSent.body.id)?.mail).toMatchObject({ state: 'failed', reason: INTERRUPTED });
    } finally {
      await first.close();
      await smtp.stop();
    }
  });
});

describe('the mail log', () => {
  let t: TestServer;
  beforeAll(async () => {
    t = await startTestServer();
  });
  afterAll(() => t.close());

  it('shows the site administrator the queue and what the catcher caught; the outbox keeps answering', async () => {
    const lead = await t.signIn(emails.lead);
    const ids = demoIds(t.ctx.db);
    const res = await lead
      .post(`/api/campaigns/${ids.campaign2026}/invitations`)
      .send({ email: 'logged@bathynote.test', role: 'scientist' });
    expect(res.status).toBe(201);
    await t.ctx.mail.settled();
    const admin = await t.signIn(emails.admin);
    const log = mailLogSchema.parse((await admin.get('/api/admin/mail')).body);
    expect(log.items[0]).toMatchObject({ kind: 'invitation', to: 'logged@bathynote.test', state: 'sent', attempts: 1, reason: null });
    expect(log.caught?.[0]).toMatchObject({ to: 'logged@bathynote.test' });
    const outbox = await admin.get('/api/dev/outbox');
    expect(outbox.status).toBe(200);
    expect(outbox.body[0]).toMatchObject({ to: 'logged@bathynote.test' });
    expect(outbox.body[0].headers).toHaveProperty('subject');
    expect((await admin.get('/api/admin/mail?state=bogus')).status).toBe(400);
    expect((await lead.get('/api/admin/mail')).status).toBe(403);
    expect((await t.anonymous().get('/api/admin/mail')).status).toBe(401);
  });

  it('sends no mail for a withdrawn invitation whose mail was still waiting', async () => {
    const lead = await t.signIn(emails.lead);
    const ids = demoIds(t.ctx.db);
    await t.ctx.mail.stop();
    const res = await lead
      .post(`/api/campaigns/${ids.campaign2026}/invitations`)
      .send({ email: 'withdrawn@bathynote.test', role: 'guest' });
    const revoked = await lead.delete(`/api/invitations/${res.body.id}`);
    expect(revoked.body).toMatchObject({ status: 'revoked', mail: { state: 'cancelled', reason: 'The invitation was withdrawn.' } });
  });
});
