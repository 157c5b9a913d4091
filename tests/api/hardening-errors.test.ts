/**
 * Answers that say what happened: a telemetry log's runaway quote and oversized header, a query
 * value outside its enum, a request head too large for the server, and a sign-in refused for too
 * many attempts, each in the contract's error shape.
 */
import { request as httpRequest } from 'node:http';

import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { apiErrorSchema } from '@/lib/schemas';
import { emails } from '../helpers/demo';
import { buildFixtures, type Fixtures } from '../helpers/fixtures';
import { startTestServer, type TestServer } from '../helpers/test-server';

let t: TestServer;
let ids: Fixtures;

beforeAll(async () => {
  t = await startTestServer();
  ids = await buildFixtures(t);
});
afterAll(() => t.close());

async function importLog(csv: string) {
  return (await t.signIn(emails.pilot)).post(`/api/dives/${ids.dive}/telemetry`).attach('file', Buffer.from(csv), 'nav.csv');
}

describe('telemetry logs', () => {
  it('names the line where a record with a quote never closed began, not where the reader gave up', async () => {
    const rows = Array.from(
      { length: 3000 },
      (_, i) => `2026-05-13T18:${String(10 + Math.floor(i / 60)).padStart(2, '0')}:${String(i % 60).padStart(2, '0')}Z,600.0,x`,
    );
    const csv = `time,depth_m,remark\n2026-05-13T18:09:59Z,600.0,"left open\n${rows.join('\n')}\n`;
    const res = await importLog(csv);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('record_too_long');
    expect(res.body.error.message).toMatch(/starting on line 2\b/);
    expect(res.body.error.issues[0].path).toBe('file.line.2');
  });

  it('answers a header line of 10 MB with record_too_long for line 1, not "no header"', async () => {
    const header = `time,${Array.from({ length: 1_000_000 }, (_, i) => `c${i}`).join(',')}`.slice(0, 10 * 1024 * 1024);
    const res = await importLog(`${header}\n2026-05-13T18:10:00Z,600\n`);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('record_too_long');
    expect(res.body.error.issues[0].path).toBe('file.line.1');
    // The same with a quote in it, read by the full CSV parser.
    const quoted = await importLog(`"time",${header.slice(5)}\n2026-05-13T18:10:00Z,600\n`);
    expect(quoted.status).toBe(400);
    expect(quoted.body.error.code).toBe('record_too_long');
    expect(quoted.body.error.issues[0].path).toBe('file.line.1');
  });
});

describe('query values', () => {
  it('refuses a value of the dive log query outside its enum with 400', async () => {
    const lead = await t.signIn(emails.lead);
    for (const query of [{ retired: 'yes' }, { retired: '' }, { sort: 'title' }, { hasPhotos: '1' }]) {
      const res = await lead.get(`/api/dives/${ids.dive}/observations`).query(query);
      expect(res.status, JSON.stringify(query)).toBe(400);
      expect(res.body.error.code).toBe('validation_failed');
      expect(res.body.error.issues[0].path).toBe(Object.keys(query)[0]);
    }
    expect((await lead.get(`/api/dives/${ids.dive}/observations`).query({ retired: 'only' })).status).toBe(200);
  });
});

/** A raw GET with one extra header, so that the server's own HTTP parser sees it. */
function rawGet(path: string, headers: Record<string, string>): Promise<{ status: number; type: string; body: string }> {
  return new Promise((resolve, reject) => {
    const req = httpRequest(`${t.url}${path}`, { headers }, (res) => {
      let body = '';
      res.setEncoding('utf8');
      res.on('data', (c: string) => (body += c));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, type: String(res.headers['content-type']), body }));
    });
    req.on('error', reject);
    req.end();
  });
}

