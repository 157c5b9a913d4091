/**
 * The daily dive report, read from the record: a dive's header, statistics, entries by kind (each
 * with its first photo), finds and samples with their custody, the taxa it saw, its operations
 * entries and who was on watch. A day's report gathers every dive whose day, in the campaign's
 * display zone, is that day.
 */
import { and, asc, eq, inArray } from 'drizzle-orm';
import { DateTime } from 'luxon';

import type { Db } from '../../db/client';
import { campaigns, custodyEvents, finds, observations } from '../../db/schema';
import {
  diveAnchor,
  diveDay,
  observationKinds,
  type Dive,
  type DiveReportPart,
  type Report,
  type ReportHeader,
  type ReportWatch,
} from '../../lib/schemas';
import { notFound } from '../errors';
import { listDives, getDive } from './dives';
import { FAULT_TAG } from './handovers';
import { hydrate } from './observations';
import { photosOf } from './photos';
import { listSamples } from './samples';
import { taxaSeen } from './taxa';
import { diveSummary } from './telemetry';
import { watchStandersDuring } from './watches';

function headerOf(db: Db, campaignId: string): ReportHeader {
  const c = db.select().from(campaigns).where(eq(campaigns.id, campaignId)).get();
  if (!c) throw notFound();
  return {
    campaignId: c.id,
    campaign: c.name,
    site: c.siteName,
    vessel: c.vessel,
    vehicle: c.vehicle,
    permit: c.permitRef,
    timeZone: c.timeZone,
  };
}

/** Midnight to midnight of `date` in `zone`, as instants (a daylight-saving day is 23 or 25 hours). */
export function dayBounds(date: string, zone: string): { from: Date; to: Date } {
  const start = DateTime.fromISO(date, { zone }).startOf('day');
  return { from: start.toJSDate(), to: start.plus({ days: 1 }).toJSDate() };
}

function findsOf(db: Db, ids: string[]) {
  if (ids.length === 0) return [];
  const rows = db
    .select({ find: finds, title: observations.title })
    .from(finds)
    .innerJoin(observations, eq(observations.id, finds.observationId))
    .where(inArray(finds.observationId, ids))
    .orderBy(asc(observations.observedAt))
    .all();
  const steps = rows.length
    ? db
        .select()
        .from(custodyEvents)
        .where(
          inArray(
            custodyEvents.observationId,
            rows.map((r) => r.find.observationId),
          ),
        )
        .orderBy(asc(custodyEvents.since), asc(custodyEvents.createdAt))
        .all()
    : [];
  return rows.map(({ find: f, title }) => {
    const trail = steps.filter((s) => s.observationId === f.observationId);
    const last = trail.at(-1);
    return {
      observationId: f.observationId,
      findNumber: f.findNumber,
      title,
      objectType: f.objectType,
      material: f.material,
      state: f.state,
      custodySteps: trail.length,
      heldBy: last?.holder ?? null,
      location: last?.location ?? null,
    };
  });
}

function divePart(db: Db, dive: Dive, zone: string): DiveReportPart {
  const rows = db
    .select()
    .from(observations)
    .where(and(eq(observations.diveId, dive.id), eq(observations.retired, false)))
    .orderBy(asc(observations.observedAt), asc(observations.id))
    .all();
  const entries = hydrate(db, rows);
  const ids = entries.map((e) => e.id);
  const photos = photosOf(db, ids);
  return {
    dive,
    date: diveDay(dive, zone),
    summary: diveSummary(db, dive.id),
    entries: observationKinds
      .map((kind) => ({
        kind,
        items: entries
          .filter((e) => e.kind === kind)
          .map((e) => ({
            id: e.id,
            kind: e.kind,
            title: e.title,
            note: e.note,
            observedAt: e.observedAt,
            depth: e.depth,
            authorName: e.authorName,
            tags: e.tags,
            scientificName: e.identification?.scientificName ?? null,
            findNumber: e.findNumber,
            photo: photos.get(e.id)?.[0] ?? null,
          })),
      }))
      .filter((g) => g.items.length > 0),
    finds: findsOf(db, ids),
    samples: listSamples(db, { campaignId: dive.campaignId, diveId: dive.id }),
    taxa: taxaSeen(db, { campaignId: dive.campaignId, diveId: dive.id }),
    operations: entries
      .filter((e) => e.kind === 'operations')
      .map((e) => ({
        id: e.id,
        title: e.title,
        note: e.note,
        observedAt: e.observedAt,
        fault: e.tags.some((t) => t.toLowerCase() === FAULT_TAG),
      })),
  };
}

function watchesDuring(db: Db, campaignId: string, from: Date, to: Date): ReportWatch[] {
  if (to.getTime() <= from.getTime()) return [];
  return watchStandersDuring(db, campaignId, from, to).map((w) => ({
    watch: w.watch,
    start: w.start.toISOString(),
    end: w.end.toISOString(),
    members: w.members,
  }));
}

/** One dive's report; its watches span launch to on deck (or its day, before it has both). */
export function diveReport(db: Db, diveId: string, now = new Date()): Report {
  const dive = getDive(db, diveId);
  if (!dive) throw notFound();
  const header = headerOf(db, dive.campaignId);
  const part = divePart(db, dive, header.timeZone);
  const { launch, onDeck } = dive.phases;
  const span = launch && onDeck ? { from: new Date(launch), to: new Date(onDeck) } : dayBounds(part.date, header.timeZone);
  return {
    scope: 'dive',
    date: part.date,
    header,
    generatedAt: now.toISOString(),
    dives: [part],
    watches: watchesDuring(db, dive.campaignId, span.from, span.to),
  };
}

/** Every dive of a day in the campaign's display zone, in launch order, and the day's watches. */
export function dayReport(db: Db, campaignId: string, date: string, now = new Date()): Report {
  const header = headerOf(db, campaignId);
  const dives = listDives(db, campaignId)
    .filter((d) => diveDay(d, header.timeZone) === date)
    .sort((a, b) => diveAnchor(a).localeCompare(diveAnchor(b)) || a.number.localeCompare(b.number));
  const { from, to } = dayBounds(date, header.timeZone);
  return {
    scope: 'day',
    date,
    header,
    generatedAt: now.toISOString(),
    dives: dives.map((d) => divePart(db, d, header.timeZone)),
    watches: watchesDuring(db, campaignId, from, to),
  };
}
