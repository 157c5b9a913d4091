/**
 * The HTTP contract: zod schemas shared by the server (which validates with them) and the app
 * (which parses every response with them). Times cross the wire as ISO 8601 UTC strings with
 * milliseconds; inside the server they are `Date` objects.
 */
import { z } from 'zod';

import { exportLicences, publicPositionModes } from './publication';
import { photoSchema } from './photos';
import { custodyEventSchema, findSchema, identificationSchema, verificationStatuses } from './record';
import { sampleSchema } from './samples';
import { checkQuantity, recordFieldsInput, sizeSchema, organismQuantityTypes } from './taxa';
import { multiLine, oneLine } from './text';

export const campaignRoles = ['lead', 'scientist', 'pilot', 'guest'] as const;
export type CampaignRole = (typeof campaignRoles)[number];

export const observationKinds = ['biology', 'archaeology', 'environment', 'operations'] as const;
export type ObservationKind = (typeof observationKinds)[number];

export const valueSources = ['telemetry', 'manual'] as const;
export type DepthSource = (typeof valueSources)[number];

export const divePhases = ['launch', 'on-bottom', 'off-bottom', 'on-deck'] as const;
export type DivePhase = (typeof divePhases)[number];

/** An instant as sent over the wire: ISO 8601 with a zone (Z or an offset), never local time. */
export const instant = z.iso.datetime({ offset: true, message: 'Expected an ISO 8601 time with a zone, e.g. 2026-05-14T21:14:07.250Z' });

const id = z.string().min(1);
const isoOut = z.string();

/* ---- errors ---- */

/**
 * Every `code` the server itself answers in the error shape. docs/api.md names each of them (a
 * test holds the two together). Sign-in errors may also carry better-auth's own codes, lowercased,
 * which is why the body schema below takes any string.
 */
export const errorCodes = [
  // 400
  'validation_failed',
  'malformed_json',
  'bad_request',
  'bad_multipart',
  'empty_file',
  'empty_log',
  'no_rows',
  'no_rows_taken',
  'no_time_column',
  'record_too_long',
  // 401, 403, 404
  'unauthorized',
  'auth_error',
  'forbidden',
  'foreign_origin',
  'not_found',
  // 409
  'stale_version',
  'retired',
  'no_identification',
  'duplicate_find_number',
  'duplicate_sample_number',
  'duplicate_dive_number',
  'duplicate_tag',
  'duplicate_substrate',
  'reserved_tag',
  'already_member',
  'already_invited',
  'password_exists',
  'invitation_accepted',
  'invitation_revoked',
  'last_lead',
  'not_in_custody',
  // 413, 415
  'too_large',
  'too_many_files',
  'too_many_parts',
  'too_many_pixels',
  'unsupported_type',
  'unsupported_encoding',
  // 408, 429, 431, 5xx
  'request_timeout',
  'rate_limited',
  'too_many_streams',
  'headers_too_large',
  'internal',
  'starting',
  'ship_unreachable',
] as const;
export const errorCodeSchema = z.enum(errorCodes);
export type ErrorCode = z.infer<typeof errorCodeSchema>;

export const apiErrorSchema = z.object({
  error: z.object({
    code: z.string(),
    message: z.string(),
    issues: z.array(z.object({ path: z.string(), message: z.string(), code: z.string().optional() })).optional(),
  }),
});
export type ApiErrorBody = z.infer<typeof apiErrorSchema>;

/* ---- people ---- */

export const membershipSchema = z.object({ campaignId: id, role: z.enum(campaignRoles) });

export const meSchema = z.object({
  user: z.object({ id, name: z.string(), email: z.string() }),
  siteRole: z.enum(['admin', 'user']),
  memberships: z.array(membershipSchema),
  /** The account has a password; a person who joined by an invitation link has none until they set one. */
  hasPassword: z.boolean(),
});
export type Me = z.infer<typeof meSchema>;

