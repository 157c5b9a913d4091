/**
 * The observation filters every reader shares (the dive log, search, digests, exports), and the
 * cursor codec of paged lists. A filter is SQL over `observations`, so it composes with any query.
 */
import { eq, gte, inArray, lte, sql, type SQL } from 'drizzle-orm';
import { z } from 'zod';

import { identifications, observations, observationTags, photos, tags } from '../../../db/schema';
import type { ObservationFilterQuery, ObservationKind, VerificationStatus } from '../../../lib/schemas';
import { fieldError } from '../../errors';

export type ObservationFilters = {
  /** Only these campaigns; an empty list matches nothing. */
  campaignIds?: readonly string[];
  diveId?: string;
  kinds?: readonly ObservationKind[];
  /** Entries carrying every one of these tags (names, any case). */
  tags?: readonly string[];
  /** Entries carrying at least one of these tags. */
  anyTags?: readonly string[];
  author?: string;
  hasPhotos?: boolean;
  verification?: VerificationStatus;
  minDepth?: number;
  maxDepth?: number;
  from?: Date;
  to?: Date;
  /** Changed (created or edited) at or after this instant. */
  changedSince?: Date;
  /** false (the default): live entries only; true: retired only; 'any': both. */
  retired?: boolean | 'any';
};

const hasTag = (name: string) =>
  sql`exists (select 1 from ${observationTags} ot join ${tags} t on t.id = ot.tag_id
    where ot.observation_id = ${observations.id} and lower(t.name) = lower(${name}))`;

/** The conditions for a set of filters, to be joined with `and(...)`. */
export function observationFilters(f: ObservationFilters): SQL[] {
  const out: SQL[] = [];
  if (f.retired !== 'any') out.push(eq(observations.retired, f.retired ?? false));
  if (f.campaignIds) out.push(f.campaignIds.length > 0 ? inArray(observations.campaignId, [...f.campaignIds]) : sql`0`);
  if (f.diveId) out.push(eq(observations.diveId, f.diveId));
  if (f.kinds && f.kinds.length > 0) out.push(inArray(observations.kind, [...f.kinds]));
  for (const name of f.tags ?? []) out.push(hasTag(name));
  if (f.anyTags && f.anyTags.length > 0) {
    out.push(
      sql`exists (select 1 from ${observationTags} ot join ${tags} t on t.id = ot.tag_id
        where ot.observation_id = ${observations.id} and lower(t.name) in (${sql.join(
          f.anyTags.map((n) => sql`${n.toLowerCase()}`),
          sql`, `,
        )}))`,
    );
  }
  if (f.author) out.push(eq(observations.authorId, f.author));
  if (f.hasPhotos !== undefined) {
    const has = sql`exists (select 1 from ${photos} p where p.observation_id = ${observations.id} and p.retired = 0)`;
    out.push(f.hasPhotos ? has : sql`not ${has}`);
  }
  if (f.verification) {
    out.push(
      sql`exists (select 1 from ${identifications} i where i.observation_id = ${observations.id} and i.verification_status = ${f.verification})`,
    );
  }
  if (f.minDepth !== undefined) out.push(gte(observations.depth, f.minDepth));
  if (f.maxDepth !== undefined) out.push(lte(observations.depth, f.maxDepth));
  if (f.from) out.push(gte(observations.observedAt, f.from));
  if (f.to) out.push(lte(observations.observedAt, f.to));
  if (f.changedSince) out.push(gte(observations.updatedAt, f.changedSince));
  return out;
}

/** The filters a query string carries (the contract's `observationFilterQuerySchema`, parsed). */
export function filtersFromQuery(q: ObservationFilterQuery): ObservationFilters {
  return {
    ...(q.kind ? { kinds: [q.kind] } : {}),
    ...(q.tag ? { tags: [q.tag] } : {}),
    ...(q.author ? { author: q.author } : {}),
    ...(q.hasPhotos ? { hasPhotos: q.hasPhotos === 'true' } : {}),
    ...(q.verification ? { verification: q.verification } : {}),
    ...(q.minDepth !== undefined ? { minDepth: q.minDepth } : {}),
    ...(q.maxDepth !== undefined ? { maxDepth: q.maxDepth } : {}),
    ...(q.from ? { from: new Date(q.from) } : {}),
    ...(q.to ? { to: new Date(q.to) } : {}),
  };
}

/* ---- cursors ---- */

/** A page's cursor: opaque to clients, a small JSON value underneath. */
export const cursorCodec = {
  encode: (value: unknown) => Buffer.from(JSON.stringify(value)).toString('base64url'),
  decode<S extends z.ZodType>(schema: S, cursor: string): z.output<S> {
    let parsed: unknown;
    try {
      parsed = JSON.parse(Buffer.from(cursor, 'base64url').toString('utf8'));
    } catch {
      parsed = undefined;
    }
    const result = schema.safeParse(parsed);
    if (!result.success) throw fieldError('cursor', 'Use the nextCursor of an earlier page', 'The cursor is not valid.');
    return result.data;
  },
};

/** Keyset position in a time-ordered list: (observedAt, id). */
export const timeCursorSchema = z.object({ t: z.number().int(), id: z.string().min(1) });
/** Position in a list ordered by anything else. */
export const offsetCursorSchema = z.object({ o: z.number().int().min(0) });
