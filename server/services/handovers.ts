/**
 * Handover notes: at each change of watch the product writes what the incoming watch needs to know
 * (entries logged during the outgoing watch by kind, what is still open, the dive's phase and depth),
 * one note per campaign per change, and mails it to the incoming watch when the plan says so.
 *
 * What counts as open:
 * - an identification whose verification status is not "verified" (unverified or disputed);
 * - a find whose state is still "in-situ";
 * - a sample with no step in its custody trail;
 * - an operations entry tagged "fault" (the record has no field of its own for an equipment fault;
 *   the tag, matched without regard to case, is how the party marks one).
 */
import { Cron } from 'croner';
import { and, asc, count, desc, eq, gt, inArray, isNull, lte, ne, notExists, or, sql } from 'drizzle-orm';

import type { Db, Executor } from '../../db/client';
import {
  campaigns,
  custodyEvents,
  dives,
  finds,
  handovers,
  identifications,
  observations,
  observationTags,
  samples,
  tags,
  telemetrySamples,
  user,
  watches,
} from '../../db/schema';
import { observationKinds, type DivePhase, type Handover, type HandoverContent, type WatchTurnOut } from '../../lib/schemas';
import { watchChanges, type WatchChange } from '../../lib/watches';
import { forbidden, notFound } from '../errors';
import type { LiveHub, StageEvent } from './live';
import type { Logger } from './logger';
import { queueMail } from './mail-queue';
import { renderMail } from './mail-templates';
import { loadPlan, turnOut, type PlanWatch } from './watches';

/** The tag that marks an operations entry as an equipment fault. */
export const FAULT_TAG = 'fault';
/** At most this many open items and latest entries are kept in one note. */
const MAX_ITEMS = 100;
const MAX_LATEST = 20;
/** A telemetry sample older than this at the change is not "the depth now". */
const DEPTH_FRESH_MS = 10 * 60_000;
/**
 * After the server was down, the changes of watch it missed within this span before now get their
 * notes; older ones get none, so a long stop does not fill the record with notes nobody was there
 * to read.
 */
export const MISSED_CHANGES_WINDOW_MS = 24 * 3_600_000;

const live = (campaignId: string) => and(eq(observations.campaignId, campaignId), eq(observations.retired, false));

/** The open items of a campaign, by the rules above, oldest first. */
export function openItems(db: Executor, campaignId: string): HandoverContent['openItems'] {
  const items: HandoverContent['openItems'] = [];
  for (const r of db
    .select({
      id: observations.id,
      title: observations.title,
      name: identifications.scientificName,
      status: identifications.verificationStatus,
    })
    .from(identifications)
    .innerJoin(observations, eq(observations.id, identifications.observationId))
    .where(and(live(campaignId), ne(identifications.verificationStatus, 'verified')))
    .orderBy(asc(observations.observedAt))
    .all()) {
    items.push({ kind: 'identification-unverified', observationId: r.id, title: r.title, detail: `${r.name} (${r.status})` });
  }
  for (const r of db
    .select({ id: observations.id, title: observations.title, number: finds.findNumber })
    .from(finds)
    .innerJoin(observations, eq(observations.id, finds.observationId))
    .where(and(live(campaignId), eq(finds.state, 'in-situ')))
    .orderBy(asc(observations.observedAt))
    .all()) {
    items.push({ kind: 'find-in-situ', observationId: r.id, title: r.title, detail: `Find ${r.number} is still in situ` });
  }
  for (const r of db
    .select({ id: observations.id, title: observations.title, number: samples.sampleNumber })
    .from(samples)
    .innerJoin(observations, eq(observations.id, samples.observationId))
    .where(
      and(
        live(campaignId),
        notExists(
          db
            .select({ one: sql`1` })
            .from(custodyEvents)
            .where(eq(custodyEvents.observationId, samples.observationId)),
        ),
      ),
    )
    .orderBy(asc(observations.observedAt))
    .all()) {
    items.push({ kind: 'sample-without-custody', observationId: r.id, title: r.title, detail: `Sample ${r.number} has no custody step` });
  }
  for (const r of db
    .select({ id: observations.id, title: observations.title })
    .from(observations)
    .innerJoin(observationTags, eq(observationTags.observationId, observations.id))
    .innerJoin(tags, eq(tags.id, observationTags.tagId))
    .where(and(live(campaignId), eq(observations.kind, 'operations'), sql`lower(${tags.name}) = ${FAULT_TAG}`))
    .orderBy(asc(observations.observedAt))
    .all()) {
    items.push({ kind: 'operations-fault', observationId: r.id, title: r.title, detail: 'Operations entry marked as a fault' });
  }
  return items.slice(0, MAX_ITEMS);
}

