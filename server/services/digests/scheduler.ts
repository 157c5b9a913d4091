import { Cron } from 'croner';
import { and, eq, isNull, lt, or } from 'drizzle-orm';

import { campaigns, subscriptions } from '../../../db/schema';
import type { Logger } from '../logger';
import { newComposeCache } from './compose';
import { DAILY_PATTERN, dailySlot } from './schedule';
import { queueDigests, type DigestDeps } from './send';

export type DigestScheduler = {
  /** Sends the daily digests whose 07:00 has come (and any missed while the server was down). */
  tick(now?: Date): number;
  start(): void;
  stop(): void;
};

/**
 * The daily digests: one croner job per display time zone in use fires at 07:00 there, and an
 * hourly job picks up new zones and anything a job missed. Each subscriber's last handled 07:00 is
 * stored, so a daily digest missed while the server was down is sent once when it comes back, and
 * never twice. The clock is injected for tests.
 */
export function createDigestScheduler(
  deps: DigestDeps,
  log: Logger,
  kick: () => void,
  clock: () => Date = () => new Date(),
): DigestScheduler {
  const { db } = deps;
  const jobs = new Map<string, Cron>();
  let hourly: Cron | undefined;

  function tick(now = clock()): number {
    let queued = 0;
    const zones = db.selectDistinct({ id: campaigns.id, timeZone: campaigns.timeZone }).from(campaigns).all();
    for (const c of zones) {
      const slot = dailySlot(c.timeZone, now);
      const due = db
        .select({ userId: subscriptions.userId })
        .from(subscriptions)
        .where(
          and(
            eq(subscriptions.campaignId, c.id),
            eq(subscriptions.frequency, 'daily'),
            or(isNull(subscriptions.dailyDoneFor), lt(subscriptions.dailyDoneFor, slot)),
          ),
        )
        .all()
        .map((s) => s.userId);
      if (due.length === 0) continue;
      try {
        const { digestIds } = db.transaction((tx) =>
          queueDigests(tx, deps, c.id, { trigger: 'daily', userIds: due, dailySlot: slot, now, cache: newComposeCache() }),
        );
        queued += digestIds.length;
      } catch (err) {
        log.error('daily digests could not be composed', { campaignId: c.id, err });
      }
    }
    if (queued > 0) kick();
    return queued;
  }

  function sync() {
    const zones = new Set(
      db
        .selectDistinct({ tz: campaigns.timeZone })
        .from(campaigns)
        .all()
        .map((z) => z.tz),
    );
    for (const [zone, job] of jobs) {
      if (!zones.has(zone)) {
        job.stop();
        jobs.delete(zone);
      }
    }
    for (const zone of zones) {
      if (!jobs.has(zone)) jobs.set(zone, new Cron(DAILY_PATTERN, { timezone: zone, unref: true }, () => void tick()));
    }
  }

  return {
    tick,
    start() {
      sync();
      hourly = new Cron('17 * * * *', { unref: true }, () => {
        sync();
        tick();
      });
      tick();
    },
    stop() {
      hourly?.stop();
      for (const job of jobs.values()) job.stop();
      jobs.clear();
    },
  };
}
