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
 * Sessions better-auth has checked, kept for a few minutes so that a busy dive does not pay for
 * the same check on every request, and so that a crowd of requests whose check ran out does not
 * queue behind better-auth one after another (one check serves every request waiting on the same
 * cookie). Every way a session ends (sign-out, revoke, a password change, a ban, an account
 * removed) forgets it at once through better-auth's session hook, and any other change made
 * through the auth routes forgets them all.
 */
export class SessionCache {
  private readonly entries = new Map<string, Cached>();
  /** Checks under way, by cookie. */
  readonly pending = new Map<string, Promise<Omit<Cached, 'until'> | null>>();

  constructor(private readonly ttlMs = 5 * 60_000) {}

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

  /** Moves on whenever a session is forgotten, so a check that began before cannot bring it back. */
  epoch = 0;

  forgetToken(token: string) {
    this.epoch++;
    for (const [cookie, entry] of this.entries) if (entry.token === token) this.entries.delete(cookie);
  }

  clear() {
    this.epoch++;
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
    const check = async () => {
      const result = await auth.api.getSession({ headers: fromNodeHeaders(req.headers) });
      if (!result || result.user.banned) return null;
      const user: SessionUser = {
        id: result.user.id,
        name: result.user.name,
        email: result.user.email,
        siteRole: result.user.role === 'admin' ? 'admin' : 'user',
      };
      return { user, token: result.session.token, expiresAt: result.session.expiresAt.getTime() };
    };
    let checked: Omit<Cached, 'until'> | null;
    if (cookie) {
      let pending = cache.pending.get(cookie);
      if (!pending) {
        pending = check().finally(() => cache.pending.delete(cookie));
        cache.pending.set(cookie, pending);
      }
      const epoch = cache.epoch;
      checked = await pending;
      // A session that ended while it was being checked is not kept.
      if (checked && cache.epoch === epoch) cache.set(cookie, checked);
    } else {
      checked = await check();
    }
    if (!checked) throw unauthorized();
    req.user = checked.user;
    req.sessionToken = checked.token;
    next();
  };
}

/** The signed-in user of a request that passed `requireSession`. */
export function userOf(req: Request): SessionUser {
  if (!req.user) throw unauthorized();
  return req.user;
}
