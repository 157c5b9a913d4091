import http from 'node:http';
import https from 'node:https';

import type { Db } from '../../db/client';
import { meSchema } from '../../lib/schemas/core';
import type { SessionUser } from '../middleware/session';

/** How long the ship's answer about a session the copy does not hold yet is trusted. */
export const SHIP_CHECK_TTL_MS = 5 * 60_000;
/** How long an ended session is refused on the shore even if a copy still holds it. */
const REVOKED_KEEP_MS = 24 * 60 * 60_000;

/** What the ship said about a session: who it is and where they are a member, or that it is no session. */
export type ShipAnswer =
  { kind: 'session'; user: SessionUser; memberships: string; until: number } | { kind: 'none'; until: number } | { kind: 'unreachable' };

/** Memberships as one comparable string: `campaign:role` sorted. */
export const membershipKey = (rows: { campaignId: string; role: string }[]) =>
  rows
    .map((m) => `${m.campaignId}:${m.role}`)
    .sort()
    .join(',');

/**
 * Sessions the restored copy does not hold yet (signed in on the ship a moment ago), checked once
 * against the ship (`GET /api/me` with the person's cookie) and remembered for a bounded time with
 * who the ship says they are and their memberships, so that their reads are served from the copy
 * instead of crossing the link. Also the sessions the ship has ended, refused here at once.
 */
export class ShipSessions {
  private readonly checked = new Map<string, Exclude<ShipAnswer, { kind: 'unreachable' }>>();
  private readonly pending = new Map<string, Promise<ShipAnswer>>();
  /** Ended sessions, by token, with when the ship said so. */
  private readonly ended = new Map<string, number>();
  private localMemberships: ((userId: string) => { campaignId: string; role: string }[]) | null = null;
  private localUser: ((userId: string) => unknown) | null = null;
  private localSession: ((token: string, now: number) => unknown) | null = null;
  /** Bumped whenever entries are dropped, so a check that began before cannot bring one back. */
  private epoch = 0;

  constructor(
    private readonly ship: URL,
    private readonly ttlMs = SHIP_CHECK_TTL_MS,
  ) {}

  /** The copy's prepared statements (the same connection the server reads from). */
  attach(db: Db): void {
    const members = db.$client.prepare('select campaign_id as campaignId, role from memberships where user_id = ?');
    this.localMemberships = (userId) => members.all(userId) as { campaignId: string; role: string }[];
    const user = db.$client.prepare('select 1 from user where id = ?').pluck();
    this.localUser = (userId) => user.get(userId);
    const session = db.$client.prepare('select 1 from session where token = ? and expires_at > ?').pluck();
    this.localSession = (token, now) => session.get(token, now);
  }

  /** Whether the copy in place holds this session (and it has not run out). */
  inCopy(token: string): boolean {
    return this.localSession?.(token, Date.now()) !== undefined;
  }

  isEnded(token: string): boolean {
    return this.ended.has(token);
  }

  /** The ship ended this session: forget its check and refuse it until copies no longer hold it. */
  end(token: string): void {
    this.epoch++;
    this.checked.delete(token);
    if (this.ended.size > 10_000) this.ended.clear();
    this.ended.set(token, Date.now());
  }

  /** Forgets every check (e.g. the ship's stream was down: an ended session may have gone unheard). */
  forgetChecks(): void {
    this.epoch++;
    this.checked.clear();
  }

  /** After a copy restored from a replica read at `copyAsOf`: ended sessions it no longer holds need no mark. */
  afterCopy(copyAsOf: number): void {
    const now = Date.now();
    for (const [token, at] of this.ended)
      if ((at < copyAsOf && !this.inCopy(token)) || now - at > REVOKED_KEEP_MS) this.ended.delete(token);
  }

  /** A session the ship vouched for within the bounded time (for a live stream's periodic check). */
  vouched(token: string): boolean {
    const hit = this.checked.get(token);
    return !!hit && hit.kind === 'session' && hit.until > Date.now();
  }

  /**
   * Whether the copy would grant exactly what the ship granted when it answered: the person is in
   * the copy with the same memberships. When not (a membership given or taken on the ship that the
   * copy does not hold yet), the session's reads go to the ship until a copy agrees.
   */
  copyAgrees(answer: Extract<ShipAnswer, { kind: 'session' }>): boolean {
    if (!this.localUser || !this.localMemberships) return false;
    if (this.localUser(answer.user.id) === undefined) return false;
    return membershipKey(this.localMemberships(answer.user.id)) === answer.memberships;
  }

  /** The ship's answer for a session, from the bounded cache or by asking the ship once. */
  async check(token: string, cookieHeader: string): Promise<ShipAnswer> {
    const hit = this.checked.get(token);
    if (hit && hit.until > Date.now()) return hit;
    if (hit) this.checked.delete(token);
    let pending = this.pending.get(token);
    if (!pending) {
      pending = this.ask(cookieHeader).finally(() => this.pending.delete(token));
      this.pending.set(token, pending);
    }
    const epoch = this.epoch;
    const answer = await pending;
    if (answer.kind !== 'unreachable' && epoch === this.epoch && !this.ended.has(token)) {
      if (this.checked.size > 10_000) this.checked.clear();
      this.checked.set(token, answer);
    }
    return answer;
  }

  private ask(cookieHeader: string): Promise<ShipAnswer> {
    return new Promise((resolve) => {
      const request = (this.ship.protocol === 'https:' ? https : http).request(
        new URL('/api/me', this.ship),
        { method: 'GET', headers: { cookie: cookieHeader, accept: 'application/json', 'accept-encoding': 'identity' }, timeout: 30_000 },
        (res) => {
          const chunks: Buffer[] = [];
          res.on('data', (c: Buffer) => chunks.push(c));
          res.on('error', () => resolve({ kind: 'unreachable' }));
          res.on('end', () => {
            const until = Date.now() + this.ttlMs;
            if (res.statusCode === 401) return resolve({ kind: 'none', until });
            if (res.statusCode !== 200) return resolve({ kind: 'unreachable' });
            try {
              // The ship's answer crosses the link: read through its schema, never trusted as it comes.
              const me = meSchema.parse(JSON.parse(Buffer.concat(chunks).toString('utf8')));
              resolve({
                kind: 'session',
                user: { id: me.user.id, name: me.user.name, email: me.user.email, siteRole: me.siteRole === 'admin' ? 'admin' : 'user' },
                memberships: membershipKey(me.memberships),
                until,
              });
            } catch {
              resolve({ kind: 'unreachable' });
            }
          });
        },
      );
      request.on('timeout', () => request.destroy(new Error('timeout')));
      request.on('error', () => resolve({ kind: 'unreachable' }));
      request.end();
    });
  }
}
