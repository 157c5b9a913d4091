/** The watch plan of a campaign and the notes written at each change of watch (lib/watches.ts). */
import { z } from 'zod';

import { divePhases, observationKinds } from './core';
import { oneLine } from './text';

const hhmm = z.string().regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'Use a 24-hour time such as 08:00');

export const watchInputSchema = z
  .object({
    name: oneLine().pipe(z.string().min(1, 'Give the watch a name').max(60, 'At most 60 characters')),
    start: hhmm,
    end: hhmm,
    memberIds: z.array(z.string().min(1)).max(50, 'At most 50 people').default([]),
  })
  .strict();

/** The whole plan at once: the watches in order, and whether each handover note is mailed to the incoming watch. */
export const watchPlanUpdateSchema = z
  .object({
    mailHandovers: z.boolean().optional(),
    watches: z.array(watchInputSchema).max(24, 'At most 24 watches'),
  })
  .strict();
export type WatchPlanUpdate = z.infer<typeof watchPlanUpdateSchema>;

const person = z.object({ id: z.string(), name: z.string() });
export type WatchPerson = z.infer<typeof person>;

export const watchSchema = z.object({ id: z.string(), name: z.string(), start: z.string(), end: z.string(), members: z.array(person) });
export type Watch = z.infer<typeof watchSchema>;

/** One day's turn of a watch: the real instants it began and ends (ISO 8601 UTC). */
export const watchTurnSchema = z.object({ name: z.string(), start: z.string(), end: z.string(), members: z.array(person) });
export type WatchTurnOut = z.infer<typeof watchTurnSchema>;

export const watchPlanSchema = z.object({
  campaignId: z.string(),
  timeZone: z.string(),
  mailHandovers: z.boolean(),
  watches: z.array(watchSchema),
  /** The watch on now, or null in a gap of the plan. */
  onWatch: watchTurnSchema.nullable(),
  /** The next change of watch within a day, if any. */
  nextChangeAt: z.string().nullable(),
  updatedAt: z.string().nullable(),
});
export type WatchPlan = z.infer<typeof watchPlanSchema>;

/** What stays open at a change of watch, each with a rule of its own. */
export const openItemKinds = ['identification-unverified', 'find-in-situ', 'sample-without-custody', 'operations-fault'] as const;
export type OpenItemKind = (typeof openItemKinds)[number];

export const handoverContentSchema = z.object({
  /** Entries logged during the outgoing watch (by their time), counted by kind, with the latest of them. */
  entries: z.object({
    total: z.number().int(),
    byKind: z.record(z.enum(observationKinds), z.number().int()),
    latest: z.array(z.object({ id: z.string(), kind: z.enum(observationKinds), title: z.string(), observedAt: z.string() })),
  }),
  openItems: z.array(z.object({ kind: z.enum(openItemKinds), observationId: z.string(), title: z.string(), detail: z.string() })),
  /** The dive under way at the change: its phase then and the vehicle's depth from the telemetry log. */
  dive: z
    .object({
      id: z.string(),
      number: z.string(),
      phase: z.enum(divePhases).nullable(),
      depth: z.number().nullable(),
      depthAt: z.string().nullable(),
    })
    .nullable(),
});
export type HandoverContent = z.infer<typeof handoverContentSchema>;

export const handoverSchema = z.object({
  id: z.string(),
  campaignId: z.string(),
  diveId: z.string().nullable(),
  changeAt: z.string(),
  outgoing: watchTurnSchema.nullable(),
  incoming: watchTurnSchema.nullable(),
  content: handoverContentSchema,
  acknowledgedBy: person.nullable(),
  acknowledgedAt: z.string().nullable(),
});
export type Handover = z.infer<typeof handoverSchema>;

export const handoverListSchema = z.object({ items: z.array(handoverSchema) });

export const handoverQuerySchema = z.object({
  diveId: z.string().min(1).optional(),
  limit: z.coerce.number().int().min(1).max(200).default(50),
});