/** The dive under way at an instant: launched and not yet on deck. */
function diveUnderWay(db: Executor, campaignId: string, at: Date) {
  return db
    .select()
    .from(dives)
    .where(and(eq(dives.campaignId, campaignId), lte(dives.launchAt, at), or(isNull(dives.onDeckAt), gt(dives.onDeckAt, at))))
    .orderBy(desc(dives.launchAt))
    .limit(1)
    .get();
}

function phaseAt(d: typeof dives.$inferSelect, at: Date): DivePhase | null {
  const steps: [DivePhase, Date | null][] = [
    ['on-deck', d.onDeckAt],
    ['off-bottom', d.offBottomAt],
    ['on-bottom', d.onBottomAt],
    ['launch', d.launchAt],
  ];
  return steps.find(([, t]) => t && t.getTime() <= at.getTime())?.[0] ?? null;
}

/** What the note says: entries of the outgoing watch (its turn, up to the change), open items, the dive then. */
export function composeHandover(
  db: Executor,
  campaignId: string,
  change: WatchChange<PlanWatch>,
): { diveId: string | null; content: HandoverContent } {
  const at = change.at;
  const from = change.outgoing?.start ?? at;
  const during = and(
    live(campaignId),
    sql`${observations.observedAt} >= ${from.getTime()}`,
    sql`${observations.observedAt} < ${at.getTime()}`,
  );
  const byKind = Object.fromEntries(observationKinds.map((k) => [k, 0])) as HandoverContent['entries']['byKind'];
  let total = 0;
  for (const r of db.select({ kind: observations.kind, n: count() }).from(observations).where(during).groupBy(observations.kind).all()) {
    byKind[r.kind] = r.n;
    total += r.n;
  }
  const latest = db
    .select({ id: observations.id, kind: observations.kind, title: observations.title, observedAt: observations.observedAt })
    .from(observations)
    .where(during)
    .orderBy(desc(observations.observedAt))
    .limit(MAX_LATEST)
    .all()
    .map((r) => ({ ...r, observedAt: r.observedAt.toISOString() }));
  const d = diveUnderWay(db, campaignId, at);
  let dive: HandoverContent['dive'] = null;
  if (d) {
    const sample = db
      .select({ t: telemetrySamples.t, depth: telemetrySamples.depth })
      .from(telemetrySamples)
      .where(
        and(
          eq(telemetrySamples.diveId, d.id),
          lte(telemetrySamples.t, at.getTime()),
          gt(telemetrySamples.t, at.getTime() - DEPTH_FRESH_MS),
          sql`${telemetrySamples.depth} is not null`,
        ),
      )
      .orderBy(desc(telemetrySamples.t))
      .limit(1)
      .get();
    dive = {
      id: d.id,
      number: d.number,
      phase: phaseAt(d, at),
      depth: sample?.depth ?? null,
      depthAt: sample ? new Date(sample.t).toISOString() : null,
    };
  }
  return { diveId: d?.id ?? null, content: { entries: { total, byKind, latest }, openItems: openItems(db, campaignId), dive } };
}

type Row = typeof handovers.$inferSelect;

function toHandovers(db: Executor, rows: Row[]): Handover[] {
  const ackIds = [...new Set(rows.map((r) => r.acknowledgedBy).filter((x): x is string => !!x))];
  const names = new Map(
    ackIds.length
      ? db
          .select({ id: user.id, name: user.name })
          .from(user)
          .where(inArray(user.id, ackIds))
          .all()
          .map((u) => [u.id, u.name])
      : [],
  );
  return rows.map((r) => ({
    id: r.id,
    campaignId: r.campaignId,
    diveId: r.diveId,
    changeAt: r.changeAt.toISOString(),
    outgoing: (r.outgoing as WatchTurnOut | null) ?? null,
    incoming: (r.incoming as WatchTurnOut | null) ?? null,
    content: r.content as HandoverContent,
    acknowledgedBy: r.acknowledgedBy ? { id: r.acknowledgedBy, name: names.get(r.acknowledgedBy) ?? '' } : null,
    acknowledgedAt: r.acknowledgedAt?.toISOString() ?? null,
  }));
}

