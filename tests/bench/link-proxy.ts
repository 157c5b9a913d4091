/**
 * A TCP proxy standing for the satellite link: it counts every byte each way and, when throttled,
 * delivers each chunk no sooner than half the round trip after it was sent and no faster than the
 * link's rate (each direction its own queue, as on a full-duplex link).
 */
import { createConnection, createServer, type Server, type Socket } from 'node:net';

export type LinkShape = { bitsPerSecond: number; roundTripMs: number };
export const SATELLITE: LinkShape = { bitsPerSecond: 96_000, roundTripMs: 650 };

export type LinkProxy = {
  port: number;
  /** Bytes carried so far, both ways. */
  bytes: () => number;
  reset: () => void;
  /** Throttles from now on (or stops throttling with `null`). */
  shape: (shape: LinkShape | null) => void;
  close: () => Promise<void>;
};

/** `target` is the port behind the link, or a function giving it (for a server started after its link). */
export async function startLinkProxy(target: number | (() => number), shape: LinkShape | null = null): Promise<LinkProxy> {
  let bytes = 0;
  let current = shape;
  const sockets = new Set<Socket>();

  /** One direction of one connection: chunks queued for delivery at their time. */
  const pipe = (from: Socket, to: Socket) => {
    let freeAt = 0;
    from.on('data', (chunk: Buffer) => {
      bytes += chunk.length;
      if (!current) {
        to.write(chunk);
        return;
      }
      const now = Date.now();
      const sendMs = (chunk.length * 8 * 1000) / current.bitsPerSecond;
      freeAt = Math.max(freeAt, now) + sendMs;
      const at = Math.max(freeAt, now + current.roundTripMs / 2);
      setTimeout(() => to.write(chunk), at - now);
    });
    from.on('end', () => setTimeout(() => to.end(), current ? Math.max(0, freeAt - Date.now()) + current.roundTripMs / 2 : 0));
  };

  const server: Server = createServer((client) => {
    const upstream = createConnection(typeof target === 'number' ? target : target(), '127.0.0.1');
    for (const s of [client, upstream]) {
      sockets.add(s);
      s.on('error', () => {
        client.destroy();
        upstream.destroy();
      });
      s.on('close', () => sockets.delete(s));
    }
    pipe(client, upstream);
    pipe(upstream, client);
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const address = server.address();
  return {
    port: typeof address === 'object' && address ? address.port : 0,
    bytes: () => bytes,
    reset: () => (bytes = 0),
    shape: (s) => (current = s),
    close: () =>
      new Promise((resolve) => {
        for (const s of sockets) s.destroy();
        server.close(() => resolve());
      }),
  };
}
