/** Mail the server sends (invitations, digests): the queue's states and the site administrator's mail log. */
import { z } from 'zod';

/** queued: waiting for its (next) attempt; sending: being handed to the mail server; sent; failed (with the reason); cancelled: no longer wanted. */
export const mailStates = ['queued', 'sending', 'sent', 'failed', 'cancelled'] as const;
export type MailState = (typeof mailStates)[number];

export const mailKinds = ['invitation', 'digest', 'sign-in-link', 'mail'] as const;
export type MailKind = (typeof mailKinds)[number];

/** Where one queued mail stands, as the team screen and the digest log show it. */
export const mailStatusSchema = z.object({
  id: z.string(),
  state: z.enum(mailStates),
  attempts: z.number().int(),
  /** Why the last attempt failed (or why the mail was cancelled); null once sent. */
  reason: z.string().nullable(),
  nextAttemptAt: z.string().nullable(),
  sentAt: z.string().nullable(),
  updatedAt: z.string(),
});
export type MailStatus = z.infer<typeof mailStatusSchema>;

/** One row of the site administrator's mail log. */
export const mailLogItemSchema = mailStatusSchema.extend({
  kind: z.enum(mailKinds),
  to: z.string(),
  subject: z.string(),
  campaignId: z.string().nullable(),
  createdAt: z.string(),
});
export type MailLogItem = z.infer<typeof mailLogItemSchema>;

export const caughtMailSchema = z.object({
  id: z.string(),
  to: z.string(),
  from: z.string(),
  subject: z.string(),
  text: z.string(),
  html: z.string(),
  headers: z.record(z.string(), z.string()),
  receivedAt: z.string(),
});
export type CaughtMailItem = z.infer<typeof caughtMailSchema>;

/** `GET /api/admin/mail`: the queue's mail newest first, with counts per state, and what the built-in catcher caught (null when mail goes out through SMTP_URL). */
export const mailLogSchema = z.object({
  counts: z.record(z.enum(mailStates), z.number().int()),
  items: z.array(mailLogItemSchema),
  caught: z.array(caughtMailSchema).nullable(),
});
export type MailLog = z.infer<typeof mailLogSchema>;

export const mailLogQuerySchema = z
  .object({
    state: z.enum(mailStates).optional(),
    kind: z.enum(mailKinds).optional(),
    limit: z.coerce.number().int().min(1).max(500).default(100),
  })
  .strict();
