import { createHash, randomBytes } from 'node:crypto';

import { betterAuth } from 'better-auth';
import { drizzleAdapter } from 'better-auth/adapters/drizzle';
import { APIError } from 'better-auth/api';
import { admin, magicLink } from 'better-auth/plugins';

import type { Db } from '../db/client';
import * as schema from '../db/schema';
import type { Env } from './env';
import { oneAtATimePerKey } from './services/one-at-a-time';

/** The header our own server sets from the socket (or the trusted proxy); clients cannot forge it. */
export const CLIENT_IP_HEADER = 'x-bathynote-client-ip';

/** How long an invitation's sign-in link works. */
export const INVITATION_LINK_SECONDS = 72 * 60 * 60;

/**
 * Magic links are sent for invitations only. The invitation service registers the mail to send
 * for an address just before it asks better-auth for a link; a link asked for any other address
 * is never mailed, so nobody who was not invited can get in that way.
 *
 * Each link's token starts with its invitation's id, and the stored key keeps that id in the clear
 * beside the hash of the whole token, so that resending or revoking an invitation can delete its
 * earlier link (`forgetInvitationLinks`) while links of the same address to other campaigns stay.
 */
export class MagicLinkPostbox {
  private readonly expected = new Map<string, { linkKey: string; send: (url: string) => Promise<void> }>();
  /** Sends to one address run one after another, so two invitations never share an entry. */
  private readonly oneAtATime = oneAtATimePerKey();

  async deliver(email: string, url: string): Promise<void> {
    const entry = this.expected.get(email.toLowerCase());
    if (entry) await entry.send(url);
  }

  /** A fresh token for a link to `email`, prefixed with the key its invitation registered. */
  tokenFor(email: string): string {
    const key = this.expected.get(email.toLowerCase())?.linkKey ?? 'none';
    return `${key}.${randomBytes(32).toString('base64url')}`;
  }

  expect<T>(email: string, linkKey: string, send: (url: string) => Promise<void>, run: () => Promise<T>): Promise<T> {
    const key = email.toLowerCase();
    return this.oneAtATime(key, async () => {
      this.expected.set(key, { linkKey, send });
      try {
        return await run();
      } finally {
        this.expected.delete(key);
      }
    });
  }
}

/**
 * What is stored of a link's token: its invitation key and the SHA-256 of the whole token. A token
 * without a key (a link mailed before keys were added) is stored as better-auth's own hash was,
 * so such links keep working until they expire.
 */
export function storedLinkKey(token: string): string {
  const hash = createHash('sha256').update(token).digest('base64url');
  const dot = token.indexOf('.');
  if (dot <= 0) return hash;
  return `${token.slice(0, dot).replace(/[^A-Za-z0-9-]/g, '')}:${hash}`;
}

/** The stored keys of the sign-in links made for an invitation. */
export function invitationLinks(db: Db, invitationId: string): string[] {
  return db.$client
    .prepare("select identifier from verification where identifier like 'magic-link:' || ? || ':%'")
    .pluck()
    .all(invitationId) as string[];
}

/**
 * Deletes sign-in links made for an invitation, so an older mail's link stops working: all of
 * them, or those of `only` (the links that were there before a new one was sent).
 */
export function forgetInvitationLinks(db: Db, invitationId: string, only?: string[]): void {
  if (only) {
    const del = db.$client.prepare('delete from verification where identifier = ?');
    for (const identifier of only) del.run(identifier);
    return;
  }
  db.$client.prepare("delete from verification where identifier like 'magic-link:' || ? || ':%'").run(invitationId);
}

/**
 * Sign-in attempts counted per client address and path, in fixed windows, kept with this server
 * (better-auth's own memory store is shared by every instance in a process).
 */
export function windowCounter() {
  const windows = new Map<string, { start: number; count: number }>();
  let lastPrune = Date.now();
  return {
    consume(key: string, rule: { window: number; max: number }) {
      const now = Date.now();
      const span = rule.window * 1000;
      if (now - lastPrune > 60_000) {
        for (const [k, w] of windows) if (now - w.start > span && now - w.start > 600_000) windows.delete(k);
        lastPrune = now;
      }
      const w = windows.get(key);
      if (!w || now - w.start >= span) {
        windows.set(key, { start: now, count: 1 });
        return Promise.resolve({ allowed: true, retryAfter: null });
      }
      if (w.count < rule.max) {
        w.count++;
        return Promise.resolve({ allowed: true, retryAfter: null });
      }
      return Promise.resolve({ allowed: false, retryAfter: Math.ceil((w.start + span - now) / 1000) });
    },
  };
}

/**
 * `onSessionEnded` hears of every session that ends, whichever way: sign-out, a revoked session,
 * revoking the others, a password change, a ban, an account removed. Its live streams close then.
 */
