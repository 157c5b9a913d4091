/**
 * A connection left idle between two requests stays open well past Node's five seconds, so a
 * person logging an entry every so often does not pay a new connection (a round trip or three on
 * a satellite link) for each.
 */
import { connect, type Socket } from 'node:net';

import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { HEADERS_TIMEOUT_MS, KEEP_ALIVE_TIMEOUT_MS } from '@/server/http-server';
import { startTestServer, type TestServer } from '../helpers/test-server';

let t: TestServer;
beforeAll(async () => {
  t = await startTestServer({ seed: false });
});
afterAll(() => t.close());

/** Sends one request on the socket and resolves with the answer's status line. */
function ask(socket: Socket, host: string): Promise<string> {
  return new Promise((resolve, reject) => {
    let got = '';
    const onData = (d: Buffer) => {
      got += d.toString('latin1');
      const head = got.indexOf('\r\n\r\n');
      const length = /content-length: (\d+)/i.exec(got);
      if (head >= 0 && length && got.length >= head + 4 + Number(length[1])) {
        socket.off('data', onData);
        resolve(got.slice(0, got.indexOf('\r\n')));
      }
    };
    socket.on('data', onData);
    socket.once('error', reject);
    socket.write(`GET /api/health HTTP/1.1\r\nHost: ${host}\r\nConnection: keep-alive\r\n\r\n`);
  });
}

describe('idle connections', () => {
  it('are kept for a minute, with the request-head limit longer still', () => {
    expect(KEEP_ALIVE_TIMEOUT_MS).toBeGreaterThanOrEqual(60_000);
    expect(HEADERS_TIMEOUT_MS).toBeGreaterThan(KEEP_ALIVE_TIMEOUT_MS);
  });

  it('serve a second request after more than five seconds idle, on the same connection', async () => {
    const { hostname, port } = new URL(t.url);
    const socket = connect(Number(port), hostname);
    let closedAt: number | null = null;
    // The server ending its side is enough: the connection cannot be used again.
    socket.on('end', () => (closedAt ??= Date.now()));
    socket.on('close', () => (closedAt ??= Date.now()));
    try {
      await new Promise<void>((resolve, reject) => socket.once('connect', resolve).once('error', reject));
      expect(await ask(socket, `${hostname}:${port}`)).toBe('HTTP/1.1 200 OK');
      await new Promise((r) => setTimeout(r, 6000));
      expect(closedAt).toBeNull();
      expect(await ask(socket, `${hostname}:${port}`)).toBe('HTTP/1.1 200 OK');
    } finally {
      socket.destroy();
    }
  }, 20_000);
});
