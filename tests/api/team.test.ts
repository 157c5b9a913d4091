import { createHash } from 'node:crypto';

import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';

import { caughtMailSchema, invitationSchema, meSchema, type Invitation } from '@/lib/schemas';
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

/** Mail leaves through the queue after the answer: tests that read it wait with `t.ctx.mail.settled()` or `mailTo`. */
async function outbox() {
  const res = await (await t.signIn(emails.admin)).get('/api/dev/outbox');
  expect(res.status).toBe(200);
  return (res.body as unknown[]).map((m) => caughtMailSchema.parse(m));
}

async function mailTo(address: string) {
  for (let i = 0; i < 50; i++) {
    const mail = (await outbox()).find((m) => m.to.includes(address));
    if (mail) return mail;
    await new Promise((r) => setTimeout(r, 50));
  }
  throw new Error(`no mail to ${address}`);
}

const linkIn = (text: string) => {
  const m = /(http:\/\/\S+\/api\/auth\/magic-link\/verify\?\S+)/.exec(text);
  if (!m) throw new Error(`no link in: ${text}`);
  return m[1]!;
};

/** Follows an invitation link as a browser would: one hop at a time, keeping the cookie. */
async function follow(link: string) {
  let url = link;
  let cookie = '';
  const hops: { status: number; location: string | null }[] = [];
  for (let i = 0; i < 5; i++) {
    const res = await fetch(url, { redirect: 'manual', headers: cookie ? { cookie } : {} });
    const set = res.headers
      .getSetCookie()
      .map((c) => c.split(';')[0])
      .filter((c): c is string => !!c && !c.endsWith('='));
    if (set.length) cookie = set.join('; ');
    const location = res.headers.get('location');
    hops.push({ status: res.status, location });
    if (!location || res.status < 300 || res.status >= 400) break;
    url = new URL(location, t.url).toString();
    if (!url.includes('/api/')) break;
  }
  return { cookie, hops, last: hops[hops.length - 1]! };
}

