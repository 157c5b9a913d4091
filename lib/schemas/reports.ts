/**
 * The daily dive report: one dive, or every dive of a day in the campaign's display zone, read
 * from the record in one answer so the report screen can lay it out for reading and printing.
 */
import { DateTime } from 'luxon';
import { z } from 'zod';

import { diveSchema, observationKinds, type Dive } from './core';
import { photoSchema } from './photos';
import { findStates } from './record';
import { sampleRowSchema } from './samples';
import { taxonSeenSchema } from './taxa';
import { diveSummarySchema } from './telemetry';

/** A calendar day in the campaign's display zone. */
export const reportDateSchema = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'A date is written YYYY-MM-DD')
  .refine((s) => {
    const d = new Date(`${s}T00:00:00Z`);
    return !Number.isNaN(d.getTime()) && d.toISOString().startsWith(s);
  }, 'Not a date on the calendar');

/** The instant that places a dive on a day: its launch, else its planned start, else when it was made. */
export const diveAnchor = (dive: Dive) => dive.phases.launch ?? dive.plannedStartAt ?? dive.createdAt;

/** The calendar day (YYYY-MM-DD) of an instant in a time zone. */
export const dayInZone = (iso: string, zone: string) => DateTime.fromISO(iso, { zone: 'utc' }).setZone(zone).toISODate() ?? '';

/** The day a dive's report falls on, in the campaign's display zone. */
export const diveDay = (dive: Dive, zone: string) => dayInZone(diveAnchor(dive), zone);

export const reportHeaderSchema = z.object({
  campaignId: z.string(),
  campaign: z.string(),
  site: z.string(),
  vessel: z.string().nullable(),
  vehicle: z.string().nullable(),
  permit: z.string().nullable(),
  timeZone: z.string(),
});
export type ReportHeader = z.infer<typeof reportHeaderSchema>;

export const reportEntrySchema = z.object({
  id: z.string(),
  kind: z.enum(observationKinds),
  title: z.string(),
  note: z.string(),
  observedAt: z.string(),
  depth: z.number().nullable(),
  authorName: z.string(),
  tags: z.array(z.string()),
  scientificName: z.string().nullable(),
  findNumber: z.string().nullable(),
  /** The entry's first photo, where it has one. */
  photo: photoSchema.nullable(),
});
export type ReportEntry = z.infer<typeof reportEntrySchema>;

export const reportFindSchema = z.object({
  observationId: z.string(),
  findNumber: z.string(),
  title: z.string(),
  objectType: z.string().nullable(),
  material: z.string().nullable(),
  state: z.enum(findStates),
  custodySteps: z.number().int(),
  /** Who holds it now and where, by the last step of its custody trail. */
  heldBy: z.string().nullable(),
  location: z.string().nullable(),
});
export type ReportFind = z.infer<typeof reportFindSchema>;

export const reportOperationSchema = z.object({
  id: z.string(),
  title: z.string(),
  note: z.string(),
  observedAt: z.string(),
  /** Tagged as an equipment fault. */
  fault: z.boolean(),
});
export type ReportOperation = z.infer<typeof reportOperationSchema>;

export const reportWatchSchema = z.object({
  watch: z.string(),
  start: z.string(),
  end: z.string(),
  members: z.array(z.object({ id: z.string(), name: z.string() })),
});
export type ReportWatch = z.infer<typeof reportWatchSchema>;

export const diveReportPartSchema = z.object({
  dive: diveSchema,
  /** The dive's day in the display zone (its launch, else its planned start, else when it was made). */
  date: z.string(),
  summary: diveSummarySchema,
  entries: z.array(z.object({ kind: z.enum(observationKinds), items: z.array(reportEntrySchema) })),
  finds: z.array(reportFindSchema),
  samples: z.array(sampleRowSchema),
  taxa: z.array(taxonSeenSchema),
  operations: z.array(reportOperationSchema),
});
export type DiveReportPart = z.infer<typeof diveReportPartSchema>;

/** `GET /api/dives/:diveId/report` and `GET /api/campaigns/:campaignId/reports/:date`. */
export const reportSchema = z.object({
  scope: z.enum(['dive', 'day']),
  date: z.string(),
  header: reportHeaderSchema,
  generatedAt: z.string(),
  dives: z.array(diveReportPartSchema),
  /** Who stood which watch across the dive (launch to on deck) or the day; empty without a watch plan. */
  watches: z.array(reportWatchSchema),
});
export type Report = z.infer<typeof reportSchema>;
