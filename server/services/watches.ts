/**
 * A campaign's watch plan: read, replaced as a whole by a lead, and asked who stood which watch in a
 * span (the daily report's "who was on watch"). The times themselves are worked out in lib/watches.ts.
 */
import { and, asc, eq, inArray } from 'drizzle-orm';

import type { Db, Executor } from '../../db/client';
import { campaigns, handovers, memberships, user, watchMembers, watchPlans, watches } from '../../db/schema';
import type { WatchPerson, WatchPlan, WatchPlanUpdate, WatchTurnOut } from '../../lib/schemas';
import { planIssues, turnsDuring, watchAt, watchChanges, type WatchSpec, type WatchTurn } from '../../lib/watches';
import { ApiError, notFound } from '../errors';

export type PlanWatch = WatchSpec & { id: string; members: WatchPerson[] };
export type LoadedPlan = { campaignId: string; timeZone: string; mailHandovers: boolean; updatedAt: Date | null; watches: PlanWatch[] };

/** The plan as stored, with who stands each watch. A campaign with no plan has no watches. */
export function loadPlan(db: Executor, campaignId: string): LoadedPlan {
  const campaign = db.select({ timeZone: campaigns.timeZone }).from(campaigns).where(eq(campaigns.id, campaignId)).get();
  if (!campaign) throw notFound();
  const plan = db.select().from(watchPlans).where(eq(watchPlans.campaignId, campaignId)).get();
  const rows = db.select().from(watches).where(eq(watches.campaignId, campaignId)).orderBy(asc(watches.position)).all();
  const standers = rows.length
    ? db
        .select({ watchId: watchMembers.watchId, id: user.id, name: user.name })
        .from(watchMembers)
        .innerJoin(user, eq(user.id, watchMembers.userId))
        .where(
          inArray(
            watchMembers.watchId,
            rows.map((r) => r.id),
          ),
        )
        .orderBy(asc(user.name))
        .all()
    : [];
  return {
    campaignId,
    timeZone: campaign.timeZone,
    mailHandovers: plan?.mailHandovers ?? false,
    updatedAt: plan?.updatedAt ?? null,
    watches: rows.map((r) => {
      const members = standers.filter((s) => s.watchId === r.id).map(({ id, name }) => ({ id, name }));
      return { id: r.id, name: r.name, start: r.start, end: r.end, members, memberIds: members.map((m) => m.id) };
    }),
  };
}

export const turnOut = (turn: WatchTurn<PlanWatch>): WatchTurnOut => ({
  name: turn.watch.name,
  start: turn.start.toISOString(),
  end: turn.end.toISOString(),
  members: turn.watch.members,
});

export function toWatchPlan(plan: LoadedPlan, now: Date): WatchPlan {
  const on = watchAt(plan.watches, plan.timeZone, now);
  const next = watchChanges(plan.watches, plan.timeZone, now, new Date(now.getTime() + 86_400_000))[0];
  return {
    campaignId: plan.campaignId,
    timeZone: plan.timeZone,
    mailHandovers: plan.mailHandovers,
    watches: plan.watches.map(({ id, name, start, end, members }) => ({ id, name, start, end, members })),
    onWatch: on ? turnOut(on) : null,
    nextChangeAt: next ? next.at.toISOString() : null,
    updatedAt: plan.updatedAt?.toISOString() ?? null,
  };
}

/**
 * Replaces the plan. Overlapping watches, bad times and people who are not members of the campaign
 * are refused with a 400 naming each field; watches are replaced whole, since a plan is read and
 * judged as one.
 */
export function setWatchPlan(db: Db, campaignId: string, userId: string, body: WatchPlanUpdate, now = new Date()): LoadedPlan {
  const issues = planIssues(body.watches);
  const memberIds = new Set(
    db
      .select({ id: memberships.userId })
      .from(memberships)
      .where(eq(memberships.campaignId, campaignId))
      .all()
      .map((m) => m.id),
  );
  body.watches.forEach((w, i) => {
    w.memberIds.forEach((id, j) => {
      if (!memberIds.has(id)) issues.push({ path: `watches.${i}.memberIds.${j}`, message: 'Not a member of this campaign' });
    });
  });
  if (issues.length > 0) throw new ApiError(400, 'validation_failed', 'The watch plan is not valid.', issues);
  return db.transaction((tx) => {
    const mailHandovers =
      body.mailHandovers ?? tx.select().from(watchPlans).where(eq(watchPlans.campaignId, campaignId)).get()?.mailHandovers ?? false;
    tx.insert(watchPlans)
      .values({ campaignId, mailHandovers, updatedBy: userId, updatedAt: now })
      .onConflictDoUpdate({ target: watchPlans.campaignId, set: { mailHandovers, updatedBy: userId, updatedAt: now } })
      .run();
    tx.delete(watches).where(eq(watches.campaignId, campaignId)).run();
    body.watches.forEach((w, position) => {
      const id = tx
        .insert(watches)
        .values({ campaignId, name: w.name, start: w.start, end: w.end, position })
        .returning({ id: watches.id })
        .get().id;
      const people = [...new Set(w.memberIds)];
      if (people.length)
        tx.insert(watchMembers)
          .values(people.map((userId) => ({ watchId: id, userId })))
          .run();
    });
    return loadPlan(tx, campaignId);
  });
}

export type WatchStanding = { watch: string; start: Date; end: Date; members: WatchPerson[] };

/**
 * Who stood which watch between `from` and `to`: every turn that overlaps the span, in time order.
 * Where a handover note was written at the start of a turn, its record of the incoming watch is
 * used, so a later change of the plan does not rewrite who stood a past watch; otherwise the
 * current plan answers.
 */
export function watchStandersDuring(db: Executor, campaignId: string, from: Date, to: Date): WatchStanding[] {
  const plan = loadPlan(db, campaignId);
  const turns = turnsDuring(plan.watches, plan.timeZone, from, to);
  if (turns.length === 0) return [];
  const notes = db
    .select({ changeAt: handovers.changeAt, incoming: handovers.incoming })
    .from(handovers)
    .where(
      and(
        eq(handovers.campaignId, campaignId),
        inArray(
          handovers.changeAt,
          turns.map((t) => t.start),
        ),
      ),
    )
    .all();
  return turns.map((turn) => {
    const kept = notes.find((n) => n.changeAt.getTime() === turn.start.getTime())?.incoming as WatchTurnOut | null | undefined;
    const members = kept && kept.name === turn.watch.name ? kept.members : turn.watch.members;
    return { watch: turn.watch.name, start: turn.start, end: turn.end, members };
  });
}