describe('inviting a guest scientist', () => {
  it('mails a one-time link that signs them in and lands them in the campaign with that role', async () => {
    const lead = await t.signIn(emails.lead);
    const res = await lead
      .post(`/api/campaigns/${ids.campaign}/invitations`)
      .send({ email: 'Noor.Halvorsen@bathynote.test', role: 'guest', name: 'Noor Halvorsen' });
    expect(res.status).toBe(201);
    const invitation = invitationSchema.parse(res.body);
    expect(invitation).toMatchObject({
      email: 'noor.halvorsen@bathynote.test',
      role: 'guest',
      status: 'pending',
      invitedByName: 'Ada Lumen',
    });
    expect(Date.parse(invitation.expiresAt) - Date.now()).toBeGreaterThan(71 * 3600_000);

    const mail = await mailTo('noor.halvorsen@bathynote.test');
    expect(mail.subject).toBe(`Ada Lumen invites you to ${ids.campaignName} in Bathynote`);
    expect(mail.text).toContain('as a guest scientist');
    expect(mail.html).toContain(`Join ${ids.campaignName}`);
    expect(mail.headers.from).toContain('Bathynote');
    const link = linkIn(mail.text);
    expect(mail.html).toContain(link.replace(/&/g, '&amp;'));

    // Only a hash of the token is stored.
    const token = new URL(link).searchParams.get('token')!;
    const stored = t.ctx.db.$client.prepare('select identifier, value from verification').all() as { identifier: string; value: string }[];
    expect(stored.some((v) => v.identifier.includes(token) || v.value.includes(token))).toBe(false);

    const first = await follow(link);
    expect(first.last.location).toBe(`/campaigns/${ids.campaign}?welcome=1`);
    const me = meSchema.parse(await (await fetch(`${t.url}/api/me`, { headers: { cookie: first.cookie } })).json());
    expect(me.user.email).toBe('noor.halvorsen@bathynote.test');
    expect(me.user.name).toBe('Noor Halvorsen');
    expect(me.memberships).toEqual([{ campaignId: ids.campaign, role: 'guest' }]);
    const list = (await lead.get(`/api/campaigns/${ids.campaign}/invitations`)).body as { id: string; status: string }[];
    expect(list.find((i) => i.id === invitation.id)?.status).toBe('accepted');

    // The link works once.
    const again = await follow(link);
    expect(new URL(again.last.location!, t.url).pathname).toBe('/invitation-problem');
    expect(again.cookie).toBe('');
  });

  it('refuses an expired link with a page that says how to get a new one', async () => {
    const lead = await t.signIn(emails.lead);
    const res = await lead.post(`/api/campaigns/${ids.campaign}/invitations`).send({ email: 'late@bathynote.test', role: 'scientist' });
    const link = linkIn((await mailTo('late@bathynote.test')).text);
    t.ctx.db.$client.prepare('update verification set expires_at = ?').run(Date.now() - 1000);
    t.ctx.db.$client.prepare('update invitations set expires_at = ? where id = ?').run(Date.now() - 1000, res.body.id);
    const hop = await follow(link);
    expect(new URL(hop.last.location!, t.url).pathname).toBe('/invitation-problem');
    expect(t.ctx.db.$client.prepare("select count(*) from user where email = 'late@bathynote.test'").pluck().get()).toBe(0);
    const list = (await lead.get(`/api/campaigns/${ids.campaign}/invitations`)).body as { id: string; status: string }[];
    expect(list.find((i) => i.id === res.body.id)?.status).toBe('expired');

    // A resend makes a new link that works.
    const resent = await lead.post(`/api/invitations/${res.body.id}/resend`);
    expect(resent.status).toBe(200);
    await t.ctx.mail.settled();
    const fresh = (await outbox()).filter((m) => m.to.includes('late@bathynote.test'))[0]!;
    const joined = await follow(linkIn(fresh.text));
    expect(joined.last.location).toBe(`/campaigns/${ids.campaign}?welcome=1`);
  });

  it('never makes a link, a mail or an account for an address nobody invited', async () => {
    const before = (await outbox()).length;
    const res = await t.anonymous().post('/api/auth/sign-in/magic-link').set('Origin', t.url).send({ email: 'stranger@bathynote.test' });
    // The same answer as for a member, so the address cannot be probed; no mail leaves.
    expect(res.status).toBe(200);
    expect(res.body.ok).toBe(true);
    await t.ctx.mail.settled();
    expect((await outbox()).length).toBe(before);
    expect(t.ctx.db.$client.prepare("select count(*) from user where email = 'stranger@bathynote.test'").pluck().get()).toBe(0);
  });

  it('refuses a revoked invitation', async () => {
    const lead = await t.signIn(emails.lead);
    const res = await lead.post(`/api/campaigns/${ids.campaign}/invitations`).send({ email: 'revoked@bathynote.test', role: 'guest' });
    const link = linkIn((await mailTo('revoked@bathynote.test')).text);
    expect((await lead.delete(`/api/invitations/${res.body.id}`)).body.status).toBe('revoked');
    const hop = await follow(link);
    expect(new URL(hop.last.location!, t.url).pathname).toBe('/invitation-problem');
    expect(hop.cookie).toBe('');
    expect(t.ctx.db.$client.prepare("select count(*) from user where email = 'revoked@bathynote.test'").pluck().get()).toBe(0);
  });

  it('makes an earlier link stop working when an invitation is resent, leaving other invitations’ links alone', async () => {
    const lead = await t.signIn(emails.lead);
    const email = 'resent@bathynote.test';
    const first = await lead.post(`/api/campaigns/${ids.campaign}/invitations`).send({ email, role: 'guest' });
    const other = await lead.post(`/api/campaigns/${ids.otherCampaign}/invitations`).send({ email, role: 'scientist' });
    expect([first.status, other.status]).toEqual([201, 201]);
    await t.ctx.mail.settled();
    const mails = () => outbox().then((all) => all.filter((m) => m.to.includes(email)));
    const [otherMail, firstMail] = await mails();
    expect((await lead.post(`/api/invitations/${first.body.id}/resend`)).status).toBe(200);
    await t.ctx.mail.settled();
    const resentMail = (await mails())[0]!;

    const old = await follow(linkIn(firstMail!.text));
    expect(new URL(old.last.location!, t.url).pathname).toBe('/invitation-problem');
    expect(old.cookie).toBe('');
    expect(t.ctx.db.$client.prepare('select count(*) from user where email = ?').pluck().get(email)).toBe(0);

    const fresh = await follow(linkIn(resentMail.text));
    expect(fresh.last.location).toBe(`/campaigns/${ids.campaign}?welcome=1`);
    const joined = await follow(linkIn(otherMail!.text));
    expect(joined.last.location).toBe(`/campaigns/${ids.otherCampaign}?welcome=1`);
  });

  it('keeps the earlier link working when the resent mail cannot be sent', async () => {
    const lead = await t.signIn(emails.lead);
    const email = 'no-link-at-sea@bathynote.test';
    const res = await lead.post(`/api/campaigns/${ids.campaign}/invitations`).send({ email, role: 'guest' });
    const link = linkIn((await mailTo(email)).text);
    const send = vi.spyOn(t.ctx.mailer, 'send').mockRejectedValueOnce(new Error('connection refused'));
    try {
      // The resend stands and says its mail is queued; the failed attempt waits for its retry.
      const resent = await lead.post(`/api/invitations/${res.body.id}/resend`);
      expect(resent.status).toBe(200);
      expect(invitationSchema.parse(resent.body).mail?.state).toBe('queued');
      await vi.waitFor(
        async () => {
          const list = (await lead.get(`/api/campaigns/${ids.campaign}/invitations`)).body as Invitation[];
          expect(list.find((i) => i.id === res.body.id)?.mail).toMatchObject({
            state: 'queued',
            attempts: 1,
            reason: 'connection refused',
          });
        },
        { timeout: 5000 },
      );
    } finally {
      send.mockRestore();
    }
    const joined = await follow(link);
    expect(joined.last.location).toBe(`/campaigns/${ids.campaign}?welcome=1`);
  });

  it('mails two invitations of one address, sent at once, each with its own link', async () => {
    const lead = await t.signIn(emails.lead);
    const email = 'both-seasons@bathynote.test';
    const [a, b] = await Promise.all([
      lead.post(`/api/campaigns/${ids.campaign}/invitations`).send({ email, role: 'guest' }),
      lead.post(`/api/campaigns/${ids.otherCampaign}/invitations`).send({ email, role: 'scientist' }),
    ]);
    expect([a.status, b.status]).toEqual([201, 201]);
    await t.ctx.mail.settled();
    const mails = (await outbox()).filter((m) => m.to.includes(email));
    expect(mails).toHaveLength(2);
    for (const mail of mails) {
      const token = new URL(linkIn(mail.text)).searchParams.get('token')!;
      const forCampaign = mail.subject.includes(`to ${ids.campaignName} `) ? a.body.id : b.body.id;
      expect(token.startsWith(`${forCampaign}.`)).toBe(true);
    }
  });

  it('still takes a link mailed before links carried their invitation', async () => {
    const lead = await t.signIn(emails.lead);
    const email = 'mailed-last-week@bathynote.test';
    const res = await lead.post(`/api/campaigns/${ids.campaign}/invitations`).send({ email, role: 'guest' });
    expect(res.status).toBe(201);
    // A link as the earlier release stored it: better-auth's plain SHA-256 of a token without a key.
    const token = 'LegacyTokenWithoutAnyInvitationKey0123456789';
    t.ctx.db.$client
      .prepare('insert into verification (id, identifier, value, expires_at, created_at, updated_at) values (?, ?, ?, ?, ?, ?)')
      .run(
        'legacy-link',
        `magic-link:${createHash('sha256').update(token).digest('base64url')}`,
        JSON.stringify({ type: 'magic-link', email }),
        Date.now() + 3600_000,
        Date.now(),
        Date.now(),
      );
    const accept = `${t.url}/api/invitations/${res.body.id}/accept`;
    const link = `${t.url}/api/auth/magic-link/verify?token=${token}&callbackURL=${encodeURIComponent(accept)}&newUserCallbackURL=${encodeURIComponent(accept)}`;
    const joined = await follow(link);
    expect(joined.last.location).toBe(`/campaigns/${ids.campaign}?welcome=1`);
  });

  it('makes no account from a link whose invitation closed, even if the link were left behind', async () => {
    const lead = await t.signIn(emails.lead);
    const email = 'left-behind@bathynote.test';
    const res = await lead.post(`/api/campaigns/${ids.campaign}/invitations`).send({ email, role: 'guest' });
    const link = linkIn((await mailTo(email)).text);
    // Once the sender is done with the mail (it would retire the link of an invitation closed meanwhile).
    await t.ctx.mail.settled();
    // Close the invitation behind the service's back, leaving its link in place.
    t.ctx.db.$client.prepare("update invitations set status = 'revoked' where id = ?").run(res.body.id);
    const hop = await follow(link);
    const landed = new URL(hop.last.location!, t.url);
    // The page is told which way it closed, not the sign-in service's general refusal.
    expect([landed.pathname, landed.searchParams.get('reason')]).toEqual(['/invitation-problem', 'revoked']);
    expect(hop.cookie).toBe('');
    expect(t.ctx.db.$client.prepare('select count(*) from user where email = ?').pluck().get(email)).toBe(0);
  });

  it.each([
    [{ email: 'not-an-address', role: 'guest' }, 400, 'email'],
    [{ email: 'x@bathynote.test', role: 'captain' }, 400, 'role'],
    [{ email: 'x@bathynote.test', role: 'guest', campaignId: 'other' }, 400, '(body)'],
  ])('refuses %j with %i', async (body, status, path) => {
    const res = await (await t.signIn(emails.lead)).post(`/api/campaigns/${ids.campaign}/invitations`).send(body);
    expect(res.status).toBe(status);
    expect(res.body.error.issues.map((i: { path: string }) => i.path)).toContain(path);
  });

  it('says clearly when the address is already a member or already invited', async () => {
    const lead = await t.signIn(emails.lead);
    const member = await lead.post(`/api/campaigns/${ids.campaign}/invitations`).send({ email: 'BIOLOGIST@bathynote.test', role: 'guest' });
    expect(member.status).toBe(409);
    expect(member.body.error).toMatchObject({ code: 'already_member' });
    await lead.post(`/api/campaigns/${ids.campaign}/invitations`).send({ email: 'twice@bathynote.test', role: 'guest' });
    const twice = await lead.post(`/api/campaigns/${ids.campaign}/invitations`).send({ email: 'twice@bathynote.test', role: 'pilot' });
    expect(twice.status).toBe(409);
    expect(twice.body.error.code).toBe('already_invited');
  });

  it('lets only leads invite', async () => {
    for (const email of [emails.biologist, emails.pilot, emails.guest]) {
      const res = await (
        await t.signIn(email)
      )
        .post(`/api/campaigns/${ids.campaign}/invitations`)
        .send({ email: 'y@bathynote.test', role: 'guest' });
      expect(res.status, email).toBe(403);
    }
    expect(
      (
        await (
          await t.signIn(emails.outsider)
        )
          .post(`/api/campaigns/${ids.campaign}/invitations`)
          .send({ email: 'y@bathynote.test', role: 'guest' })
      ).status,
    ).toBe(404);
  });

  it('keeps a line break in a name out of the mail headers', async () => {
    const lead = await t.signIn(emails.lead);
    const res = await lead
      .post(`/api/campaigns/${ids.campaign}/invitations`)
      .send({ email: 'header@bathynote.test', role: 'guest', name: 'Eve\r\nBcc: spy@evil.example' });
    expect(res.status).toBe(201);
    const mail = await mailTo('header@bathynote.test');
    expect(Object.keys(mail.headers).map((h) => h.toLowerCase())).not.toContain('bcc');
    expect(JSON.stringify(mail.headers)).not.toContain('spy@evil.example>');
    expect(mail.to).not.toContain('\n');
  });
});

