import { Cron } from 'croner';

/** The daily digest goes at 07:00 in the campaign's display time zone. */
export const DAILY_PATTERN = '0 7 * * *';

/**
 * The latest 07:00 in `zone` at or before `now`, as an instant. Croner works in the zone, so the
 * hour stays 07:00 local across a daylight-saving change (06:00 UTC in Lisbon's summer, 07:00 in winter).
 */
export function dailySlot(zone: string, now: Date): Date {
  const cron = new Cron(DAILY_PATTERN, { timezone: zone, paused: true });
  // previousRuns leaves out the reference itself: a slot exactly at `now` counts as reached.
  return cron.previousRuns(1, new Date(now.getTime() + 1))[0] ?? now;
}
