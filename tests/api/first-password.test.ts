/**
 * A person who joined by an invitation link has no password: they set a first one without being
 * asked for a current one, then sign in with it. An account that has a password is told to
 * change it instead (409 password_exists), and nothing is overwritten.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { DEMO_PASSWORD } from '@/db/seed';
import { demoIds, emails } from '../helpers/demo';
import { startTestServer, type TestServer } from '../helpers/test-server';

let t: TestServer;

beforeAll(async () => {
  t = await startTestServer();
});
afterAll(() => t.close());

describe('a first password', () => {
  it('is set by an account without one, which then signs in with it', async () => {
    const guest = await t.freshSignIn(emails.guest);
    // As an invited person's account is: a credential account with no password on it.
    const userId = demoIds(t.ctx.db).userId(emails.guest);
    t.ctx.db.$client.prepare("update account set password = null where user_id = ? and provider_id = 'credential'").run(userId);
    expect((await guest.get('/api/me')).body.hasPassword).toBe(false);

    expect((await guest.post('/api/me/password').send({ newPassword: 'short' })).status).toBe(400);
    const set = await guest.post('/api/me/password').send({ newPassword: 'a-first-password-at-sea' });
    expect(set.status).toBe(204);
    expect((await guest.get('/api/me')).body.hasPassword).toBe(true);
    await t.freshSignIn(emails.guest, 'a-first-password-at-sea');

    const again = await guest.post('/api/me/password').send({ newPassword: 'another-password-at-sea' });
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('password_exists');
    await t.freshSignIn(emails.guest, 'a-first-password-at-sea');
  });

  it('is refused to an account that has a password, which keeps it', async () => {
    const pilot = await t.signIn(emails.pilot);
    expect((await pilot.get('/api/me')).body.hasPassword).toBe(true);
    const res = await pilot.post('/api/me/password').send({ newPassword: 'not-taken-at-all' });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('password_exists');
    await t.freshSignIn(emails.pilot, DEMO_PASSWORD);
  });

  it('needs a signed-in person', async () => {
    const res = await t.anonymous().post('/api/me/password').set('Origin', t.url).send({ newPassword: 'a-first-password-at-sea' });
    expect(res.status).toBe(401);
  });
});