describe('the team', () => {
  it('changes a role and removes a member, who lose access on their next request', async () => {
    const lead = await t.signIn(emails.lead);
    const pilotId = ids.userId(emails.pilot);
    const pilot = await t.freshSignIn(emails.pilot);
    expect((await pilot.post(`/api/dives/${ids.dive}/phases`).send({ phase: 'launch', at: '2026-05-13T17:40:00.000Z' })).status).toBe(200);
    const demoted = await lead.patch(`/api/campaigns/${ids.campaign}/members/${pilotId}`).send({ role: 'guest' });
    expect(demoted.status).toBe(200);
    expect(demoted.body.find((m: { userId: string }) => m.userId === pilotId).role).toBe('guest');
    expect((await pilot.post(`/api/dives/${ids.dive}/phases`).send({ phase: 'launch', at: '2026-05-13T17:40:00.000Z' })).status).toBe(403);

    expect((await lead.delete(`/api/campaigns/${ids.campaign}/members/${pilotId}`)).status).toBe(200);
    expect((await pilot.get(`/api/campaigns/${ids.campaign}`)).status).toBe(404);
    expect((await pilot.get(`/api/dives/${ids.dive}/observations`)).status).toBe(404);

    // Put the pilot back for the other tests.
    t.ctx.db.$client
      .prepare('insert into memberships (campaign_id, user_id, role, created_at) values (?, ?, ?, ?)')
      .run(ids.campaign, pilotId, 'pilot', Date.now());
  });

  it('keeps at least one lead', async () => {
    const lead = await t.signIn(emails.lead);
    const leadId = ids.userId(emails.lead);
    const demote = await lead.patch(`/api/campaigns/${ids.campaign}/members/${leadId}`).send({ role: 'scientist' });
    expect(demote.status).toBe(409);
    expect(demote.body.error.code).toBe('last_lead');
    expect((await lead.delete(`/api/campaigns/${ids.campaign}/members/${leadId}`)).status).toBe(409);
    expect((await lead.patch(`/api/campaigns/${ids.campaign}/members/${leadId}`).send({ role: 'owner' })).status).toBe(400);
  });

  it('lets the lead edit the campaign, with a real time zone', async () => {
    const lead = await t.signIn(emails.lead);
    const ok = await lead
      .patch(`/api/campaigns/${ids.campaign}`)
      .send({ permitRef: 'VS-2026-PERMIT-07 rev. B', timeZone: 'Atlantic/Azores' });
    expect(ok.status).toBe(200);
    expect(ok.body).toMatchObject({ permitRef: 'VS-2026-PERMIT-07 rev. B', timeZone: 'Atlantic/Azores' });
    expect((await lead.patch(`/api/campaigns/${ids.campaign}`).send({ timeZone: 'Mars/Olympus' })).status).toBe(400);
    expect((await lead.patch(`/api/campaigns/${ids.campaign}`).send({ startDate: '2026-05-20', endDate: '2026-05-10' })).status).toBe(400);
    expect((await (await t.signIn(emails.biologist)).patch(`/api/campaigns/${ids.campaign}`).send({ permitRef: 'x' })).status).toBe(403);
    await lead.patch(`/api/campaigns/${ids.campaign}`).send({ timeZone: 'Europe/Lisbon' });
  });
});