export const memberSchema = z.object({
  userId: id,
  name: z.string(),
  email: z.string(),
  role: z.enum(campaignRoles),
  joinedAt: isoOut,
});
export type Member = z.infer<typeof memberSchema>;

/* ---- campaigns ---- */

export const campaignSchema = z.object({
  id,
  name: z.string(),
  siteName: z.string(),
  datumLat: z.number(),
  datumLon: z.number(),
  permitRef: z.string().nullable(),
  vessel: z.string().nullable(),
  vehicle: z.string().nullable(),
  startDate: z.string().nullable(),
  endDate: z.string().nullable(),
  timeZone: z.string(),
  allowFreeTags: z.boolean(),
  keepPhotoPositions: z.boolean(),
  exportLicence: z.enum(exportLicences),
  publicPositions: z.enum(publicPositionModes),
  myRole: z.enum([...campaignRoles, 'admin']),
  diveCount: z.number().int(),
  observationCount: z.number().int(),
  createdAt: isoOut,
  updatedAt: isoOut,
});
export type Campaign = z.infer<typeof campaignSchema>;

export const tagSchema = z.object({ id, name: z.string(), retired: z.boolean(), usage: z.number().int() });
export type Tag = z.infer<typeof tagSchema>;

/* ---- dives ---- */

export const diveSchema = z.object({
  id,
  campaignId: id,
  number: z.string(),
  objectives: z.string(),
  plannedMaxDepth: z.number().nullable(),
  plannedStartAt: isoOut.nullable(),
  phases: z.object({
    launch: isoOut.nullable(),
    onBottom: isoOut.nullable(),
    offBottom: isoOut.nullable(),
    onDeck: isoOut.nullable(),
  }),
  recording: z.object({ startAt: isoOut.nullable(), frameRate: z.string().nullable() }),
  telemetryGapS: z.number(),
  /** Distance between the vehicle's two lasers on this dive, in cm; null when not set. */
  laserSpacingCm: z.number().nullable(),
  observationCount: z.number().int(),
  version: z.number().int(),
  createdAt: isoOut,
  updatedAt: isoOut,
});
export type Dive = z.infer<typeof diveSchema>;

/* ---- observations ---- */

