/**
 * Requests and responses are born with the Express app's prototypes, so Express's own
 * Object.setPrototypeOf on each of them changes nothing. (Changing them keeps every request's
 * objects alive into V8's old generation; `npm run bench -- live-load` prints the collections.)
 */
import { IncomingMessage, ServerResponse, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';

import express from 'express';
import { afterEach, describe, expect, it } from 'vitest';

import { bornFor, createHttpServer } from '@/server/http-server';

const servers: Server[] = [];
afterEach(async () => {
  await Promise.all(servers.splice(0).map((s) => new Promise((r) => s.close(r))));
});

/** A server for `app`, with `born` applied or not, that records each request's and response's prototype as they arrive. */
async function serve(born: boolean) {
  const app = express();
  app.get('/ping', (req, res) => {
    res.json({ req: Object.getPrototypeOf(req) === app.request, res: Object.getPrototypeOf(res) === app.response });
  });
  const server = createHttpServer(app);
  servers.push(server);
  if (born) bornFor(server, app);
  const seen: { req: object; res: object }[] = [];
  // Ahead of the app's own listener: what the request and response were born with.
  server.prependListener('request', (req: IncomingMessage, res: ServerResponse) => {
    seen.push({ req: Object.getPrototypeOf(req) as object, res: Object.getPrototypeOf(res) as object });
  });
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
  const url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  return { app, seen, url };
}

describe('requests and responses', () => {
  it("are born with the app's prototypes once the server knows its app", async () => {
    const { app, seen, url } = await serve(true);
    for (let i = 0; i < 3; i++) {
      const res = await fetch(`${url}/ping`);
      // Express's own methods still work on them, and the app sees its own prototypes.
      expect(await res.json()).toEqual({ req: true, res: true });
    }
    expect(seen).toHaveLength(3);
    for (const s of seen) {
      expect(s.req).toBe(app.request);
      expect(s.res).toBe(app.response);
      // Node's own classes are still what they are.
      expect(Object.prototype.isPrototypeOf.call(IncomingMessage.prototype, s.req)).toBe(true);
      expect(Object.prototype.isPrototypeOf.call(ServerResponse.prototype, s.res)).toBe(true);
    }
  });

  it("are born with Node's own prototypes before that, and Express sets its own on them", async () => {
    const { seen, url } = await serve(false);
    const res = await fetch(`${url}/ping`);
    expect(await res.json()).toEqual({ req: true, res: true });
    expect(seen[0]!.req).toBe(IncomingMessage.prototype);
    expect(seen[0]!.res).toBe(ServerResponse.prototype);
  });

  it('still answer requests Node cannot parse in the JSON error shape', async () => {
    const { url } = await serve(true);
    const res = await fetch(`${url}/ping`, { headers: { 'x-long': 'a'.repeat(70 * 1024) } });
    expect(res.status).toBe(431);
    expect(((await res.json()) as { error: { code: string } }).error.code).toBe('headers_too_large');
  });
});
