import type { Request as ExpressRequest, RequestHandler, Response as ExpressResponse } from 'express';
import { z } from 'zod';

import type { Auth } from '../auth';
import { ApiError, errorBody, notFound } from '../errors';
import { zodIssues } from './errors';
import { sessionCacheFor, sessionCookieOf } from './session';

const MAX_AUTH_BODY = 64 * 1024;

/** Sign-in bodies are checked before they reach better-auth, so bad input gets field issues. */
const signInSchema = z.object({
  email: z.email('Enter an e-mail address').max(254),
  password: z.string().min(8, 'Passwords have 8 to 128 characters').max(128, 'Passwords have 8 to 128 characters'),
  rememberMe: z.boolean().optional(),
  callbackURL: z.string().max(2048).optional(),
});

/**
 * Paths of better-auth's that stay closed to the outside: sign-in links are made by the server for
 * invitations only, never on request, and accounts are made by invitation or by the administrator.
 */
const closedPaths = new Set(['/api/auth/sign-in/magic-link', '/api/auth/sign-up/email']);

const preChecks: Record<string, z.ZodType> = {
  '/api/auth/sign-in/email': signInSchema,
};

/**
 * Runs better-auth's fetch handler behind Express, with a body limit of our own, and rewrites
 * its error bodies (`{code, message}`) into the contract's `{error: {code, message}}` shape.
 * A sign-in link it refuses is sent to the invitation problem page with the reason
 * `refusedLinkReason` finds (used, revoked, expired, replaced) instead of its generic code.
 */
export function authHandler(
  auth: Auth,
  publicUrl: string,
  onSignedOut: (sessionToken: string) => void,
  refusedLinkReason: (token: string) => string | undefined = () => undefined,
): RequestHandler {
  return async (req, res) => {
    const body = req.method === 'GET' || req.method === 'HEAD' ? undefined : await readBody(req);
    const pathname = req.originalUrl.split('?')[0] ?? '';
    if (closedPaths.has(pathname)) {
      throw notFound('People join a campaign by the invitation their lead sends.');
    }
    const check = preChecks[pathname];
    if (check && req.method === 'POST') {
      const parsed = check.safeParse(body ? safeJson(body.toString('utf8')) : undefined);
      if (!parsed.success) {
        throw new ApiError(400, 'validation_failed', 'Some fields are not valid.', zodIssues(parsed.error));
      }
    }
    const headers = new Headers();
    for (const [k, v] of Object.entries(req.headers)) {
      if (Array.isArray(v)) for (const item of v) headers.append(k, item);
      else if (v !== undefined) headers.set(k, v);
    }
    const url = new URL(req.originalUrl, publicUrl);
    const response = await auth.handler(
      new Request(url, { method: req.method, headers, body: body && body.length > 0 ? new Uint8Array(body) : undefined }),
    );
    if (pathname === '/api/auth/magic-link/verify' && response.status >= 300 && response.status < 400) {
      const refused = new URL(response.headers.get('location') ?? '/', publicUrl).searchParams.has('error');
      const token = new URL(req.originalUrl, publicUrl).searchParams.get('token');
      const reason = refused && token ? refusedLinkReason(token) : undefined;
      if (reason) {
        res.redirect(302, `${publicUrl}/invitation-problem?reason=${encodeURIComponent(reason)}`);
        return;
      }
    }
    if (pathname === '/api/auth/sign-out' && response.ok) {
      const token = sessionCookieOf(req.headers.cookie)?.split('.')[0];
      if (token) {
        sessionCacheFor(auth).forgetToken(token);
        onSignedOut(token);
      }
    } else if (req.method !== 'GET' && pathname !== '/api/auth/sign-in/email' && response.ok) {
      // Bans, password changes and revoked sessions all come through here: check every session again.
      sessionCacheFor(auth).clear();
    }
    await send(res, response);
  };
}

async function readBody(req: ExpressRequest): Promise<Buffer> {
  const chunks: Buffer[] = [];
  let size = 0;
  for await (const chunk of req) {
    size += (chunk as Buffer).length;
    if (size > MAX_AUTH_BODY) throw new ApiError(413, 'too_large', 'The request body is too large.');
    chunks.push(chunk as Buffer);
  }
  return Buffer.concat(chunks);
}

async function send(res: ExpressResponse, response: Response) {
  res.status(response.status);
  response.headers.forEach((value, key) => {
    if (key !== 'set-cookie' && key !== 'content-length') res.setHeader(key, value);
  });
  const cookies = response.headers.getSetCookie();
  if (cookies.length > 0) res.setHeader('set-cookie', cookies);
  const text = await response.text();
  if (response.status === 429) {
    // better-auth says when to come back in a header of its own; clients and proxies read the standard one.
    const wait = Number(response.headers.get('x-retry-after'));
    res.setHeader('retry-after', String(Number.isFinite(wait) && wait > 0 ? Math.ceil(wait) : 60));
    res.json(errorBody('rate_limited', 'Too many sign-in attempts; wait a moment and try again.'));
    return;
  }
  if (response.status >= 400 && (response.headers.get('content-type') ?? '').includes('json')) {
    const json = safeJson(text) as { code?: string; message?: string; error?: unknown } | undefined;
    if (json && typeof json === 'object' && !('error' in json && typeof json.error === 'object')) {
      res.json({
        error: {
          code: (json.code ?? 'auth_error').toLowerCase(),
          message: json.message ?? 'Sign-in failed.',
        },
      });
      return;
    }
  }
  if (response.status >= 400 && !(response.headers.get('content-type') ?? '').includes('json')) {
    // better-auth answers an unknown path with an empty page; the API answers in its own shape.
    res.removeHeader('content-type');
    res.json({
      error:
        response.status === 404
          ? { code: 'not_found', message: 'There is no such API route.' }
          : { code: 'auth_error', message: text.trim() === '' ? 'Sign-in failed.' : text.slice(0, 200) },
    });
    return;
  }
  res.send(text);
}

function safeJson(text: string): unknown {
  try {
    return JSON.parse(text);
  } catch {
    return undefined;
  }
}
