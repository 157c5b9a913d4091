/**
 * What an operator relies on without seeing it: the database settings, the demo seed keeping
 * away from real data, the environment check, the generated secret, mail through a real SMTP
 * server, cookies behind https, errors without internals, logs that cannot be forged, and the
 * start-up lines that tell people where Bathynote runs.
 */
import { existsSync, mkdtempSync, readFileSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { createServer as createNetServer, type AddressInfo } from 'node:net';

import express from 'express';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';

import { demoSignIns, seedDemo } from '@/db/seed';
import { loadEnv } from '@/server/env';
import { errorHandler } from '@/server/middleware/errors';
import { createLogger } from '@/server/services/logger';
import { emails } from '../helpers/demo';
import { buildFixtures } from '../helpers/fixtures';
import { freePort, startServerProcess } from '../helpers/server-process';
import { smtpOn } from '../helpers/smtp';
import { startTestServer, type TestServer } from '../helpers/test-server';

let t: TestServer;
beforeAll(async () => {
  t = await startTestServer();
});
afterAll(() => t.close());

describe('the database', () => {
  it('opens with WAL, foreign keys, a busy timeout and full synchronous writes (CHECKS.md)', () => {
    const client = t.ctx.db.$client;
    expect(client.pragma('journal_mode', { simple: true })).toBe('wal');
    expect(client.pragma('foreign_keys', { simple: true })).toBe(1);
    expect(client.pragma('busy_timeout', { simple: true })).toBe(5000);
    // 2 is FULL: a commit is on disk before the answer goes out.
    expect(client.pragma('synchronous', { simple: true })).toBe(2);
  });

  it('never seeds the demo into a database that holds data', async () => {
    const count = (table: string) => t.ctx.db.$client.prepare(`select count(*) from ${table}`).pluck().get() as number;
    const before = { users: count('user'), observations: count('observations'), campaigns: count('campaigns') };
    expect(await seedDemo(t.ctx.db)).toEqual({ seeded: false, observations: 0 });
    expect({ users: count('user'), observations: count('observations'), campaigns: count('campaigns') }).toEqual(before);

    // One person and nothing else is data too.
    const lone = await startTestServer({ seed: false });
    try {
      lone.ctx.db.$client
        .prepare(
          "insert into user (id, name, email, email_verified, created_at, updated_at) values ('u1', 'Someone', 'someone@bathynote.test', 1, 0, 0)",
        )
        .run();
      expect((await seedDemo(lone.ctx.db)).seeded).toBe(false);
      expect(lone.ctx.db.$client.prepare('select count(*) from campaigns').pluck().get()).toBe(0);
    } finally {
      await lone.close();
    }
  });
});

describe('the environment', () => {
  let dir: string;
  beforeAll(() => {
    dir = mkdtempSync(path.join(tmpdir(), 'bathynote-env-'));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('refuses bad settings, naming each', () => {
    expect(() => loadEnv({ NODE_ENV: 'test', PORT: 'eighty', PUBLIC_URL: 'ftp://x', STREAM_HEARTBEAT_MS: '60000' })).toThrow(
      /PORT[\s\S]*PUBLIC_URL[\s\S]*STREAM_HEARTBEAT_MS/,
    );
  });

  it('generates a session secret on first start, keeps it private, and reuses it', () => {
    const source = { NODE_ENV: 'test', DATABASE_PATH: path.join(dir, 'data', 'bathynote.db') } as const;
    const first = loadEnv(source);
    const file = path.join(dir, 'data', 'auth-secret');
    expect(existsSync(file)).toBe(true);
    expect(first.AUTH_SECRET.length).toBeGreaterThanOrEqual(32);
    expect(readFileSync(file, 'utf8')).toBe(first.AUTH_SECRET);
    expect(statSync(file).mode & 0o077).toBe(0);
    expect(loadEnv(source).AUTH_SECRET).toBe(first.AUTH_SECRET);
  });
});

describe('mail through SMTP_URL', () => {
  let smtp: ReturnType<typeof smtpOn>;
  let withSmtp: TestServer;

  beforeAll(async () => {
    const port = await freePort();
    smtp = smtpOn(port);
    await smtp.start();
    withSmtp = await startTestServer({ env: { SMTP_URL: `smtp://127.0.0.1:${port}` } });
  });
  afterAll(async () => {
    await withSmtp.close();
    await smtp.stop();
  });

  it('sends invitations to the configured server, and has no outbox of its own', async () => {
    const ids = await buildFixtures(withSmtp);
    const lead = await withSmtp.signIn(emails.lead);
    const res = await lead.post(`/api/campaigns/${ids.campaign}/invitations`).send({ email: 'ashore@bathynote.test', role: 'guest' });
    expect(res.status).toBe(201);
    await vi.waitFor(() => expect(smtp.received.some((m) => m.to.includes('ashore@bathynote.test'))).toBe(true), { timeout: 5000 });
    const mail = smtp.received.find((m) => m.to.includes('ashore@bathynote.test'))!;
    expect(mail.subject).toContain(`invites you to ${ids.campaignName}`);
    expect(mail.text).toMatch(/\/api\/auth\/magic-link\/verify\?token=/);

    const outbox = await (await withSmtp.signIn(emails.admin)).get('/api/dev/outbox');
    expect(outbox.status).toBe(404);
    expect(outbox.body.error.message).toMatch(/SMTP_URL/);
  });
});

describe('behind an https proxy', () => {
  it('marks the session cookie Secure, HttpOnly and SameSite=Lax', async () => {
    const origin = 'https://bathynote.ship.example';
    const tls = await startTestServer({ env: { PUBLIC_URL: origin, TRUST_PROXY: 'loopback' } });
    try {
      const res = await request(tls.url)
        .post('/api/auth/sign-in/email')
        .set('Origin', origin)
        .set('X-Forwarded-Proto', 'https')
        .send({ email: emails.guest, password: 'bathynote-demo' });
      expect(res.status).toBe(200);
      const cookie = ([] as string[]).concat(res.headers['set-cookie'] ?? []).find((c) => c.includes('session_token'));
      expect(cookie).toMatch(/^__Secure-/);
      expect(cookie).toMatch(/;\s*Secure/i);
      expect(cookie).toMatch(/HttpOnly/i);
      expect(cookie).toMatch(/SameSite=Lax/i);
      expect(res.headers['strict-transport-security']).toBeDefined();
    } finally {
      await tls.close();
    }
  });
});

describe('errors and logs', () => {
  it('answers a crash with the contract shape and no internals, and logs the details', async () => {
    const lines: string[] = [];
    const spy = vi.spyOn(process.stderr, 'write').mockImplementation((chunk) => {
      lines.push(String(chunk));
      return true;
    });
    try {
      const app = express();
      app.get('/boom', () => {
        throw new Error('database file /srv/secret/path is locked');
      });
      app.use(errorHandler(createLogger('error')));
      const res = await request(app).get('/boom');
      expect(res.status).toBe(500);
      expect(res.body).toEqual({ error: { code: 'internal', message: expect.any(String) } });
      expect(res.text).not.toMatch(/secret|at .*\.ts|Error:/);
      expect(lines.join('')).toMatch(/secret\/path is locked/);
    } finally {
      spy.mockRestore();
    }
  });

  it('writes one line per log entry, whatever the values hold', () => {
    const lines: string[] = [];
    const spy = vi.spyOn(process.stdout, 'write').mockImplementation((chunk) => {
      lines.push(String(chunk));
      return true;
    });
    try {
      createLogger('info').info('sign-in failed', { email: 'x@bathynote.test\n{"level":"info","message":"admin signed in"}' });
    } finally {
      spy.mockRestore();
    }
    const out = lines.join('');
    expect(out.split('\n').filter(Boolean)).toHaveLength(1);
    expect(JSON.parse(out)).toMatchObject({ level: 'info', message: 'sign-in failed' });
  });
});

describe('starting the server', () => {
  it('migrates, seeds the demo, and prints where it runs and the demo sign-ins', async () => {
    const server = await startServerProcess({ LOG_LEVEL: 'info' });
    try {
      const out = server.output();
      expect(out).toContain(`is running at ${server.url}`);
      for (const s of demoSignIns) expect(out).toContain(s.email);
      expect(out).toMatch(/password "bathynote-demo"/);
      expect(out).toMatch(/seeded the demo campaigns/);
      const res = await fetch(`${server.url}/api/health`);
      expect(res.status).toBe(200);
    } finally {
      await server.stop();
    }
  });

  it('says in one line that its port is taken, rather than throwing', async () => {
    const holder = createNetServer();
    await new Promise<void>((resolve) => holder.listen(0, '127.0.0.1', resolve));
    const { port } = holder.address() as AddressInfo;
    try {
      const started = startServerProcess({ PORT: String(port) });
      await expect(started).rejects.toThrow(
        `Bathynote could not start: port ${port} on 127.0.0.1 is already in use; stop what holds it, or set PORT to another port`,
      );
      await expect(started).rejects.not.toThrow(/Unhandled|EADDRINUSE/);
    } finally {
      holder.close();
    }
  });
});
