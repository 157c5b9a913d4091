import { sql } from 'drizzle-orm';
import { index, integer, primaryKey, real, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';

import type { CampaignRole, DepthSource, ObservationKind } from '../lib/schemas';

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
    authorId: text('author_id')
      .notNull()
      .references(() => user.id, { onDelete: 'restrict' }),
    version: integer('version').notNull().default(1),
    retired: integer('retired', { mode: 'boolean' }).notNull().default(false),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [
    index('observation_dive_time_idx').on(t.diveId, t.observedAt),
    index('observation_campaign_idx').on(t.campaignId),
    index('observation_author_idx').on(t.authorId),
  ],
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