describe('the site administrator', () => {
  it('creates a campaign and invites its first lead', async () => {
    const admin = await t.signIn(emails.admin);
    const res = await admin.post('/api/campaigns').send({
      name: 'Varn Shoal 2027',
      siteName: 'Varn Shoal merchant wreck',
      datumLat: 36.145,
      datumLon: -7.432,
      timeZone: 'Europe/Lisbon',
      leadEmail: 'new.lead@bathynote.test',
      leadName: 'Iris Calder',
    });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ name: 'Varn Shoal 2027', leadInvited: true });
    const link = linkIn((await mailTo('new.lead@bathynote.test')).text);
    const joined = await follow(link);
    expect(joined.last.location).toBe(`/campaigns/${res.body.id}?welcome=1`);
    const me = meSchema.parse(await (await fetch(`${t.url}/api/me`, { headers: { cookie: joined.cookie } })).json());
    expect(me.memberships).toEqual([{ campaignId: res.body.id, role: 'lead' }]);
  });

  it('makes an existing account lead at once', async () => {
    const res = await (
      await t.signIn(emails.admin)
    )
      .post('/api/campaigns')
      .send({ name: 'Training dives', siteName: 'Harbour wall', datumLat: 36.1, datumLon: -7.4, leadEmail: emails.archaeologist });
    expect(res.status).toBe(201);
    expect(res.body.leadInvited).toBe(false);
    const me = meSchema.parse((await (await t.signIn(emails.archaeologist)).get('/api/me')).body);
    expect(me.memberships).toContainEqual({ campaignId: res.body.id, role: 'lead' });
  });

  it('is the only one who creates campaigns or reads the outbox', async () => {
    const body = { name: 'x', siteName: 'y', datumLat: 0, datumLon: 0, leadEmail: 'a@bathynote.test' };
    expect((await (await t.signIn(emails.lead)).post('/api/campaigns').send(body)).status).toBe(403);
    expect((await t.anonymous().post('/api/campaigns').send(body)).status).toBe(401);
    expect((await (await t.signIn(emails.lead)).get('/api/dev/outbox')).status).toBe(403);
    expect((await t.anonymous().get('/api/dev/outbox')).status).toBe(401);
    expect((await (await t.signIn(emails.admin)).post('/api/campaigns').send({ ...body, datumLat: 91 })).status).toBe(400);
  });

  it('disables an account, which is signed out at once', async () => {
    const guest = await t.freshSignIn(emails.guest);
    expect((await guest.get('/api/me')).status).toBe(200);
    const admin = await t.signIn(emails.admin);
    const ban = await admin
      .post('/api/auth/admin/ban-user')
      .set('Origin', t.url)
      .send({ userId: ids.userId(emails.guest), banReason: 'left the campaign' });
    expect(ban.status).toBe(200);
    expect((await guest.get('/api/me')).status).toBe(401);
    const again = await t
      .anonymous()
      .post('/api/auth/sign-in/email')
      .set('Origin', t.url)
      .send({ email: emails.guest, password: 'bathynote-demo' });
    expect(again.status).toBeGreaterThanOrEqual(400);
    await admin
      .post('/api/auth/admin/unban-user')
      .set('Origin', t.url)
      .send({ userId: ids.userId(emails.guest) });
  });
});