/** A campaign's handover notes, newest first; with `diveId`, those written while that dive was under way. */
export function listHandovers(db: Executor, campaignId: string, query: { diveId?: string; limit: number }): Handover[] {
  const rows = db
    .select()
    .from(handovers)
    .where(and(eq(handovers.campaignId, campaignId), query.diveId ? eq(handovers.diveId, query.diveId) : undefined))
    .orderBy(desc(handovers.changeAt))
    .limit(query.limit)
    .all();
  return toHandovers(db, rows);
}

export function handoverCampaign(db: Executor, handoverId: string): string | undefined {
  return db.select({ c: handovers.campaignId }).from(handovers).where(eq(handovers.id, handoverId)).get()?.c;
}

/**
 * The incoming watch acknowledges the note (a lead may for them). The first acknowledgment is kept;
 * acknowledging again answers the note as it is.
 */
export function acknowledgeHandover(db: Db, live: LiveHub, handoverId: string, userId: string, role: string, now = new Date()): Handover {
  const row = db.select().from(handovers).where(eq(handovers.id, handoverId)).get();
  if (!row) throw notFound();
  const incoming = row.incoming as WatchTurnOut | null;
  if (role !== 'lead' && !incoming?.members.some((m) => m.id === userId)) {
    throw forbidden('Only someone of the incoming watch, or a campaign lead, may acknowledge this handover.');
  }
  if (row.acknowledgedAt) return toHandovers(db, [row])[0]!;
  return live.withEvents((tx, stage) => {
    const changed = tx
      .update(handovers)
      .set({ acknowledgedBy: userId, acknowledgedAt: now })
      .where(and(eq(handovers.id, handoverId), isNull(handovers.acknowledgedAt)))
      .run().changes;
    const note = toHandovers(tx, [tx.select().from(handovers).where(eq(handovers.id, handoverId)).get()!])[0]!;
    if (changed > 0) tellCampaignDives(tx, stage, note, 'handover.acknowledged', now);
    return note;
  });
}

/**
 * Tells the readers of the campaign's dives that a note was written or acknowledged, so the dive
 * log shows it at once. The dive log shows the campaign's latest note whichever dive is open, so
 * every dive of the campaign hears it (a few notes a day, one small event row per dive each);
 * each event is also kept for a reader who reconnects.
 */
function tellCampaignDives(tx: Executor, stage: StageEvent, note: Handover, type: 'handover.written' | 'handover.acknowledged', now: Date) {
  const diveIds = tx.select({ id: dives.id }).from(dives).where(eq(dives.campaignId, note.campaignId)).all();
  for (const { id } of diveIds) stage(note.campaignId, id, type, note, now);
}

/** Mails a note (again) to its incoming watch, on a lead's request; returns how many mails were queued. */
export function mailHandover(db: Db, publicUrl: string, handoverId: string, now = new Date()): { queued: number } {
  const row = db.select().from(handovers).where(eq(handovers.id, handoverId)).get();
  if (!row) throw notFound();
  return { queued: db.transaction((tx) => queueHandoverMail(tx, publicUrl, toHandovers(tx, [row])[0]!, now)) };
}

const kindLabels: Record<(typeof observationKinds)[number], string> = {
  biology: 'Biology',
  archaeology: 'Archaeology',
  environment: 'Environment',
  operations: 'Operations',
};

/** Queues the note to each person of the incoming watch; returns how many mails were queued. */
export function queueHandoverMail(tx: Executor, publicUrl: string, handover: Handover, now = new Date()): number {
  const campaign = tx.select({ name: campaigns.name }).from(campaigns).where(eq(campaigns.id, handover.campaignId)).get();
  const people = handover.incoming?.members ?? [];
  if (!campaign || people.length === 0) return 0;
  const emails = new Map(
    tx
      .select({ id: user.id, email: user.email })
      .from(user)
      .where(
        inArray(
          user.id,
          people.map((p) => p.id),
        ),
      )
      .all()
      .map((u) => [u.id, u.email]),
  );
  const c = handover.content;
  const view = {
    campaign: campaign.name,
    outgoing: handover.outgoing?.name ?? 'no watch',
    incoming: handover.incoming?.name ?? 'no watch',
    changeAt: handover.changeAt.replace('T', ' ').slice(0, 16),
    total: c.entries.total,
    kinds: observationKinds.filter((k) => c.entries.byKind[k] > 0).map((k) => ({ label: kindLabels[k], count: c.entries.byKind[k] })),
    openItems: c.openItems.map((o) => ({ title: o.title, detail: o.detail })),
    noOpenItems: c.openItems.length === 0,
    dive: c.dive
      ? {
          number: c.dive.number,
          phase: c.dive.phase ?? 'not launched',
          depth: c.dive.depth === null ? 'no reading' : `${c.dive.depth.toFixed(1)} m`,
        }
      : null,
    url: c.dive ? `${publicUrl}/dives/${c.dive.id}` : `${publicUrl}/campaigns/${handover.campaignId}`,
  };
  let queued = 0;
  for (const p of people) {
    const to = emails.get(p.id);
    if (!to) continue;
    const mail = renderMail('handover', `Handover: ${view.outgoing} to ${view.incoming}, ${campaign.name}`, { ...view, recipient: p.name });
    queueMail(
      tx,
      {
        kind: 'mail',
        ref: handover.id,
        campaignId: handover.campaignId,
        to,
        toName: p.name,
        subject: mail.subject,
        payload: { text: mail.text, html: mail.html },
      },
      now,
    );
    queued++;
  }
  return queued;
}

