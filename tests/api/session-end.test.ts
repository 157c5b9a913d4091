/**
 * Every way a session or a member's access ends closes that session's open live streams at once:
 * an entry logged right after the change never reaches them. Each case gets a server of its own,
 * since several of them change the demo accounts for good.
 */
import { afterEach, beforeEach, describe, expect, it } from 'vitest';

import { DEMO_PASSWORD } from '@/db/seed';
import { demoIds, emails } from '../helpers/demo';
import { openSse, type SseClient } from '../helpers/sse';
import { startTestServer, type TestServer } from '../helpers/test-server';

let t: TestServer;
let ids: ReturnType<typeof demoIds>;
let dive: string;

beforeEach(async () => {
  // A heartbeat far longer than any test here: nothing may wait for it to notice the change.
  t = await startTestServer({ env: { STREAM_HEARTBEAT_MS: '25000', AUTH_RATE_LIMIT: '200' } });
  ids = demoIds(t.ctx.db);
  const planned = await (
    await t.signIn(emails.pilot)
  )
    .post(`/api/campaigns/${ids.campaign2026}/dives`)
    .send({ number: 'SE-01', objectives: 'Sessions ending' });
  expect(planned.status).toBe(201);
  dive = planned.body.id as string;
});
afterEach(() => t.close());

/** A stream opened by a session of `email`, with the session's cookie and token. */
async function openStream(email: string): Promise<{ reader: SseClient; cookie: string; token: string }> {
  const cookie = await t.sessionCookie(email);
  const reader = openSse(`${t.url}/api/dives/${dive}/stream`, { cookie });
  expect(await reader.status).toBe(200);
  await reader.next((e) => e.event === 'ready');
  const session = await fetch(`${t.url}/api/auth/get-session`, { headers: { cookie } });
  const token = ((await session.json()) as { session: { token: string } }).session.token;
  return { reader, cookie, token };
}

/** Logs an entry right after the change and shows that the stream ended without it. */
async function expectClosedBeforeNextEntry(reader: SseClient) {
  const entry = await (
    await t.signIn(emails.lead)
  )
    .post(`/api/dives/${dive}/observations`)
    .send({ kind: 'operations', title: 'Logged right after the change' });
  expect(entry.status).toBe(201);
  await reader.ended;
  expect(reader.events.filter((e) => e.event === 'observation.created')).toEqual([]);
}

describe('an open live stream closes at once when', () => {
  it('its session signs out', async () => {
    const { reader, cookie } = await openStream(emails.guest);
    const out = await fetch(`${t.url}/api/auth/sign-out`, { method: 'POST', headers: { cookie, origin: t.url } });
    expect(out.status).toBe(200);
    await expectClosedBeforeNextEntry(reader);
  });

  it('its session is revoked from another session', async () => {
    const { reader, token } = await openStream(emails.guest);
    const other = await t.freshSignIn(emails.guest);
    expect((await other.post('/api/auth/revoke-session').set('Origin', t.url).send({ token })).status).toBe(200);
    await expectClosedBeforeNextEntry(reader);
  });

  it('another session revokes all the others', async () => {
    const { reader } = await openStream(emails.guest);
    const other = await t.freshSignIn(emails.guest);
    expect((await other.post('/api/auth/revoke-other-sessions').set('Origin', t.url).send({})).status).toBe(200);
    await expectClosedBeforeNextEntry(reader);
  });

  it('the password is changed elsewhere with the other sessions signed out', async () => {
    const { reader } = await openStream(emails.guest);
    const other = await t.freshSignIn(emails.guest);
    const changed = await other
      .post('/api/auth/change-password')
      .set('Origin', t.url)
      .send({ currentPassword: DEMO_PASSWORD, newPassword: 'a-new-password-at-sea', revokeOtherSessions: true });
    expect(changed.status).toBe(200);
    await expectClosedBeforeNextEntry(reader);
  });

  it('the site administrator disables the account', async () => {
    const { reader } = await openStream(emails.guest);
    const banned = await (
      await t.signIn(emails.admin)
    )
      .post('/api/auth/admin/ban-user')
      .set('Origin', t.url)
      .send({ userId: ids.userId(emails.guest) });
    expect(banned.status).toBe(200);
    await expectClosedBeforeNextEntry(reader);
  });

  it('the site administrator removes an account that wrote nothing', async () => {
    // The outsider joins the campaign as a guest, reads the dive and writes nothing.
    t.ctx.db.$client
      .prepare("insert into memberships (campaign_id, user_id, role, created_at) values (?, ?, 'guest', ?)")
      .run(ids.campaign2026, ids.userId(emails.outsider), Date.now());
    const { reader } = await openStream(emails.outsider);
    const removed = await (
      await t.signIn(emails.admin)
    )
      .post('/api/auth/admin/remove-user')
      .set('Origin', t.url)
      .send({ userId: ids.userId(emails.outsider) });
    expect(removed.status).toBe(200);
    await expectClosedBeforeNextEntry(reader);
  });

  it('(an account named in the record is never removed: it is disabled instead)', async () => {
    const refused = await (
      await t.signIn(emails.admin)
    )
      .post('/api/auth/admin/remove-user')
      .set('Origin', t.url)
      .send({ userId: ids.userId(emails.guest) });
    expect(refused.status).toBe(409);
    expect(refused.body.error.code).toBe('account_holds_records');
    // Nothing of the account went: its password still signs in.
    const again = await t.freshSignIn(emails.guest);
    expect((await again.get('/api/me')).status).toBe(200);
  });

  it('the lead removes the member from the campaign', async () => {
    const { reader } = await openStream(emails.guest);
    const gone = await (await t.signIn(emails.lead)).delete(`/api/campaigns/${ids.campaign2026}/members/${ids.userId(emails.guest)}`);
    expect(gone.status).toBeLessThan(300);
    await expectClosedBeforeNextEntry(reader);
  });

  it('the lead gives the member another role', async () => {
    const { reader } = await openStream(emails.biologist);
    const demoted = await (
      await t.signIn(emails.lead)
    )
      .patch(`/api/campaigns/${ids.campaign2026}/members/${ids.userId(emails.biologist)}`)
      .send({ role: 'guest' });
    expect(demoted.status).toBeLessThan(300);
    await expectClosedBeforeNextEntry(reader);
  });
});
