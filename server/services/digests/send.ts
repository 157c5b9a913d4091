import { and, desc, eq, inArray, ne } from 'drizzle-orm';

import type { Db, Executor } from '../../../db/client';
import { campaigns, digests, memberships, subscriptions, user } from '../../../db/schema';
import type { DigestLogItem, DigestTrigger } from '../../../lib/schemas';
import { latestMailOf, queueMail, type MailHandler } from '../mail-queue';
import { composeDigest, newComposeCache, type ComposeCache } from './compose';
import { filtersOf } from './subscriptions';
import { unsubscribeToken } from './tokens';

export type DigestDeps = { db: Db; publicUrl: string; secret: string };

export type DigestRun = {
  trigger: DigestTrigger;
  /** Only this dive's entries (after a dive, or a lead's "send now" about one dive). */
  diveId?: string;
  /** Only these subscribers (the daily run takes those whose 07:00 has come). */
  userIds?: readonly string[];
  /** The daily 07:00 this run stands for, recorded so a restart does not send it again. */
  dailySlot?: Date;
  sentBy?: string | null;
  now?: Date;
  cache?: ComposeCache;
};

const subscribedTo: Record<DigestTrigger, (f: string) => boolean> = {
  'after-dive': (f) => f === 'after-each-dive',
  daily: (f) => f === 'daily',
  manual: (f) => f !== 'off',
};

/**
 * Composes the digest of each subscriber of a campaign who wants this kind of digest and is still a
 * member, and in the caller's transaction records each digest (with the window it covers), queues its
 * mail and moves the subscriber's window on. Subscribers with nothing new get no digest. Kick the mail
 * sender once the transaction has committed.
 */
export function queueDigests(
  tx: Executor,
  deps: Omit<DigestDeps, 'db'>,
  campaignId: string,
  run: DigestRun,
): { digestIds: string[]; nothingNew: number } {
  const now = run.now ?? new Date();
  const campaign = tx
    .select({ id: campaigns.id, name: campaigns.name, timeZone: campaigns.timeZone })
    .from(campaigns)
    .where(eq(campaigns.id, campaignId))
    .get();
  if (!campaign) return { digestIds: [], nothingNew: 0 };
  const subscribers = tx
    .select({ sub: subscriptions, name: user.name, email: user.email })
    .from(subscriptions)
    .innerJoin(memberships, and(eq(memberships.campaignId, subscriptions.campaignId), eq(memberships.userId, subscriptions.userId)))
    .innerJoin(user, eq(user.id, subscriptions.userId))
    .where(and(eq(subscriptions.campaignId, campaignId), ne(subscriptions.frequency, 'off')))
    .all()
    .filter((s) => subscribedTo[run.trigger](s.sub.frequency) && (!run.userIds || run.userIds.includes(s.sub.userId)));
  const cache = run.cache ?? newComposeCache();
  const digestIds: string[] = [];
  let nothingNew = 0;
  for (const { sub, name, email } of subscribers) {
    const since = sub.lastDigestAt ?? (run.trigger === 'daily' ? new Date(now.getTime() - 24 * 3600_000) : null);
    let nonce = sub.unsubscribeNonce;
    if (!nonce) {
      nonce = crypto.randomUUID();
      tx.update(subscriptions)
        .set({ unsubscribeNonce: nonce })
        .where(and(eq(subscriptions.campaignId, campaignId), eq(subscriptions.userId, sub.userId)))
        .run();
    }
    const token = unsubscribeToken(deps.secret, { campaignId, userId: sub.userId, nonce });
    const digest = composeDigest(
      tx,
      campaign,
      { userId: sub.userId, name, frequency: sub.frequency, filters: filtersOf(sub.filters) },
      { since, until: now },
      {
        trigger: run.trigger,
        ...(run.diveId ? { diveId: run.diveId } : {}),
        cache,
        links: {
          base: deps.publicUrl,
          unsubscribeApi: `${deps.publicUrl}/api/unsubscribe/${token}`,
          unsubscribePage: `${deps.publicUrl}/unsubscribe/${token}`,
        },
      },
    );
    const where = and(eq(subscriptions.campaignId, campaignId), eq(subscriptions.userId, sub.userId));
    if (run.dailySlot) tx.update(subscriptions).set({ dailyDoneFor: run.dailySlot }).where(where).run();
    if (!digest) {
      nothingNew++;
      continue;
    }
    const row = tx
      .insert(digests)
      .values({
        campaignId,
        userId: sub.userId,
        subject: digest.subject,
        observationCount: digest.observationCount,
        since,
        until: now,
        sentAt: now,
        sentBy: run.sentBy ?? null,
        trigger: run.trigger,
        diveId: run.diveId ?? null,
      })
      .returning({ id: digests.id })
      .get();
    const mailId = queueMail(
      tx,
      {
        kind: 'digest',
        ref: row.id,
        campaignId,
        to: email,
        toName: name,
        subject: digest.subject,
        payload: { text: digest.text, html: digest.html, headers: digest.headers, userId: sub.userId },
      },
      now,
    );
    tx.update(digests).set({ mailId }).where(eq(digests.id, row.id)).run();
    tx.update(subscriptions).set({ lastDigestAt: now }).where(where).run();
    digestIds.push(row.id);
  }
  return { digestIds, nothingNew };
}

/**
 * Sends a queued digest only to someone still a member who still wants it: a member removed, or a
 * subscription turned off, between queueing and sending gets nothing.
 */
export function digestMailHandler(db: Db): MailHandler {
  return async (row, send) => {
    const { userId, text, html, headers } = row.payload as { userId: string; text: string; html: string; headers: Record<string, string> };
    const still = db
      .select({ frequency: subscriptions.frequency })
      .from(subscriptions)
      .innerJoin(memberships, and(eq(memberships.campaignId, subscriptions.campaignId), eq(memberships.userId, subscriptions.userId)))
      .where(and(eq(subscriptions.campaignId, row.campaignId ?? ''), eq(subscriptions.userId, userId)))
      .get();
    if (!still) return { cancel: 'The recipient is no longer a member of the campaign.' };
    if (still.frequency === 'off') return { cancel: 'The recipient turned the digest off before it went out.' };
    await send({ to: row.to, toName: row.toName ?? undefined, subject: row.subject, text, html, headers });
  };
}

/** The campaign's digests (the newest 200, or those named), newest first, each with where its mail stands. */
export function listDigests(db: Executor, campaignId: string, only?: readonly string[]): DigestLogItem[] {
  if (only?.length === 0) return [];
  const rows = db
    .select({ d: digests, name: user.name })
    .from(digests)
    .innerJoin(user, eq(user.id, digests.userId))
    .where(and(eq(digests.campaignId, campaignId), only ? inArray(digests.id, [...only]) : undefined))
    .orderBy(desc(digests.sentAt))
    .limit(only ? only.length : 200)
    .all();
  const mail = latestMailOf(
    db,
    rows.map((r) => r.d.id),
  );
  return rows.map(({ d, name }) => ({
    id: d.id,
    campaignId: d.campaignId,
    userId: d.userId,
    recipientName: name,
    subject: d.subject,
    observationCount: d.observationCount,
    trigger: d.trigger,
    diveId: d.diveId,
    since: d.since ? d.since.toISOString() : null,
    until: d.until ? d.until.toISOString() : null,
    createdAt: d.sentAt.toISOString(),
    mail: mail.get(d.id) ?? null,
  }));
}