export type HandoverScheduler = {
  /**
   * Writes the notes of the changes of watch up to `now` that have none yet, within the last day,
   * oldest first, in each campaign. Returns how many were written.
   */
  tick(now?: Date): number;
  start(): void;
  stop(): void;
};

/**
 * Checks every minute (watches change on the minute) for a change of watch that has no note yet.
 * After the server was down, every change it missed since the plan was last set and within
 * `MISSED_CHANGES_WINDOW_MS` (a day) gets its note, oldest first, each with the entries of its
 * own outgoing watch; the open items are those open when the note is written. Only the latest of
 * them is mailed, since the incoming watch of an earlier one has already come and gone. Each note
 * is told live to the readers of the campaign's dives. The unique index on (campaign, change) and
 * the check for notes already written make a second run, or a second writer, write nothing again.
 * The clock is injected for tests.
 */
export function createHandoverScheduler(
  db: Db,
  live: LiveHub,
  log: Logger,
  publicUrl: string,
  kick: () => void,
  clock: () => Date = () => new Date(),
): HandoverScheduler {
  let job: Cron | undefined;
  const noteWritten = (campaignId: string, at: Date) =>
    db
      .select({ id: handovers.id })
      .from(handovers)
      .where(and(eq(handovers.campaignId, campaignId), eq(handovers.changeAt, at)))
      .get() !== undefined;
  const writtenSince = (campaignId: string, since: Date) =>
    new Set(
      db
        .select({ at: handovers.changeAt })
        .from(handovers)
        .where(and(eq(handovers.campaignId, campaignId), gt(handovers.changeAt, since)))
        .all()
        .map((r) => r.at.getTime()),
    );

  function tick(now = clock()): number {
    let written = 0;
    let mailed = 0;
    const campaignIds = db
      .selectDistinct({ id: watches.campaignId })
      .from(watches)
      .all()
      .map((r) => r.id);
    for (const campaignId of campaignIds) {
      try {
        const plan = loadPlan(db, campaignId);
        const since = new Date(Math.max(now.getTime() - MISSED_CHANGES_WINDOW_MS, plan.updatedAt?.getTime() ?? 0));
        const changes = watchChanges(plan.watches, plan.timeZone, since, now);
        const latest = changes.at(-1);
        // Once the note of the latest change is written, the minutes until the next change cost one lookup.
        if (!latest || noteWritten(campaignId, latest.at)) continue;
        const done = writtenSince(campaignId, since);
        for (const change of changes) {
          if (done.has(change.at.getTime())) continue;
          live.withEvents((tx, stage) => {
            const { diveId, content } = composeHandover(tx, campaignId, change);
            const row = tx
              .insert(handovers)
              .values({
                campaignId,
                diveId,
                changeAt: change.at,
                outgoing: change.outgoing ? turnOut(change.outgoing) : null,
                incoming: change.incoming ? turnOut(change.incoming) : null,
                content,
                createdAt: now,
              })
              .onConflictDoNothing()
              .returning()
              .get();
            if (!row) return;
            written++;
            const note = toHandovers(tx, [row])[0]!;
            tellCampaignDives(tx, stage, note, 'handover.written', now);
            if (plan.mailHandovers && change === latest) mailed += queueHandoverMail(tx, publicUrl, note, now);
          });
        }
      } catch (err) {
        log.error('handover note could not be written', { campaignId, err });
      }
    }
    if (mailed > 0) kick();
    return written;
  }

  return {
    tick,
    start() {
      job = new Cron('* * * * *', { unref: true }, () => void tick());
      tick();
    },
    stop() {
      job?.stop();
      job = undefined;
    },
  };
}