const title = oneLine().min(1, 'A title is needed').max(200, 'At most 200 characters');
const note = multiLine().max(20_000, 'Notes are limited to 20,000 characters');
const depth = z.number().finite().min(-10, 'Depth is in metres below the surface').max(11_000, 'Deeper than any ocean');
const lat = z.number().finite().min(-90, 'Latitude is between -90 and 90').max(90, 'Latitude is between -90 and 90');
const lon = z.number().finite().min(-180, 'Longitude is between -180 and 180').max(180, 'Longitude is between -180 and 180');
const temperature = z.number().finite().min(-3, 'Colder than sea water gets').max(400, 'Hotter than any vent');
const heading = z.number().finite().min(0, 'Heading is 0 to 359.9 degrees from north').lt(360, 'Heading is 0 to 359.9 degrees from north');
const altitude = z.number().finite().min(0, 'Altitude is metres above the seabed').max(11_000, 'Higher than any ocean is deep');
const tagName = oneLine()
  .min(1)
  .max(40, 'Tags are at most 40 characters')
  .regex(/^[^,#\r\n]+$/, 'Tags may not contain commas, # or line breaks');

/**
 * What a client may send to create an observation. Unknown fields are refused, so a body cannot
 * smuggle in `authorId`, `campaignId` or `version`.
 */
export const observationCreateSchema = z
  .object({
    observedAt: instant.optional(),
    kind: z.enum(observationKinds),
    title,
    note: note.default(''),
    depth: depth.nullable().optional(),
    lat: lat.nullable().optional(),
    lon: lon.nullable().optional(),
    temperature: temperature.nullable().optional(),
    heading: heading.nullable().optional(),
    altitude: altitude.nullable().optional(),
    ...recordFieldsInput,
    tags: z.array(tagName).max(20, 'At most 20 tags').default([]),
    /** A random id the sending device gives the entry; sending it again returns the first entry. */
    clientRef: z
      .string()
      .regex(/^[\w-]{8,64}$/)
      .optional(),
  })
  .strict()
  .refine((o) => (o.lat == null) === (o.lon == null), {
    message: 'Give both latitude and longitude, or neither',
    path: ['lon'],
  })
  .superRefine(checkQuantity);
export type ObservationCreate = z.input<typeof observationCreateSchema>;

/**
 * An edit: the fields to change and the `version` the editor started from. A stale version is
 * refused with 409 so that nobody overwrites a change they have not seen. `null` clears a value
 * (a cleared depth falls back to the telemetry log).
 */
export const observationUpdateSchema = z
  .object({
    version: z.number().int().min(1),
    observedAt: instant.optional(),
    kind: z.enum(observationKinds).optional(),
    title: title.optional(),
    note: note.optional(),
    depth: depth.nullable().optional(),
    lat: lat.nullable().optional(),
    lon: lon.nullable().optional(),
    temperature: temperature.nullable().optional(),
    heading: heading.nullable().optional(),
    altitude: altitude.nullable().optional(),
    ...recordFieldsInput,
    tags: z.array(tagName).max(20, 'At most 20 tags').optional(),
  })
  .strict()
  .refine((o) => (o.lat === undefined) === (o.lon === undefined) && (o.lat === null) === (o.lon === null), {
    message: 'Change latitude and longitude together',
    path: ['lon'],
  })
  .superRefine(checkQuantity);
export type ObservationUpdate = z.input<typeof observationUpdateSchema>;

export const observationSchema = z.object({
  id,
  diveId: id,
  campaignId: id,
  observedAt: isoOut,
  kind: z.enum(observationKinds),
  title: z.string(),
  note: z.string(),
  depth: z.number().nullable(),
  depthSource: z.enum(valueSources).nullable(),
  lat: z.number().nullable(),
  lon: z.number().nullable(),
  positionSource: z.enum(valueSources).nullable(),
  temperature: z.number().nullable(),
  temperatureSource: z.enum(valueSources).nullable(),
  /** The vehicle's heading, degrees clockwise from true north. */
  heading: z.number().nullable(),
  headingSource: z.enum(valueSources).nullable(),
  /** The vehicle's height above the seabed, metres. */
  altitude: z.number().nullable(),
  altitudeSource: z.enum(valueSources).nullable(),
  tags: z.array(z.string()),
  photoCount: z.number().int(),
  /** The identification's name and standing, for lists (biology). */
  identification: z
    .object({ scientificName: z.string(), qualifier: z.string().nullable(), verificationStatus: z.enum(verificationStatuses) })
    .nullable(),
  /** The find number (archaeology). */
  findNumber: z.string().nullable(),
  /** The entry's time lies outside its dive's window (see lib/dive-window.ts): kept, but marked. */
  outsideDive: z.boolean(),
  /** The sample the entry carries (biology, environment). */
  sample: sampleSchema.nullable(),
  /** Darwin Core individualCount, organismQuantity and organismQuantityType (biology). */
  individualCount: z.number().int().nullable(),
  organismQuantity: z.number().nullable(),
  organismQuantityType: z.enum(organismQuantityTypes).nullable(),
  /** Sizes in cm, each measured or estimated (biology). */
  sizes: z.array(sizeSchema),
  /** The substrate class's name in the campaign's vocabulary. */
  substrate: z.string().nullable(),
  authorId: id,
  authorName: z.string(),
  version: z.number().int(),
  retired: z.boolean(),
  createdAt: isoOut,
  updatedAt: isoOut,
});
export type Observation = z.infer<typeof observationSchema>;

/** One observation as `GET /api/observations/:id` answers it: with its photos. */
export const observationDetailSchema = observationSchema.extend({
  photos: z.array(photoSchema),
  identificationDetail: identificationSchema.nullable(),
  find: findSchema.nullable(),
  custody: z.array(custodyEventSchema),
});
export type ObservationDetail = z.infer<typeof observationDetailSchema>;

export const observationPageSchema = z.object({
  items: z.array(observationSchema),
  nextCursor: z.string().nullable(),
});
export type ObservationPage = z.infer<typeof observationPageSchema>;

const queryDepth = z.coerce.number().finite().min(-100).max(11_000);

/**
 * The entry filters a query string may carry, shared by the dive log, search and the exports
 * (each adds its own paging or scope).
 */
export const observationFilterQuerySchema = z.object({
  kind: z.enum(observationKinds).optional(),
  tag: z.string().max(40).optional(),
  author: z.string().max(100).optional(),
  hasPhotos: z.enum(['true', 'false']).optional(),
  verification: z.enum(verificationStatuses).optional(),
  minDepth: queryDepth.optional(),
  maxDepth: queryDepth.optional(),
  from: instant.optional(),
  to: instant.optional(),
});
export type ObservationFilterQuery = z.infer<typeof observationFilterQuerySchema>;

export const observationListQuerySchema = observationFilterQuerySchema
  .extend({
    cursor: z.string().max(200).optional(),
    limit: z.coerce.number().int().min(1).max(200).default(50),
    sort: z.enum(['time', 'depth', 'kind', 'author']).default('time'),
    order: z.enum(['asc', 'desc']).optional(),
    /** Retired entries instead of live ones (leads only). */
    retired: z.enum(['only']).optional(),
  })
  .strict();
export type ObservationListQuery = z.infer<typeof observationListQuerySchema>;

/* ---- dives: planning, phases, recording ---- */

/** The lasers of a vehicle's scale sit a few to some tens of cm apart; outside 1–500 cm is a typing slip. */
const laserSpacingCm = z.number().finite().min(1, 'At least 1 cm').max(500, 'At most 500 cm');

export const diveCreateSchema = z
  .object({
    number: z
      .string()
      .trim()
      .min(1)
      .max(40)
      .regex(/^[\w./-]+$/, 'Letters, digits and . / - _ only'),
    objectives: multiLine().trim().max(4000).default(''),
    plannedMaxDepth: z.number().finite().min(0).max(11_000).nullable().optional(),
    plannedStartAt: instant.nullable().optional(),
    laserSpacingCm: laserSpacingCm.nullable().optional(),
  })
  .strict();

export const diveUpdateSchema = z
  .object({
    version: z.number().int().min(1),
    objectives: multiLine().trim().max(4000).optional(),
    plannedMaxDepth: z.number().finite().min(0).max(11_000).nullable().optional(),
    plannedStartAt: instant.nullable().optional(),
    recordingStartAt: instant.nullable().optional(),
    frameRate: z.string().max(20).nullable().optional(),
    telemetryGapS: z.number().finite().min(1).max(3600).optional(),
    laserSpacingCm: laserSpacingCm.nullable().optional(),
  })
  .strict();

export const phaseInputSchema = z
  .object({
    phase: z.enum(divePhases),
    /** When the phase began; now when left out. `null` clears a phase set by mistake. */
    at: instant.nullable().optional(),
  })
  .strict();

/* ---- campaign vocabulary and quick marks ---- */

export const tagCreateSchema = z.object({ name: tagName }).strict();
export const tagUpdateSchema = z
  .object({ name: tagName.optional(), retired: z.boolean().optional(), mergeInto: z.string().min(1).optional() })
  .strict()
  .refine((t) => Object.keys(t).length > 0, { message: 'Nothing to change' });

export const quickMarkInputSchema = z
  .object({
    label: oneLine().min(1).max(80),
    kind: z.enum(observationKinds),
    tags: z.array(tagName).max(10).default([]),
    position: z.number().int().min(0).max(1000).optional(),
  })
  .strict();

export const quickMarkSchema = z.object({
  id,
  label: z.string(),
  kind: z.enum(observationKinds),
  tags: z.array(z.string()),
  position: z.number().int(),
});
export type QuickMark = z.infer<typeof quickMarkSchema>;

export const healthSchema = z.object({ ok: z.literal(true), version: z.string() });