describe('sessions', () => {
  it('changes a password (8 to 128 characters) and can sign out every other session', async () => {
    const one = await t.freshSignIn(emails.archaeologist);
    const two = await t.freshSignIn(emails.archaeologist);
    const short = await one
      .post('/api/auth/change-password')
      .set('Origin', t.url)
      .send({ currentPassword: 'bathynote-demo', newPassword: 'x'.repeat(7) });
    expect(short.status).toBe(400);
    const long = await one
      .post('/api/auth/change-password')
      .set('Origin', t.url)
      .send({ currentPassword: 'bathynote-demo', newPassword: 'x'.repeat(129) });
    expect(long.status).toBe(400);
    const changed = await one
      .post('/api/auth/change-password')
      .set('Origin', t.url)
      .send({ currentPassword: 'bathynote-demo', newPassword: 'a-new-long-password', revokeOtherSessions: true });
    expect(changed.status).toBe(200);
    expect((await two.get('/api/me')).status).toBe(401);
    // Back to the demo password for the other tests.
    const back = await t.freshSignIn(emails.archaeologist, 'a-new-long-password');
    expect(
      (
        await back
          .post('/api/auth/change-password')
          .set('Origin', t.url)
          .send({ currentPassword: 'a-new-long-password', newPassword: 'bathynote-demo' })
      ).status,
    ).toBe(200);
  });

  it('refuses a sign-in that asks to be sent to another origin', async () => {
    const res = await t
      .anonymous()
      .post('/api/auth/sign-in/email')
      .set('Origin', t.url)
      .send({ email: emails.biologist, password: 'bathynote-demo', callbackURL: 'https://evil.example/steal' });
    expect(res.status).toBe(403);
  });
});

