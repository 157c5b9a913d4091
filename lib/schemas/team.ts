/** The campaign team: campaigns as the site administrator creates them, members and invitations. */
import { z } from 'zod';

import { mailStatusSchema } from './mail';
import { oneLine } from './text';

import { exportLicences, publicPositionModes } from './exports';

const campaignRoles = ['lead', 'scientist', 'pilot', 'guest'] as const;
const invitationStatuses = ['pending', 'accepted', 'expired', 'revoked'] as const;
const date = z.iso.date({ message: 'Use a date like 2026-05-10' });
const text = (max: number) => oneLine().max(max);

/** An IANA time-zone name the runtime knows (Europe/Lisbon, UTC, Pacific/Chatham…). */
export const timeZone = z
  .string()
  .min(1)
  .max(64)
  .refine((tz) => {
    try {
      new Intl.DateTimeFormat('en', { timeZone: tz });
      return true;
    } catch {
      return false;
    }
  }, 'Use a time-zone name such as Europe/Lisbon or UTC');

const campaignFields = {
  name: text(120).min(1, 'A campaign needs a name'),
  siteName: text(200).min(1, 'Name the site'),
  datumLat: z.number().finite().min(-90).max(90),
  datumLon: z.number().finite().min(-180).max(180),
  permitRef: text(200).nullable().optional(),
  vessel: text(120).nullable().optional(),
  vehicle: text(120).nullable().optional(),
  startDate: date.nullable().optional(),
  endDate: date.nullable().optional(),
  timeZone: timeZone.default('UTC'),
};

const datesInOrder = (c: { startDate?: string | null; endDate?: string | null }) => !c.startDate || !c.endDate || c.startDate <= c.endDate;

export const campaignCreateSchema = z
  .object({
    ...campaignFields,
    leadEmail: z.email('The first lead needs an e-mail address').max(254),
    leadName: text(120).optional(),
  })
  .strict()
  .refine(datesInOrder, { message: 'The campaign ends after it starts', path: ['endDate'] });
export type CampaignCreate = z.input<typeof campaignCreateSchema>;

export const campaignUpdateSchema = z
  .object({
    name: campaignFields.name.optional(),
    siteName: campaignFields.siteName.optional(),
    datumLat: campaignFields.datumLat.optional(),
    datumLon: campaignFields.datumLon.optional(),
    permitRef: campaignFields.permitRef,
    vessel: campaignFields.vessel,
    vehicle: campaignFields.vehicle,
    startDate: campaignFields.startDate,
    endDate: campaignFields.endDate,
    timeZone: timeZone.optional(),
    allowFreeTags: z.boolean().optional(),
    keepPhotoPositions: z.boolean().optional(),
    exportLicence: z.enum(exportLicences).optional(),
    publicPositions: z.enum(publicPositionModes).optional(),
  })
  .strict()
  .refine(datesInOrder, { message: 'The campaign ends after it starts', path: ['endDate'] });
export type CampaignUpdate = z.input<typeof campaignUpdateSchema>;

export const invitationCreateSchema = z
  .object({
    email: z.email('Enter an e-mail address').max(254),
    role: z.enum(campaignRoles, { message: 'One of lead, scientist, pilot, guest' }),
    name: text(120).optional(),
  })
  .strict();
export type InvitationCreate = z.input<typeof invitationCreateSchema>;

export const invitationSchema = z.object({
  id: z.string(),
  campaignId: z.string(),
  email: z.string(),
  role: z.enum(campaignRoles),
  status: z.enum(invitationStatuses),
  invitedByName: z.string(),
  createdAt: z.string(),
  expiresAt: z.string(),
  sentAt: z.string().nullable(),
  acceptedAt: z.string().nullable(),
  /** Where the invitation's newest mail stands (queued, sent, failed with the reason). */
  mail: mailStatusSchema.nullable(),
});
export type Invitation = z.infer<typeof invitationSchema>;

export const memberUpdateSchema = z.object({ role: z.enum(campaignRoles) }).strict();

/** "E-mail me a sign-in link": the address only. */
export const signInLinkRequestSchema = z.object({ email: z.email('Enter an e-mail address').max(254) }).strict();

/** A first password, for an account that has none (a person who joined by an invitation link). */
export const passwordSetSchema = z
  .object({
    newPassword: z.string().min(8, 'Passwords have 8 to 128 characters').max(128, 'Passwords have 8 to 128 characters'),
  })
  .strict();
