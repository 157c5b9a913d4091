import { fromNodeHeaders } from 'better-auth/node';
import type { Request, RequestHandler } from 'express';

import type { Auth } from '../auth';
import { unauthorized } from '../errors';

export type SessionUser = { id: string; name: string; email: string; siteRole: 'admin' | 'user' };

declare module 'express-serve-static-core' {
  interface Request {
    user?: SessionUser;
    /** The session's token, so that a live stream can close when this session ends. */
    sessionToken?: string;
  }
}

const SESSION_COOKIES = ['better-auth.session_token', '__Secure-better-auth.session_token'];

/** The signed session cookie of a request (`token.signature`), if it has one. */
export function sessionCookieOf(cookieHeader: string | undefined): string | undefined {
  for (const part of (cookieHeader ?? '').split(';')) {
    const [name, ...rest] = part.trim().split('=');
    if (name && SESSION_COOKIES.includes(name)) return decodeURIComponent(rest.join('='));
  }
  return undefined;
}

type Cached = { user: SessionUser; token: string; expiresAt: number; until: number };

/**
 * Sessions better-auth has checked, kept for a few seconds so that a busy dive does not pay for
 * the same check on every request. Signing out forgets the session at once, and any other change
 * made through the auth routes (a ban, a password change, revoked sessions) forgets them all.
 */
export class SessionCache {
  private readonly entries = new Map<string, Cached>();

  constructor(private readonly ttlMs = 5000) {}

  get(cookie: string): Cached | undefined {
    const hit = this.entries.get(cookie);
    const now = Date.now();
    if (hit && hit.until > now && hit.expiresAt > now) return hit;
    if (hit) this.entries.delete(cookie);
    return undefined;
  }

  set(cookie: string, entry: Omit<Cached, 'until'>) {
    if (this.entries.size > 10_000) this.entries.clear();
    this.entries.set(cookie, { ...entry, until: Date.now() + this.ttlMs });
  }

  forgetToken(token: string) {
    for (const [cookie, entry] of this.entries) if (entry.token === token) this.entries.delete(cookie);
  }

  clear() {
    this.entries.clear();
  }
}

const caches = new WeakMap<Auth, SessionCache>();

/** The session cache that belongs to one auth instance (one server). */
export function sessionCacheFor(auth: Auth): SessionCache {
  let cache = caches.get(auth);
  if (!cache) {
    cache = new SessionCache();
    caches.set(auth, cache);
  }
  return cache;
}

/** Resolves the better-auth session on every request; 401 in the contract's shape without one. */
export function requireSession(auth: Auth): RequestHandler {
  const cache = sessionCacheFor(auth);
  return async (req, _res, next) => {
    const cookie = sessionCookieOf(req.headers.cookie);
    const hit = cookie ? cache.get(cookie) : undefined;
    if (hit) {
      req.user = hit.user;
      req.sessionToken = hit.token;
      return next();
    }
    const result = await auth.api.getSession({ headers: fromNodeHeaders(req.headers) });
    if (!result || result.user.banned) throw unauthorized();
    req.user = {
      id: result.user.id,
      name: result.user.name,
      email: result.user.email,
      siteRole: result.user.role === 'admin' ? 'admin' : 'user',
    };
    req.sessionToken = result.session.token;
    if (cookie) cache.set(cookie, { user: req.user, token: result.session.token, expiresAt: result.session.expiresAt.getTime() });
    next();
  };
}

/** The signed-in user of a request that passed `requireSession`. */
export function userOf(req: Request): SessionUser {
  if (!req.user) throw unauthorized();
  return req.user;
}