describe('sign-in rate limit', () => {
  it('cannot be dodged with a forged X-Forwarded-For when no proxy is trusted', async () => {
    const s = await startTestServer({ env: { AUTH_RATE_LIMIT: '5' }, seed: false });
    try {
      const statuses: number[] = [];
      for (let i = 0; i < 8; i++) {
        const res = await s
          .anonymous()
          .post('/api/auth/sign-in/email')
          .set('Origin', s.url)
          .set('X-Forwarded-For', `203.0.113.${i}`)
          .send({ email: emails.biologist, password: 'wrong-password' });
        statuses.push(res.status);
      }
      expect(statuses.slice(0, 5), JSON.stringify(statuses)).toEqual([401, 401, 401, 401, 401]);
      expect(statuses.slice(5)).toEqual([429, 429, 429]);
      const limited = await s
        .anonymous()
        .post('/api/auth/sign-in/email')
        .set('Origin', s.url)
        .send({ email: emails.biologist, password: 'wrong-password' });
      expect(limited.status).toBe(429);
      expect(limited.body.error.code).toBe('rate_limited');
    } finally {
      await s.close();
    }
  });

  it('limits one client behind the trusted proxy without locking out the others', async () => {
    const s = await startTestServer({ env: { AUTH_RATE_LIMIT: '5', TRUST_PROXY: 'loopback' }, seed: false });
    try {
      const attempt = (ip: string) =>
        s
          .anonymous()
          .post('/api/auth/sign-in/email')
          .set('Origin', s.url)
          .set('X-Forwarded-For', ip)
          .send({ email: emails.biologist, password: 'wrong-password' });
      for (let i = 0; i < 6; i++) await attempt('203.0.113.66');
      expect((await attempt('203.0.113.66')).status).toBe(429);
      expect((await attempt('198.51.100.7')).status).toBe(401);
    } finally {
      await s.close();
    }
  });
});
