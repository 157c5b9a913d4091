import { sql } from 'drizzle-orm';
import { index, integer, primaryKey, real, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';

import type { CampaignRole, DepthSource, ObservationKind } from '../lib/schemas';
import type { DigestFrequency, DigestTrigger } from '../lib/schemas/digests';
import type { MailKind, MailState } from '../lib/schemas/mail';
import type { ExportLicence, PublicPositionMode } from '../lib/schemas/exports';
import type { identificationConfidences, identificationQualifiers, taxonRanks } from '../lib/schemas/record';
import type { SampleType } from '../lib/schemas/samples';
import type { OrganismQuantityType, SizeDimension, SizeMethod, SubstrateOrigin } from '../lib/schemas/taxa';

const id = () =>
  text('id')
    .primaryKey()
    .$defaultFn(() => crypto.randomUUID());
const createdAt = () =>
  integer('created_at', { mode: 'timestamp_ms' })
    .notNull()
    .$defaultFn(() => new Date());
const updatedAt = () =>
  integer('updated_at', { mode: 'timestamp_ms' })
    .notNull()
    .$defaultFn(() => new Date());

/* ---- better-auth's tables (core, admin plugin) ---- */

export const user = sqliteTable('user', {
  id: text('id').primaryKey(),
  name: text('name').notNull(),
  email: text('email').notNull().unique(),
  emailVerified: integer('email_verified', { mode: 'boolean' }).notNull().default(false),
  image: text('image'),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
  role: text('role'),
  banned: integer('banned', { mode: 'boolean' }).default(false),
  banReason: text('ban_reason'),
  banExpires: integer('ban_expires', { mode: 'timestamp_ms' }),
});

export const session = sqliteTable(
  'session',
  {
    id: text('id').primaryKey(),
    expiresAt: integer('expires_at', { mode: 'timestamp_ms' }).notNull(),
    token: text('token').notNull().unique(),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
    ipAddress: text('ip_address'),
    userAgent: text('user_agent'),
    userId: text('user_id')
      .notNull()
      .references(() => user.id, { onDelete: 'cascade' }),
    impersonatedBy: text('impersonated_by'),
  },
  (t) => [index('session_user_idx').on(t.userId)],
);

export const account = sqliteTable(
  'account',
  {
    id: text('id').primaryKey(),
    accountId: text('account_id').notNull(),
    providerId: text('provider_id').notNull(),
    userId: text('user_id')
      .notNull()
      .references(() => user.id, { onDelete: 'cascade' }),
    accessToken: text('access_token'),
    refreshToken: text('refresh_token'),
    idToken: text('id_token'),
    accessTokenExpiresAt: integer('access_token_expires_at', { mode: 'timestamp_ms' }),
    refreshTokenExpiresAt: integer('refresh_token_expires_at', { mode: 'timestamp_ms' }),
    scope: text('scope'),
    password: text('password'),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [index('account_user_idx').on(t.userId)],
);

export const verification = sqliteTable(
  'verification',
  {
    id: text('id').primaryKey(),
    identifier: text('identifier').notNull(),
    value: text('value').notNull(),
    expiresAt: integer('expires_at', { mode: 'timestamp_ms' }).notNull(),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [index('verification_identifier_idx').on(t.identifier)],
);

/* ---- Bathynote's own record ---- */

export const campaigns = sqliteTable('campaigns', {
  id: id(),
  name: text('name').notNull(),
  siteName: text('site_name').notNull(),
  datumLat: real('datum_lat').notNull(),
  datumLon: real('datum_lon').notNull(),
  permitRef: text('permit_ref'),
  vessel: text('vessel'),
  vehicle: text('vehicle'),
  startDate: text('start_date'),
  endDate: text('end_date'),
  timeZone: text('time_zone').notNull().default('UTC'),
  allowFreeTags: integer('allow_free_tags', { mode: 'boolean' }).notNull().default(true),
  /** Whether photo GPS metadata is kept (off by default: positions of heritage sites are sensitive). */
  keepPhotoPositions: integer('keep_photo_positions', { mode: 'boolean' }).notNull().default(false),
  /** Licence of the published exports. */
  exportLicence: text('export_licence').$type<ExportLicence>().notNull().default('CC-BY-4.0'),
  /** How positions appear in public exports; rounded by default, since wreck positions are sensitive. */
  publicPositions: text('public_positions').$type<PublicPositionMode>().notNull().default('grid-0.1'),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
});

export const memberships = sqliteTable(
  'memberships',
  {
    campaignId: text('campaign_id')
      .notNull()
      .references(() => campaigns.id, { onDelete: 'cascade' }),
    userId: text('user_id')
      .notNull()
      .references(() => user.id, { onDelete: 'cascade' }),
    role: text('role').$type<CampaignRole>().notNull(),
    createdAt: createdAt(),
  },
  (t) => [primaryKey({ columns: [t.campaignId, t.userId] }), index('membership_user_idx').on(t.userId)],
);

export const dives = sqliteTable(
  'dives',
  {
    id: id(),
    campaignId: text('campaign_id')
      .notNull()
      .references(() => campaigns.id, { onDelete: 'cascade' }),
    number: text('number').notNull(),
    objectives: text('objectives').notNull().default(''),
    plannedMaxDepth: real('planned_max_depth'),
    plannedStartAt: integer('planned_start_at', { mode: 'timestamp_ms' }),
    launchAt: integer('launch_at', { mode: 'timestamp_ms' }),
    onBottomAt: integer('on_bottom_at', { mode: 'timestamp_ms' }),
    offBottomAt: integer('off_bottom_at', { mode: 'timestamp_ms' }),
    onDeckAt: integer('on_deck_at', { mode: 'timestamp_ms' }),
    /** When the video recording started, and its frame rate name (lib/timecode FRAME_RATES). */
    recordingStartAt: integer('recording_start_at', { mode: 'timestamp_ms' }),
    frameRate: text('frame_rate'),
    /** Telemetry samples further apart than this leave "no telemetry" between them. */
    telemetryGapS: real('telemetry_gap_s').notNull().default(30),
    /** Distance between the vehicle's two parallel lasers on this dive, in cm: where photo measurements start. */
    laserSpacingCm: real('laser_spacing_cm'),
    version: integer('version').notNull().default(1),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex('dive_number_unique').on(t.campaignId, t.number)],
);

export const observations = sqliteTable(
  'observations',
  {
    id: id(),
    diveId: text('dive_id')
      .notNull()
      .references(() => dives.id, { onDelete: 'restrict' }),
    campaignId: text('campaign_id')
      .notNull()
      .references(() => campaigns.id, { onDelete: 'restrict' }),
    observedAt: integer('observed_at', { mode: 'timestamp_ms' }).notNull(),
    kind: text('kind').$type<ObservationKind>().notNull(),
    title: text('title').notNull(),
    note: text('note').notNull().default(''),
    depth: real('depth'),
    depthSource: text('depth_source').$type<DepthSource>(),
    lat: real('lat'),
    lon: real('lon'),
    positionSource: text('position_source').$type<DepthSource>(),
    temperature: real('temperature'),
    temperatureSource: text('temperature_source').$type<DepthSource>(),
    /** The vehicle's heading, degrees clockwise from true north, [0, 360). */
    heading: real('heading'),
    headingSource: text('heading_source').$type<DepthSource>(),
    /** The vehicle's height above the seabed in metres. */
    altitude: real('altitude'),
    altitudeSource: text('altitude_source').$type<DepthSource>(),
    /** Darwin Core individualCount (biology). */
    individualCount: integer('individual_count'),
    /** Darwin Core organismQuantity with its organismQuantityType (biology). */
    organismQuantity: real('organism_quantity'),
    organismQuantityType: text('organism_quantity_type').$type<OrganismQuantityType>(),
    /** What the entry sits on, from the campaign's substrate vocabulary. */
    substrateId: text('substrate_id').references(() => substrateClasses.id, { onDelete: 'restrict' }),
    authorId: text('author_id')
      .notNull()
      .references(() => user.id, { onDelete: 'restrict' }),
    version: integer('version').notNull().default(1),
    retired: integer('retired', { mode: 'boolean' }).notNull().default(false),
    /** The sending device's own id for the entry, so a retried send never logs it twice. */
    clientRef: text('client_ref'),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [
    uniqueIndex('observation_client_ref_unique').on(t.authorId, t.clientRef),
    index('observation_dive_time_idx').on(t.diveId, t.observedAt),
    index('observation_campaign_idx').on(t.campaignId),
    // None of its own on author_id: observation_client_ref_unique leads with it and serves every
    // lookup by author, the foreign-key check when a user is deleted included.
  ],
);

/**
 * A campaign's substrate vocabulary. New campaigns start from the substrate classes of the Coastal
 * and Marine Ecological Classification Standard (FGDC-STD-018-2012); a lead adds, renames and
 * retires classes like tags.
 */
export const substrateClasses = sqliteTable(
  'substrate_classes',
  {
    id: id(),
    campaignId: text('campaign_id')
      .notNull()
      .references(() => campaigns.id, { onDelete: 'cascade' }),
    name: text('name').notNull(),
    origin: text('origin').$type<SubstrateOrigin>(),
    /** The standard's own name for a class the campaign started from; null for the campaign's own. */
    standardName: text('standard_name'),
    retired: integer('retired', { mode: 'boolean' }).notNull().default(false),
    position: integer('position').notNull().default(0),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('substrate_name_unique').on(t.campaignId, sql`lower(${t.name})`)],
);

/** A biology entry's sizes, one per dimension, each measured or estimated (Darwin Core measurement-or-fact). */
export const observationSizes = sqliteTable(
  'observation_sizes',
  {
    observationId: text('observation_id')
      .notNull()
      .references(() => observations.id, { onDelete: 'cascade' }),
    dimension: text('dimension').$type<SizeDimension>().notNull(),
    valueCm: real('value_cm').notNull(),
    method: text('method').$type<SizeMethod>().notNull(),
    /** The photo measurement this size was taken from; null when a person gave it. */
    measurementId: text('measurement_id'),
  },
  (t) => [primaryKey({ columns: [t.observationId, t.dimension] })],
);

/** A campaign's species list, imported by the lead; identifications are suggested from it. */
export const checklistTaxa = sqliteTable(
  'checklist_taxa',
  {
    id: id(),
    campaignId: text('campaign_id')
      .notNull()
      .references(() => campaigns.id, { onDelete: 'cascade' }),
    scientificName: text('scientific_name').notNull(),
    authorship: text('authorship'),
    taxonRank: text('taxon_rank'),
    /** Darwin Core scientificNameID: an LSID or a link. */
    identifier: text('identifier'),
    vernacularName: text('vernacular_name'),
    genus: text('genus'),
    specificEpithet: text('specific_epithet'),
    infraspecificRank: text('infraspecific_rank'),
    infraspecificEpithet: text('infraspecific_epithet'),
    importedAt: integer('imported_at', { mode: 'timestamp_ms' }).notNull(),
    importedBy: text('imported_by')
      .notNull()
      .references(() => user.id, { onDelete: 'restrict' }),
  },
  (t) => [uniqueIndex('checklist_name_unique').on(t.campaignId, sql`lower(${t.scientificName})`)],
);

export const tags = sqliteTable(
  'tags',
  {
    id: id(),
    campaignId: text('campaign_id')
      .notNull()
      .references(() => campaigns.id, { onDelete: 'cascade' }),
    name: text('name').notNull(),
    retired: integer('retired', { mode: 'boolean' }).notNull().default(false),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('tag_name_unique').on(t.campaignId, sql`lower(${t.name})`)],
);

/**
 * Which tags an entry carries. Stored WITHOUT ROWID (migration 0013, which the schema builder
 * cannot express): a pair lives in its primary key's own B-tree, so tagging an entry writes that
 * B-tree and the tag index rather than a table, its key's index and the tag index.
 */
export const observationTags = sqliteTable(
  'observation_tags',
  {
    observationId: text('observation_id')
      .notNull()
      .references(() => observations.id, { onDelete: 'cascade' }),
    tagId: text('tag_id')
      .notNull()
      .references(() => tags.id, { onDelete: 'restrict' }),
  },
  (t) => [primaryKey({ columns: [t.observationId, t.tagId] }), index('observation_tag_tag_idx').on(t.tagId)],
);

/* ---- the observation's history and its specialist parts ---- */

/** Every earlier state of an observation, with who made the change and when. */
export const observationRevisions = sqliteTable(
  'observation_revisions',
  {
    id: id(),
    observationId: text('observation_id')
      .notNull()
      .references(() => observations.id, { onDelete: 'cascade' }),
    version: integer('version').notNull(),
    action: text('action').$type<'created' | 'updated' | 'retired' | 'restored'>().notNull(),
    /** The whole observation as it was after this change, as contract JSON. */
    snapshot: text('snapshot', { mode: 'json' }).notNull(),
    editedBy: text('edited_by')
      .notNull()
      .references(() => user.id, { onDelete: 'restrict' }),
    editedAt: integer('edited_at', { mode: 'timestamp_ms' }).notNull(),
  },
  (t) => [uniqueIndex('revision_version_unique').on(t.observationId, t.version, t.action)],
);

/** A biology entry's identification (Darwin Core: scientificName, taxonRank, identificationQualifier). */
export const identifications = sqliteTable('identifications', {
  observationId: text('observation_id')
    .primaryKey()
    .references(() => observations.id, { onDelete: 'cascade' }),
  scientificName: text('scientific_name').notNull(),
  taxonRank: text('taxon_rank').$type<(typeof taxonRanks)[number]>(),
  qualifier: text('qualifier').$type<(typeof identificationQualifiers)[number]>(),
  confidence: text('confidence').$type<(typeof identificationConfidences)[number]>(),
  taxonId: text('taxon_id'),
  verificationStatus: text('verification_status').$type<'unverified' | 'verified' | 'disputed'>().notNull().default('unverified'),
  verifiedBy: text('verified_by').references(() => user.id, { onDelete: 'restrict' }),
  verifiedAt: integer('verified_at', { mode: 'timestamp_ms' }),
  verificationNote: text('verification_note'),
  identifiedBy: text('identified_by')
    .notNull()
    .references(() => user.id, { onDelete: 'restrict' }),
  updatedAt: updatedAt(),
});

/** An archaeology entry's find, numbered uniquely within its campaign. */
export const finds = sqliteTable(
  'finds',
  {
    observationId: text('observation_id')
      .primaryKey()
      .references(() => observations.id, { onDelete: 'cascade' }),
    campaignId: text('campaign_id')
      .notNull()
      .references(() => campaigns.id, { onDelete: 'cascade' }),
    findNumber: text('find_number').notNull(),
    objectType: text('object_type'),
    material: text('material'),
    condition: text('condition'),
    state: text('state').$type<'in-situ' | 'recovered'>().notNull().default('in-situ'),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex('find_number_unique').on(t.campaignId, sql`lower(${t.findNumber})`)],
);

/** A biology or environment entry's sample: its number in the campaign's register and how it was taken and kept. */
export const samples = sqliteTable(
  'samples',
  {
    observationId: text('observation_id')
      .primaryKey()
      .references(() => observations.id, { onDelete: 'cascade' }),
    campaignId: text('campaign_id')
      .notNull()
      .references(() => campaigns.id, { onDelete: 'cascade' }),
    sampleNumber: text('sample_number').notNull(),
    sampleType: text('sample_type').$type<SampleType>().notNull(),
    gear: text('gear'),
    /** Where it was stowed on the vehicle (a container or slot). */
    container: text('container'),
    preservation: text('preservation'),
    /** A subsample's parent, by its number in the same campaign. */
    parentSampleNumber: text('parent_sample_number'),
    /** The lab that receives it. */
    lab: text('lab'),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex('sample_number_unique').on(t.campaignId, sql`lower(${t.sampleNumber})`)],
);

/** Who held a recovered find or a sample, since when, and where it was kept. */
export const custodyEvents = sqliteTable(
  'custody_events',
  {
    id: id(),
    observationId: text('observation_id')
      .notNull()
      .references(() => observations.id, { onDelete: 'cascade' }),
    holder: text('holder').notNull(),
    since: integer('since', { mode: 'timestamp_ms' }).notNull(),
    location: text('location').notNull(),
    container: text('container'),
    note: text('note'),
    recordedBy: text('recorded_by')
      .notNull()
      .references(() => user.id, { onDelete: 'restrict' }),
    createdAt: createdAt(),
  },
  (t) => [index('custody_observation_idx').on(t.observationId, t.since)],
);

/** One-tap presets that log an entry now with a kind and tags. */
export const quickMarks = sqliteTable(
  'quick_marks',
  {
    id: id(),
    campaignId: text('campaign_id')
      .notNull()
      .references(() => campaigns.id, { onDelete: 'cascade' }),
    label: text('label').notNull(),
    kind: text('kind').$type<ObservationKind>().notNull(),
    tags: text('tags', { mode: 'json' }).$type<string[]>().notNull().default([]),
    position: integer('position').notNull().default(0),
    retired: integer('retired', { mode: 'boolean' }).notNull().default(false),
    createdAt: createdAt(),
  },
  (t) => [index('quick_mark_campaign_idx').on(t.campaignId, t.position)],
);

/* ---- photos ---- */

export const photos = sqliteTable(
  'photos',
  {
    id: id(),
    observationId: text('observation_id')
      .notNull()
      .references(() => observations.id, { onDelete: 'restrict' }),
    campaignId: text('campaign_id')
      .notNull()
      .references(() => campaigns.id, { onDelete: 'restrict' }),
    /** SHA-256 of the file as uploaded, to spot the same frame grab sent twice. */
    sha256: text('sha256').notNull(),
    mime: text('mime').notNull(),
    width: integer('width').notNull(),
    height: integer('height').notNull(),
    bytes: integer('bytes').notNull(),
    /** Storage keys (generated names), never the uploaded file name. */
    originalKey: text('original_key').notNull(),
    displayKey: text('display_key').notNull(),
    thumbKey: text('thumb_key').notNull(),
    originalName: text('original_name'),
    caption: text('caption'),
    credit: text('credit'),
    capturedAt: integer('captured_at', { mode: 'timestamp_ms' }),
    lat: real('lat'),
    lon: real('lon'),
    position: integer('position').notNull().default(0),
    uploadedBy: text('uploaded_by')
      .notNull()
      .references(() => user.id, { onDelete: 'restrict' }),
    retired: integer('retired', { mode: 'boolean' }).notNull().default(false),
    createdAt: createdAt(),
  },
  (t) => [index('photo_observation_idx').on(t.observationId, t.position), index('photo_campaign_sha_idx').on(t.campaignId, t.sha256)],
);

/**
 * A length or area measured on a photo with the laser scale: the two laser dots and the points, in
 * the photo's original pixels, kept beside the value so a measurement can be drawn and checked again.
 */
export const photoMeasurements = sqliteTable(
  'photo_measurements',
  {
    id: id(),
    photoId: text('photo_id')
      .notNull()
      .references(() => photos.id, { onDelete: 'restrict' }),
    observationId: text('observation_id')
      .notNull()
      .references(() => observations.id, { onDelete: 'restrict' }),
    kind: text('kind').$type<'length' | 'area'>().notNull(),
    spacingCm: real('spacing_cm').notNull(),
    laser: text('laser', { mode: 'json' }).$type<[number, number][]>().notNull(),
    points: text('points', { mode: 'json' }).$type<[number, number][]>().notNull(),
    placementPx: real('placement_px').notNull(),
    value: real('value').notNull(),
    unit: text('unit').notNull(),
    uncertainty: real('uncertainty').notNull(),
    createdBy: text('created_by')
      .notNull()
      .references(() => user.id, { onDelete: 'restrict' }),
    createdAt: createdAt(),
    retired: integer('retired', { mode: 'boolean' }).notNull().default(false),
  },
  (t) => [index('photo_measurement_photo_idx').on(t.photoId), index('photo_measurement_observation_idx').on(t.observationId)],
);

/* ---- telemetry ---- */

/**
 * The vehicle's log, one row per sample; depth is stored in metres whatever the log gave. Stored
 * WITHOUT ROWID (migration 0012, which the schema builder cannot express): the rows live in the
 * key's own B-tree, so a log is written once rather than into a table and again into its key's
 * index, which is about 40 % fewer pages to write and to replicate ashore.
 */
export const telemetrySamples = sqliteTable(
  'telemetry_samples',
  {
    diveId: text('dive_id')
      .notNull()
      .references(() => dives.id, { onDelete: 'cascade' }),
    t: integer('t').notNull(),
    depth: real('depth'),
    pressure: real('pressure'),
    lat: real('lat'),
    lon: real('lon'),
    heading: real('heading'),
    altitude: real('altitude'),
    temperature: real('temperature'),
    salinity: real('salinity'),
  },
  (t) => [primaryKey({ columns: [t.diveId, t.t] })],
);

export const telemetryImports = sqliteTable(
  'telemetry_imports',
  {
    id: id(),
    diveId: text('dive_id')
      .notNull()
      .references(() => dives.id, { onDelete: 'cascade' }),
    fileName: text('file_name'),
    mode: text('mode').$type<'replace' | 'append'>().notNull(),
    rowsTaken: integer('rows_taken').notNull(),
    rowsRejected: integer('rows_rejected').notNull(),
    firstAt: integer('first_at', { mode: 'timestamp_ms' }),
    lastAt: integer('last_at', { mode: 'timestamp_ms' }),
    /** The import report (columns recognised, rejected lines with reasons) as contract JSON. */
    report: text('report', { mode: 'json' }).notNull(),
    importedBy: text('imported_by')
      .notNull()
      .references(() => user.id, { onDelete: 'restrict' }),
    importedAt: integer('imported_at', { mode: 'timestamp_ms' }).notNull(),
  },
  (t) => [index('telemetry_import_dive_idx').on(t.diveId, t.importedAt)],
);

/* ---- the team ---- */

export const invitations = sqliteTable(
  'invitations',
  {
    id: id(),
    campaignId: text('campaign_id')
      .notNull()
      .references(() => campaigns.id, { onDelete: 'cascade' }),
    email: text('email').notNull(),
    role: text('role').$type<CampaignRole>().notNull(),
    status: text('status').$type<'pending' | 'accepted' | 'expired' | 'revoked'>().notNull().default('pending'),
    invitedBy: text('invited_by')
      .notNull()
      .references(() => user.id, { onDelete: 'restrict' }),
    createdAt: createdAt(),
    expiresAt: integer('expires_at', { mode: 'timestamp_ms' }).notNull(),
    sentAt: integer('sent_at', { mode: 'timestamp_ms' }),
    acceptedAt: integer('accepted_at', { mode: 'timestamp_ms' }),
    acceptedBy: text('accepted_by').references(() => user.id, { onDelete: 'set null' }),
  },
  (t) => [index('invitation_campaign_idx').on(t.campaignId), index('invitation_email_idx').on(t.email)],
);

/** Mail caught by the built-in mail catcher when no SMTP_URL is set. */
export const caughtMail = sqliteTable('caught_mail', {
  id: id(),
  to: text('to').notNull(),
  from: text('from').notNull(),
  subject: text('subject').notNull(),
  text: text('text').notNull(),
  html: text('html').notNull(),
  headers: text('headers', { mode: 'json' }).$type<Record<string, string>>().notNull(),
  receivedAt: integer('received_at', { mode: 'timestamp_ms' }).notNull(),
});

/* ---- digests ---- */

export const subscriptions = sqliteTable(
  'subscriptions',
  {
    campaignId: text('campaign_id')
      .notNull()
      .references(() => campaigns.id, { onDelete: 'cascade' }),
    userId: text('user_id')
      .notNull()
      .references(() => user.id, { onDelete: 'cascade' }),
    frequency: text('frequency').$type<DigestFrequency>().notNull().default('off'),
    /** Which entries matter to this subscriber: kinds, tags, verified only. */
    filters: text('filters', { mode: 'json' }).$type<Record<string, unknown>>().notNull().default({}),
    /** The end of the window the last digest covered: the next one starts there. */
    lastDigestAt: integer('last_digest_at', { mode: 'timestamp_ms' }),
    /** Part of the signed unsubscribe link; a new one is drawn on unsubscribing, so a link works once. */
    unsubscribeNonce: text('unsubscribe_nonce'),
    /** The daily 07:00 (as an instant) whose digest was last composed, so a restart sends a missed one once. */
    dailyDoneFor: integer('daily_done_for', { mode: 'timestamp_ms' }),
    updatedAt: updatedAt(),
  },
  (t) => [primaryKey({ columns: [t.campaignId, t.userId] })],
);

export const digests = sqliteTable(
  'digests',
  {
    id: id(),
    campaignId: text('campaign_id')
      .notNull()
      .references(() => campaigns.id, { onDelete: 'cascade' }),
    userId: text('user_id')
      .notNull()
      .references(() => user.id, { onDelete: 'cascade' }),
    subject: text('subject').notNull(),
    observationCount: integer('observation_count').notNull(),
    since: integer('since', { mode: 'timestamp_ms' }),
    /** When the digest was composed and queued (its mail's own row says when it went out). */
    sentAt: integer('sent_at', { mode: 'timestamp_ms' }).notNull(),
    sentBy: text('sent_by').references(() => user.id, { onDelete: 'set null' }),
    /** The end of the window it covers (entries changed after `since`, up to this instant). */
    until: integer('until', { mode: 'timestamp_ms' }),
    trigger: text('trigger').$type<DigestTrigger>(),
    diveId: text('dive_id').references(() => dives.id, { onDelete: 'set null' }),
    mailId: text('mail_id'),
  },
  (t) => [index('digest_campaign_idx').on(t.campaignId, t.sentAt)],
);

/**
 * Every mail the server sends, written in the same transaction as the change that causes it and
 * sent afterwards by the mail sender, with retries.
 */
export const mailQueue = sqliteTable(
  'mail_queue',
  {
    id: id(),
    kind: text('kind').$type<MailKind>().notNull(),
    /** The invitation or digest the mail belongs to. */
    ref: text('ref'),
    campaignId: text('campaign_id').references(() => campaigns.id, { onDelete: 'cascade' }),
    to: text('to').notNull(),
    toName: text('to_name'),
    subject: text('subject').notNull(),
    /** What the sender needs: the rendered parts and extra headers, or the values an invitation's link is added to. */
    payload: text('payload', { mode: 'json' }).$type<Record<string, unknown>>().notNull(),
    state: text('state').$type<MailState>().notNull().default('queued'),
    attempts: integer('attempts').notNull().default(0),
    nextAttemptAt: integer('next_attempt_at', { mode: 'timestamp_ms' }),
    lastError: text('last_error'),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
    sentAt: integer('sent_at', { mode: 'timestamp_ms' }),
  },
  (t) => [index('mail_queue_due_idx').on(t.state, t.nextAttemptAt), index('mail_queue_ref_idx').on(t.ref)],
);

/* ---- live events and the audit trail ---- */

/** Every change a dive's live readers are told about, kept so a reconnect can replay what it missed. */
export const liveEvents = sqliteTable(
  'live_events',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    campaignId: text('campaign_id').notNull(),
    diveId: text('dive_id').notNull(),
    type: text('type').notNull(),
    payload: text('payload', { mode: 'json' }).notNull(),
    at: integer('at', { mode: 'timestamp_ms' }).notNull(),
  },
  (t) => [index('live_event_dive_idx').on(t.diveId, t.id)],
);

export const auditLog = sqliteTable(
  'audit_log',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    campaignId: text('campaign_id'),
    actorId: text('actor_id'),
    action: text('action').notNull(),
    target: text('target'),
    detail: text('detail', { mode: 'json' }),
    at: integer('at', { mode: 'timestamp_ms' }).notNull(),
  },
  (t) => [index('audit_campaign_idx').on(t.campaignId, t.at)],
);

/* ---- watches and their handover ---- */

/** A campaign's watch plan as a whole: whether each handover note is mailed to the incoming watch. */
export const watchPlans = sqliteTable('watch_plans', {
  campaignId: text('campaign_id')
    .primaryKey()
    .references(() => campaigns.id, { onDelete: 'cascade' }),
  mailHandovers: integer('mail_handovers', { mode: 'boolean' }).notNull().default(false),
  updatedBy: text('updated_by').references(() => user.id, { onDelete: 'set null' }),
  updatedAt: updatedAt(),
});

/** One watch of a plan: local times in the campaign's display zone ("HH:mm"), repeating daily (lib/watches.ts). */
export const watches = sqliteTable(
  'watches',
  {
    id: id(),
    campaignId: text('campaign_id')
      .notNull()
      .references(() => campaigns.id, { onDelete: 'cascade' }),
    name: text('name').notNull(),
    start: text('start').notNull(),
    end: text('end').notNull(),
    position: integer('position').notNull().default(0),
  },
  (t) => [index('watch_campaign_idx').on(t.campaignId)],
);

/** Who stands a watch. */
export const watchMembers = sqliteTable(
  'watch_members',
  {
    watchId: text('watch_id')
      .notNull()
      .references(() => watches.id, { onDelete: 'cascade' }),
    userId: text('user_id')
      .notNull()
      .references(() => user.id, { onDelete: 'cascade' }),
  },
  (t) => [primaryKey({ columns: [t.watchId, t.userId] }), index('watch_member_user_idx').on(t.userId)],
);

/**
 * The note written at a change of watch, one per campaign per change. The watches are kept by name
 * and with who stood them then, so the note stays true after the plan changes.
 */
export const handovers = sqliteTable(
  'handovers',
  {
    id: id(),
    campaignId: text('campaign_id')
      .notNull()
      .references(() => campaigns.id, { onDelete: 'cascade' }),
    /** The dive under way at the change, if any. */
    diveId: text('dive_id').references(() => dives.id, { onDelete: 'set null' }),
    changeAt: integer('change_at', { mode: 'timestamp_ms' }).notNull(),
    /** `{ name, start, end, members: [{ id, name }] }` or null where the plan leaves a gap. */
    outgoing: text('outgoing', { mode: 'json' }).$type<Record<string, unknown> | null>(),
    incoming: text('incoming', { mode: 'json' }).$type<Record<string, unknown> | null>(),
    /** Entries logged during the outgoing watch by kind, open items, the dive's phase and depth: contract JSON. */
    content: text('content', { mode: 'json' }).$type<Record<string, unknown>>().notNull(),
    acknowledgedBy: text('acknowledged_by').references(() => user.id, { onDelete: 'set null' }),
    acknowledgedAt: integer('acknowledged_at', { mode: 'timestamp_ms' }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('handover_change_unique').on(t.campaignId, t.changeAt)],
);
