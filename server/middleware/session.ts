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

/** Resolves the better-auth session on every request; 401 in the contract's shape without one. */
export function requireSession(auth: Auth): RequestHandler {
  return async (req, _res, next) => {
    const result = await auth.api.getSession({ headers: fromNodeHeaders(req.headers) });
    if (!result || result.user.banned) throw unauthorized();
    req.user = {
      id: result.user.id,
      name: result.user.name,
      email: result.user.email,
      siteRole: result.user.role === 'admin' ? 'admin' : 'user',
    };
    req.sessionToken = result.session.token;
    next();
  };
}

/** The signed-in user of a request that passed `requireSession`. */
export function userOf(req: Request): SessionUser {
  if (!req.user) throw unauthorized();
  return req.user;
}