describe('request heads', () => {
  it('answers a 100 KB cursor with a JSON 431, and a 20 KB one with the usual 400', async () => {
    const cookie = await t.sessionCookie(emails.lead);
    const huge = await rawGet(`/api/dives/${ids.dive}/observations?cursor=${'a'.repeat(100 * 1024)}`, { cookie });
    expect(huge.status).toBe(431);
    expect(huge.type).toMatch(/application\/json/);
    expect(apiErrorSchema.parse(JSON.parse(huge.body)).error.code).toBe('headers_too_large');

    const long = await rawGet(`/api/dives/${ids.dive}/observations?cursor=${'a'.repeat(20 * 1024)}`, { cookie });
    expect(long.status).toBe(400);
    const body = apiErrorSchema.parse(JSON.parse(long.body));
    expect(body.error.code).toBe('validation_failed');
    expect(body.error.issues?.[0]?.path).toBe('cursor');
  });

  it('answers a request Node cannot parse in JSON too', async () => {
    const res = await rawGet('/api/health', { 'x-bad': 'a\u0001b' }).catch(() => null);
    // Node's client refuses to send an invalid header itself; a raw socket does.
    expect(res).toBeNull();
    const { Socket } = await import('node:net');
    const url = new URL(t.url);
    const answer = await new Promise<string>((resolve) => {
      const socket = new Socket();
      let text = '';
      socket.on('data', (c) => (text += c.toString()));
      socket.on('close', () => resolve(text));
      socket.connect(Number(url.port), url.hostname, () => socket.write('GET /api/health HTTP/1.1\r\nHost: x\r\nBad Header\r\n\r\n'));
    });
    expect(answer).toMatch(/^HTTP\/1\.1 400 /);
    expect(answer).toMatch(/content-type: application\/json/i);
    expect(JSON.parse(answer.slice(answer.indexOf('\r\n\r\n') + 4)).error.code).toBe('bad_request');
  });
});

describe('sign-in attempts', () => {
  it('refuses too many with 429 rate_limited and a Retry-After in seconds', async () => {
    const s = await startTestServer({ env: { AUTH_RATE_LIMIT: '3' }, seed: false });
    try {
      const attempt = () =>
        s.anonymous().post('/api/auth/sign-in/email').set('Origin', s.url).send({ email: emails.guest, password: 'wrong-password' });
      const statuses: number[] = [];
      for (let i = 0; i < 3; i++) statuses.push((await attempt()).status);
      const refused = await attempt();
      expect([...statuses, refused.status]).toEqual([401, 401, 401, 429]);
      expect(refused.body.error.code).toBe('rate_limited');
      expect(Number(refused.headers['retry-after'])).toBeGreaterThan(0);
    } finally {
      await s.close();
    }
  });
});

describe('invitation links that no longer work', () => {
  /** Opens a link as a browser would, following redirects inside the API, and answers where it lands. */
  async function landing(link: string): Promise<string> {
    let url = link;
    let cookie = '';
    for (let i = 0; i < 5; i++) {
      const res = await fetch(url, { redirect: 'manual', headers: cookie ? { cookie } : {} });
      const set = res.headers
        .getSetCookie()
        .map((c) => c.split(';')[0])
        .filter((c): c is string => !!c && !c.endsWith('='));
      if (set.length) cookie = set.join('; ');
      const location = res.headers.get('location');
      if (!location) return url;
      url = new URL(location, t.url).toString();
      if (!url.includes('/api/')) break;
    }
    const landed = new URL(url);
    return `${landed.pathname}${landed.search}`;
  }

  async function invite(email: string) {
    const res = await (await t.signIn(emails.lead)).post(`/api/campaigns/${ids.campaign}/invitations`).send({ email, role: 'guest' });
    expect(res.status).toBe(201);
    await t.ctx.mail.settled();
    return { id: res.body.id as string, link: await linkTo(email) };
  }

  async function linkTo(email: string): Promise<string> {
    await t.ctx.mail.settled();
    const mails = ((await (await t.signIn(emails.admin)).get('/api/dev/outbox')).body as { to: string; text: string }[]).filter((m) =>
      m.to.includes(email),
    );
    return /(http:\/\/\S+\/api\/auth\/magic-link\/verify\?\S+)/.exec(mails[0]!.text)![1]!;
  }

  it('says the link was used, revoked or replaced by a newer one', async () => {
    const used = await invite('used-link@bathynote.test');
    expect(await landing(used.link)).toBe(`/campaigns/${ids.campaign}?welcome=1`);
    expect(await landing(used.link)).toBe('/invitation-problem?reason=used');

    const revoked = await invite('revoked-link@bathynote.test');
    expect((await (await t.signIn(emails.lead)).delete(`/api/invitations/${revoked.id}`)).status).toBe(200);
    expect(await landing(revoked.link)).toBe('/invitation-problem?reason=revoked');

    const replaced = await invite('replaced-link@bathynote.test');
    expect((await (await t.signIn(emails.lead)).post(`/api/invitations/${replaced.id}/resend`)).status).toBe(200);
    const newer = await linkTo('replaced-link@bathynote.test');
    expect(newer).not.toBe(replaced.link);
    expect(await landing(replaced.link)).toBe('/invitation-problem?reason=replaced');
    expect(await landing(newer)).toBe(`/campaigns/${ids.campaign}?welcome=1`);
  });
});
