import { existsSync } from 'node:fs';
import http from 'node:http';
import https from 'node:https';
import { resolve, sep } from 'node:path';

import type { Statement } from 'better-sqlite3';
import type { RequestHandler } from 'express';

import type { Auth } from '../auth';
import { errorBody } from '../errors';
import { sameOrigin } from '../middleware/same-origin';
import { sessionCacheFor, sessionCookieOf } from '../middleware/session';
import type { Mirror } from './mirror';

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);
const HOP_BY_HOP = new Set([
  'connection',
  'keep-alive',
  'proxy-authenticate',
  'proxy-authorization',
  'te',
  'trailer',
  'transfer-encoding',
  'upgrade',
  'host',
]);

/** The token part of a signed session cookie (`token.signature`). */
const tokenOf = (cookie: string) => cookie.slice(0, cookie.lastIndexOf('.') > 0 ? cookie.lastIndexOf('.') : cookie.length);

/**
 * On a mirror, what the shore copy cannot answer goes to the ship: sign-in and everything under
 * `/api/auth`, every change (any method but GET and HEAD), and the reads of a session that has
 * just written something the copy does not hold yet. A session the copy does not hold yet (signed
 * in on the ship a moment ago) is checked once against the ship and its reads are then served from
 * the copy, as long as the copy grants that person what the ship said it does; until then they go
 * to the ship. A session the ship has ended is refused here at once. The cookie passes through
 * both ways, so one session works on both. Nothing is queued: with the ship out of reach the
 * answer is 502 `ship_unreachable`.
 */
export function forwardToShip(mirror: Mirror, auth: Auth, publicUrl: string, uploadsDir: string): RequestHandler {
  const ship = new URL(mirror.settings.of);
  const photoHere = photoFilesAshore(mirror, uploadsDir);
  const checkOrigin = sameOrigin(publicUrl);
  const sessions = mirror.sessions;
  const cache = sessionCacheFor(auth);
  return async (req, res, next) => {
    const path = req.path;
    if (path === '/health' || path.startsWith('/mirror/')) return next();
    const cookie = sessionCookieOf(req.headers.cookie);
    const token = cookie ? tokenOf(cookie) : undefined;
    const write = !SAFE_METHODS.has(req.method);
    const authPath = path.startsWith('/auth/');
    if (token && sessions.isEnded(token) && !authPath) {
      // As on the ship: an ended session is no session (a route that needs one answers 401).
      delete req.headers.cookie;
      if (write) return void res.status(401).json(errorBody('unauthorized', 'Sign in to continue.'));
      return next();
    }
    const send = () => {
      if (write && token) mirror.noteWrite(token);
      relay(ship, req, res);
    };
    if (authPath || write) return write ? checkOrigin(req, res, send) : send();
    if (!token || !cookie) return next();
    if (mirror.readsFromShip(token)) return send();
    // A photo file the ship has not sent ashore yet (an original waits behind the display sizes)
    // comes from the ship for the one who asks; the ship decides whether they may see it.
    if (!photoHere(path, req.query.size)) return send();
    if (sessions.inCopy(token)) return next();
    const answer = await sessions.check(token, req.headers.cookie ?? '');
    if (answer.kind === 'unreachable') return send();
    if (answer.kind === 'none') {
      delete req.headers.cookie;
      return next();
    }
    if (!sessions.copyAgrees(answer)) return send();
    cache.set(cookie, { user: answer.user, token, expiresAt: answer.until });
    next();
  };
}

const PHOTO = /^\/photos\/([^/]+)$/;
const SIZE_COLUMN = { thumb: 'thumb_key', display: 'display_key', original: 'original_key' } as const;

/** Whether a photo file request can be answered ashore: the copy holds the photo and the file is here. */
function photoFilesAshore(mirror: Mirror, uploadsDir: string): (path: string, size: unknown) => boolean {
  const base = resolve(uploadsDir);
  // The server's connection stays the same object across swapped-in copies, so these stay good.
  const statements = new Map<string, Statement>();
  return (path, size) => {
    const match = PHOTO.exec(path);
    const db = mirror.copy;
    if (!match || !db) return true;
    // Anything but a known size is the route's to refuse; an absent size means the original.
    const column = SIZE_COLUMN[(size ?? 'original') as keyof typeof SIZE_COLUMN];
    if (!column) return true;
    let statement = statements.get(column);
    if (!statement) statements.set(column, (statement = db.$client.prepare(`select ${column} from photos where id = ?`).pluck()));
    const key = statement.get(decodeURIComponent(match[1]!)) as string | undefined;
    if (key === undefined) return false;
    const file = resolve(base, key);
    return !file.startsWith(base + sep) || existsSync(file);
  };
}

function relay(ship: URL, req: Parameters<RequestHandler>[0], res: Parameters<RequestHandler>[1]): void {
  const headers: http.OutgoingHttpHeaders = {};
  for (const [name, value] of Object.entries(req.headers)) if (!HOP_BY_HOP.has(name) && value !== undefined) headers[name] = value;
  // The ship checks that a change comes from its own origin; the mirror checked the shore's.
  if (headers.origin) headers.origin = ship.origin;
  delete headers.referer;
  headers['x-forwarded-for'] = [req.get('x-forwarded-for'), req.socket.remoteAddress].filter(Boolean).join(', ');
  const target = new URL(req.originalUrl, ship);
  const upstream = (ship.protocol === 'https:' ? https : http).request(
    target,
    { method: req.method, headers, timeout: 30_000 },
    (answer) => {
      const out: http.OutgoingHttpHeaders = {};
      for (const [name, value] of Object.entries(answer.headers)) if (!HOP_BY_HOP.has(name) && value !== undefined) out[name] = value;
      res.writeHead(answer.statusCode ?? 502, out);
      answer.pipe(res);
    },
  );
  const fail = () => {
    if (res.headersSent) return void res.destroy();
    res
      .status(502)
      .json(
        errorBody('ship_unreachable', 'The ship cannot be reached from the shore copy just now, so nothing was changed. Try again later.'),
      );
  };
  upstream.on('timeout', () => upstream.destroy(new Error('timeout')));
  upstream.on('error', fail);
  req.on('aborted', () => upstream.destroy());
  req.pipe(upstream);
}
