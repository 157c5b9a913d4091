/**
 * "E-mail me a sign-in link": a member gets a one-time link that signs them in; an address that is
 * not a member gets the very same answer and no mail, and no account is made; requests are
 * limited per address and per client.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { caughtMailSchema } from '@/lib/schemas';
import { emails } from '../helpers/demo';
import { startTestServer, type TestServer } from '../helpers/test-server';

let t: TestServer;

beforeAll(async () => {
  t = await startTestServer({ env: { AUTH_RATE_LIMIT: '6' } });
});
afterAll(() => t.close());

const ask = (email: string) => t.anonymous().post('/api/auth/sign-in/magic-link').set('Origin', t.url).send({ email });

async function mailsTo(address: string) {
  await t.ctx.mail.settled();
  const res = await (await t.signIn(emails.admin)).get('/api/dev/outbox');
  return (res.body as unknown[]).map((m) => caughtMailSchema.parse(m)).filter((m) => m.to.includes(address));
}

const linkIn = (text: string) => /(http:\/\/\S+\/api\/auth\/magic-link\/verify\?\S+)/.exec(text)?.[1];

describe('a sign-in link asked for by e-mail', () => {
  it('reaches a member, signs them in once, and says nothing different for a stranger', async () => {
    const member = await ask(emails.guest);
    const stranger = await ask('nobody-here@bathynote.test');
    expect(member.status).toBe(200);
    expect(stranger.status).toBe(200);
    expect(stranger.body).toEqual(member.body);

    expect(await mailsTo('nobody-here@bathynote.test')).toEqual([]);
    expect(t.ctx.db.$client.prepare("select count(*) from user where email = 'nobody-here@bathynote.test'").pluck().get()).toBe(0);

    const [mail] = await mailsTo(emails.guest);
    const link = linkIn(mail!.text);
    expect(link).toBeDefined();
    const first = await fetch(link!, { redirect: 'manual' });
    expect(first.status).toBe(302);
    const cookie = first.headers
      .getSetCookie()
      .map((c) => c.split(';')[0])
      .join('; ');
    const me = await fetch(`${t.url}/api/me`, { headers: { cookie } });
    expect(((await me.json()) as { user: { email: string } }).user.email).toBe(emails.guest);
    // The link works once.
    const again = await fetch(link!, { redirect: 'manual' });
    expect(
      again.headers.getSetCookie().some((c) => c.startsWith('better-auth.session_token=') && !c.startsWith('better-auth.session_token=;')),
    ).toBe(false);
  });

  it('refuses a malformed address with the contract’s field error', async () => {
    const res = await ask('not an address');
    expect(res.status).toBe(400);
    expect(res.body.error.issues[0].path).toBe('email');
  });

  it('is limited per address, with Retry-After', async () => {
    const answers = [];
    for (let i = 0; i < 4; i++) answers.push(await ask(emails.pilot));
    expect(answers.slice(0, 3).map((r) => r.status)).toEqual([200, 200, 200]);
    expect(answers[3]!.status).toBe(429);
    expect(answers[3]!.body.error.code).toBe('rate_limited');
    expect(Number(answers[3]!.headers['retry-after'])).toBeGreaterThan(0);
    expect(await mailsTo(emails.pilot)).toHaveLength(3);
  });
});
