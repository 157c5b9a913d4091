import { betterAuth } from 'better-auth';
import { drizzleAdapter } from 'better-auth/adapters/drizzle';
import { admin } from 'better-auth/plugins';

import type { Db } from '../db/client';
import * as schema from '../db/schema';
import type { Env } from './env';

/** The header our own server sets from the socket (or the trusted proxy); clients cannot forge it. */
export const CLIENT_IP_HEADER = 'x-bathynote-client-ip';

export function createAuth(env: Env, db: Db) {
  const origin = new URL(env.PUBLIC_URL);
  return betterAuth({
    appName: 'Bathynote',
    baseURL: env.PUBLIC_URL,
    basePath: '/api/auth',
    secret: env.AUTH_SECRET,
    trustedOrigins: trustedOriginsFor(origin),
    database: drizzleAdapter(db, {
      provider: 'sqlite',
      schema: {
        user: schema.user,
        session: schema.session,
        account: schema.account,
        verification: schema.verification,
      },
    }),
    emailAndPassword: {
      enabled: true,
      // People join a campaign by invitation only; the demo seed and invitations create accounts.
      disableSignUp: true,
      minPasswordLength: 8,
      maxPasswordLength: 128,
    },
    session: {
      expiresIn: 60 * 60 * 24 * 14,
      updateAge: 60 * 60 * 24,
    },
    rateLimit: {
      enabled: true,
      window: 60,
      max: 300,
      customRules: {
        '/sign-in/*': { window: 60, max: env.AUTH_RATE_LIMIT },
        '/sign-up/*': { window: 60, max: env.AUTH_RATE_LIMIT },
        '/magic-link/*': { window: 60, max: env.AUTH_RATE_LIMIT },
      },
    },
    advanced: {
      disableOriginCheck: false,
      useSecureCookies: origin.protocol === 'https:',
      ipAddress: { ipAddressHeaders: [CLIENT_IP_HEADER] },
      defaultCookieAttributes: { httpOnly: true, sameSite: 'lax' },
    },
    telemetry: { enabled: false },
    plugins: [admin({ defaultRole: 'user', adminRoles: ['admin'] })],
  });
}

export type Auth = ReturnType<typeof createAuth>;

/** The page may be opened as localhost or 127.0.0.1 at the same port; both are this server. */
function trustedOriginsFor(origin: URL): string[] {
  const origins = new Set([origin.origin]);
  if (origin.hostname === '127.0.0.1' || origin.hostname === 'localhost') {
    for (const host of ['127.0.0.1', 'localhost']) {
      origins.add(`${origin.protocol}//${host}${origin.port ? `:${origin.port}` : ''}`);
    }
  }
  return [...origins];
}
