import { randomBytes } from 'node:crypto';

import { and, eq } from 'drizzle-orm';

import type { Db, Executor } from '../../../db/client';
import { campaigns, memberships, subscriptions } from '../../../db/schema';
import { digestFiltersSchema, type DigestFilters, type Subscription, type SubscriptionUpdate } from '../../../lib/schemas';
import { notFound } from '../../errors';
import { dailySlot } from './schedule';
import { readUnsubscribeToken } from './tokens';

export const newNonce = () => randomBytes(16).toString('base64url');

/** Stored filters read back through the contract's schema (anything unknown is dropped). */
export function filtersOf(stored: unknown): DigestFilters {
  const parsed = digestFiltersSchema.safeParse(stored);
  return parsed.success ? parsed.data : {};
}

function timeZoneOf(db: Executor, campaignId: string): string {
  return db.select({ tz: campaigns.timeZone }).from(campaigns).where(eq(campaigns.id, campaignId)).get()?.tz ?? 'UTC';
}

/** My digest subscription for a campaign; "off" when I never set one. */
export function getSubscription(db: Executor, campaignId: string, userId: string): Subscription {
  const row = db
    .select()
    .from(subscriptions)
    .where(and(eq(subscriptions.campaignId, campaignId), eq(subscriptions.userId, userId)))
    .get();
  return {
    campaignId,
    frequency: row?.frequency ?? 'off',
    filters: filtersOf(row?.filters),
    lastDigestAt: row?.lastDigestAt ? row.lastDigestAt.toISOString() : null,
    timeZone: timeZoneOf(db, campaignId),
  };
}

/**
 * Sets my subscription. Turning the daily digest on counts today's 07:00 as done, so the first daily
 * digest comes at the next 07:00 rather than at once.
 */
export function putSubscription(db: Db, campaignId: string, userId: string, input: SubscriptionUpdate, now = new Date()): Subscription {
  db.transaction((tx) => {
    const current = tx
      .select()
      .from(subscriptions)
      .where(and(eq(subscriptions.campaignId, campaignId), eq(subscriptions.userId, userId)))
      .get();
    const filters = input.filters ?? filtersOf(current?.filters);
    const becameDaily = input.frequency === 'daily' && current?.frequency !== 'daily';
    const dailyDoneFor = becameDaily ? dailySlot(timeZoneOf(tx, campaignId), now) : (current?.dailyDoneFor ?? null);
    tx.insert(subscriptions)
      .values({ campaignId, userId, frequency: input.frequency, filters, unsubscribeNonce: newNonce(), dailyDoneFor, updatedAt: now })
      .onConflictDoUpdate({
        target: [subscriptions.campaignId, subscriptions.userId],
        set: { frequency: input.frequency, filters, dailyDoneFor, updatedAt: now },
      })
      .run();
  });
  return getSubscription(db, campaignId, userId);
}

/** Guests ashore are subscribed after each dive when they join (they are told so, and can change it). */
export function subscribeGuest(tx: Executor, campaignId: string, userId: string): void {
  tx.insert(subscriptions)
    .values({ campaignId, userId, frequency: 'after-each-dive', unsubscribeNonce: newNonce() })
    .onConflictDoNothing()
    .run();
}

/**
 * One-click unsubscribe (RFC 8058): turns off the one subscription the signed link names, and
 * nothing else. A forged or altered link, or one already used, finds nothing.
 */
export function unsubscribe(db: Db, secret: string, token: string, now = new Date()): { campaignName: string } {
  const claim = readUnsubscribeToken(secret, token);
  if (!claim) throw notFound('This unsubscribe link is not valid.');
  return db.transaction((tx) => {
    const row = tx
      .select({ nonce: subscriptions.unsubscribeNonce, name: campaigns.name })
      .from(subscriptions)
      .innerJoin(campaigns, eq(campaigns.id, subscriptions.campaignId))
      .innerJoin(memberships, and(eq(memberships.campaignId, subscriptions.campaignId), eq(memberships.userId, subscriptions.userId)))
      .where(and(eq(subscriptions.campaignId, claim.campaignId), eq(subscriptions.userId, claim.userId)))
      .get();
    if (!row || row.nonce !== claim.nonce) throw notFound('This unsubscribe link was already used or has been replaced by a newer one.');
    tx.update(subscriptions)
      .set({ frequency: 'off', unsubscribeNonce: newNonce(), updatedAt: now })
      .where(and(eq(subscriptions.campaignId, claim.campaignId), eq(subscriptions.userId, claim.userId)))
      .run();
    return { campaignName: row.name };
  });
}