export function createAuth(env: Env, db: Db, postbox: MagicLinkPostbox, onSessionEnded: (token: string) => void = () => undefined) {
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
      customStorage: windowCounter(),
      window: 60,
      max: 300,
      customRules: {
        '/sign-in/*': { window: 60, max: env.AUTH_RATE_LIMIT },
        '/sign-up/*': { window: 60, max: env.AUTH_RATE_LIMIT },
        '/magic-link/*': { window: 60, max: env.AUTH_RATE_LIMIT },
        '/change-password': { window: 60, max: env.AUTH_RATE_LIMIT },
      },
    },
    advanced: {
      disableOriginCheck: false,
      useSecureCookies: origin.protocol === 'https:',
      ipAddress: { ipAddressHeaders: [CLIENT_IP_HEADER] },
      defaultCookieAttributes: { httpOnly: true, sameSite: 'lax' },
    },
    telemetry: { enabled: false },
    databaseHooks: {
      session: {
        delete: {
          // Removing an account deletes its sessions and its password first: refuse before any of it.
          before: (doomed, ctx) => (ctx?.path === REMOVE_USER ? refuseRemovalOfRecordHolder(db, doomed.userId) : Promise.resolve()),
          after: (ended) => {
            onSessionEnded(ended.token);
            return Promise.resolve();
          },
        },
      },
      account: {
        delete: {
          before: (doomed, ctx) => (ctx?.path === REMOVE_USER ? refuseRemovalOfRecordHolder(db, doomed.userId) : Promise.resolve()),
        },
      },
      user: {
        delete: { before: (doomed) => refuseRemovalOfRecordHolder(db, doomed.id) },
        create: {
          // A link makes an account only while its invitation is open (links are deleted on revoke
          // and resend; this holds even if one were left behind).
          before: (candidate, ctx) => {
            if (ctx?.path !== '/magic-link/verify') return Promise.resolve();
            const open = db.$client
              .prepare("select 1 from invitations where email = lower(?) and status = 'pending' and expires_at > ?")
              .get(candidate.email, Date.now());
            if (!open) throw new APIError('FORBIDDEN', { code: 'INVITATION_CLOSED', message: 'No open invitation for this address.' });
            return Promise.resolve();
          },
        },
      },
    },
    plugins: [
      admin({ defaultRole: 'user', adminRoles: ['admin'] }),
      magicLink({
        expiresIn: INVITATION_LINK_SECONDS,
        // Only the hash of the token is kept; the link itself lives only in the mail.
        generateToken: (email) => postbox.tokenFor(email),
        storeToken: { type: 'custom-hasher', hash: (token) => Promise.resolve(storedLinkKey(token)) },
        sendMagicLink: ({ email, url }) => postbox.deliver(email, url),
      }),
    ],
  });
}

export type Auth = ReturnType<typeof createAuth>;

const restrictingColumns = new WeakMap<Db, { table: string; column: string }[]>();

const REMOVE_USER = '/admin/remove-user';

/**
 * Nothing in the record is ever deleted, so an account that wrote any of it stays; the site
 * administrator disables it instead. An account that wrote nothing may go.
 */
function refuseRemovalOfRecordHolder(db: Db, userId: string): Promise<void> {
  const holder = recordsHeldBy(db, userId);
  if (holder) {
    throw new APIError('CONFLICT', {
      code: 'ACCOUNT_HOLDS_RECORDS',
      message: `This account is named in the record (${holder}), which is never deleted: disable the account instead.`,
    });
  }
  return Promise.resolve();
}

/** The first table whose rows name the user and keep the account from being deleted, if any. */
function recordsHeldBy(db: Db, userId: string): string | undefined {
  let columns = restrictingColumns.get(db);
  if (!columns) {
    const tables = db.$client
      .prepare("select name from sqlite_master where type = 'table' and name not like 'sqlite_%'")
      .pluck()
      .all() as string[];
    columns = tables.flatMap((table) =>
      (db.$client.pragma(`foreign_key_list("${table}")`) as { table: string; from: string; on_delete: string }[])
        .filter((fk) => fk.table === 'user' && fk.on_delete === 'RESTRICT')
        .map((fk) => ({ table, column: fk.from })),
    );
    restrictingColumns.set(db, columns);
  }
  return columns.find(({ table, column }) => db.$client.prepare(`select 1 from "${table}" where "${column}" = ? limit 1`).get(userId))
    ?.table;
}

/** The page may be opened as localhost or 127.0.0.1 at the same port; both are this server. */
export function trustedOriginsFor(origin: URL): string[] {
  const origins = new Set([origin.origin]);
  if (origin.hostname === '127.0.0.1' || origin.hostname === 'localhost') {
    for (const host of ['127.0.0.1', 'localhost']) {
      origins.add(`${origin.protocol}//${host}${origin.port ? `:${origin.port}` : ''}`);
    }
  }
  return [...origins];
}
