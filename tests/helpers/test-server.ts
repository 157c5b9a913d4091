import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import path from 'node:path';

import request from 'supertest';

import { DEMO_PASSWORD, seedDemo } from '@/db/seed';
import { createApp } from '@/server/app';
import { closeContext, createContext } from '@/server/bootstrap';
import type { AppContext } from '@/server/context';
import { loadEnv } from '@/server/env';
import { bornFor, createHttpServer } from '@/server/http-server';

export type TestServer = {
  url: string;
  ctx: AppContext;
  dir: string;
  /** A cookie-keeping client signed in as the given demo e-mail (one session per e-mail, reused). */
  signIn: (email: string) => Promise<ReturnType<typeof request.agent>>;
  /** A client with a session of its own, for tests that end or change sessions. */
  freshSignIn: (email: string, password?: string) => Promise<ReturnType<typeof request.agent>>;
  anonymous: () => ReturnType<typeof request.agent>;
  /** A fresh session's cookie header, for raw HTTP clients (streams, uploads). */
  sessionCookie: (email: string) => Promise<string>;
  close: () => Promise<void>;
};

/** A small stand-in for the web export, with one inline script so the CSP hash can be checked. */
export const FAKE_INDEX = '<!DOCTYPE html><html><head><script>window.__bn=1</script></head><body><div id="root"></div></body></html>';

/**
 * Starts the real app on an ephemeral port over real HTTP, with its own database in a temp
 * folder. The port is bound first so that better-auth's base URL is the exact origin.
 */
/**
 * An API test server on the demo. The demo's watch plan is left out unless `demoWatchPlan` asks for
 * it: with it, a server that happens to run across a real change of watch would write a handover
 * note and its events into a test that did not ask for them.
 */
export async function startTestServer(
  options: { seed?: boolean; env?: Record<string, string>; demoWatchPlan?: boolean } = {},
): Promise<TestServer> {
  const dir = mkdtempSync(path.join(tmpdir(), 'bathynote-test-'));
  const webDir = path.join(dir, 'web');
  mkdirSync(webDir);
  writeFileSync(path.join(webDir, 'index.html'), FAKE_INDEX);
  const server: Server = createHttpServer();
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const { port } = server.address() as AddressInfo;
  const url = `http://127.0.0.1:${port}`;
  const env = loadEnv({
    NODE_ENV: 'test',
    PORT: String(port),
    DATABASE_PATH: path.join(dir, 'bathynote.db'),
    UPLOADS_DIR: path.join(dir, 'uploads'),
    PUBLIC_URL: url,
    AUTH_SECRET: 'test-secret-that-is-long-enough-for-better-auth',
    LOG_LEVEL: process.env.TEST_LOG_LEVEL ?? 'silent',
    WEB_DIR: webDir,
    ...options.env,
  });
  const ctx = await createContext(env);
  if (options.seed !== false) await seedDemo(ctx.db, { watchPlan: options.demoWatchPlan === true });
  const app = createApp(ctx);
  bornFor(server, app);
  server.on('request', app);

  const agents = new Map<string, ReturnType<typeof request.agent>>();
  const freshSignIn = async (email: string, password = DEMO_PASSWORD) => {
    const agent = request.agent(url);
    const res = await agent.post('/api/auth/sign-in/email').set('Origin', url).send({ email, password });
    if (res.status !== 200) throw new Error(`sign-in of ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
    return agent;
  };

  return {
    url,
    ctx,
    dir,
    anonymous: () => request.agent(url),
    freshSignIn,
    sessionCookie: async (email) => {
      const res = await fetch(`${url}/api/auth/sign-in/email`, {
        method: 'POST',
        headers: { 'content-type': 'application/json', origin: url },
        body: JSON.stringify({ email, password: DEMO_PASSWORD }),
      });
      if (res.status !== 200) throw new Error(`sign-in of ${email} failed: ${res.status}`);
      return res.headers
        .getSetCookie()
        .map((c) => c.split(';')[0])
        .join('; ');
    },
    signIn: async (email) => {
      let agent = agents.get(email);
      if (!agent) {
        agent = await freshSignIn(email);
        agents.set(email, agent);
      }
      return agent;
    },
    close: async () => {
      const closed = new Promise<void>((resolve) => server.close(() => resolve()));
      server.closeIdleConnections();
      // Let handlers still at work finish before their database goes away.
      await new Promise((r) => setTimeout(r, 200));
      server.closeAllConnections();
      await closed;
      await closeContext(ctx);
      rmSync(dir, { recursive: true, force: true });
    },
  };
}
