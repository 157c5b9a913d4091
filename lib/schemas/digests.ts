/** Digest mails: a member's subscription to a campaign's digest, and the digests a lead sees sent. */
import { z } from 'zod';

import { mailStatusSchema } from './mail';
import { observationKinds } from './core';

export const digestFrequencies = ['off', 'after-each-dive', 'daily'] as const;
export type DigestFrequency = (typeof digestFrequencies)[number];

/** What started a digest: a dive on deck, the daily 07:00 in the campaign's zone, or a lead. */
export const digestTriggers = ['after-dive', 'daily', 'manual'] as const;
export type DigestTrigger = (typeof digestTriggers)[number];

/** Which entries a subscriber wants; every part left out matches everything. */
export const digestFiltersSchema = z
  .object({
    kinds: z.array(z.enum(observationKinds)).max(observationKinds.length).optional(),
    /** Entries carrying at least one of these tags. */
    tags: z.array(z.string().trim().min(1).max(60)).max(30).optional(),
    /** Only biology entries whose identification an expert verified. */
    verifiedOnly: z.boolean().optional(),
    /** Only entries with at least one photo. */
    withPhotos: z.boolean().optional(),
  })
  .strict();
export type DigestFilters = z.infer<typeof digestFiltersSchema>;

export const subscriptionSchema = z.object({
  campaignId: z.string(),
  frequency: z.enum(digestFrequencies),
  filters: digestFiltersSchema,
  /** The end of the window the last digest covered. */
  lastDigestAt: z.string().nullable(),
  /** The campaign's display time zone, where the daily digest goes at 07:00. */
  timeZone: z.string(),
});
export type Subscription = z.infer<typeof subscriptionSchema>;

export const subscriptionUpdateSchema = z
  .object({
    frequency: z.enum(digestFrequencies),
    filters: digestFiltersSchema.optional(),
  })
  .strict();
export type SubscriptionUpdate = z.input<typeof subscriptionUpdateSchema>;

/** One digest in the lead's log: to whom, what window, how many entries, and where its mail stands. */
export const digestLogItemSchema = z.object({
  id: z.string(),
  campaignId: z.string(),
  userId: z.string(),
  recipientName: z.string(),
  subject: z.string(),
  observationCount: z.number().int(),
  trigger: z.enum(digestTriggers).nullable(),
  diveId: z.string().nullable(),
  since: z.string().nullable(),
  until: z.string().nullable(),
  createdAt: z.string(),
  mail: mailStatusSchema.nullable(),
});
export type DigestLogItem = z.infer<typeof digestLogItemSchema>;

/** `POST /api/campaigns/:campaignId/digests`: send now, to every subscriber or only about one dive. */
export const digestSendSchema = z.object({ diveId: z.string().optional() }).strict();
export type DigestSend = z.input<typeof digestSendSchema>;

export const digestSendResultSchema = z.object({
  /** Digests composed and queued. */
  queued: z.array(digestLogItemSchema),
  /** Subscribers with nothing new that matches their filters: no mail. */
  nothingNew: z.number().int(),
});
export type DigestSendResult = z.infer<typeof digestSendResultSchema>;

export const unsubscribeResultSchema = z.object({ unsubscribed: z.boolean(), campaignName: z.string(), message: z.string() });
