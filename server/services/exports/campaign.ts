import { and, asc, count, countDistinct, eq, isNotNull, max, min, type SQL } from 'drizzle-orm';

import type { Db } from '../../../db/client';
import { campaigns, memberships, observations, user } from '../../../db/schema';
import { notFound } from '../../errors';

export type ExportCampaign = typeof campaigns.$inferSelect & {
  lead: { name: string; email: string } | null;
  people: { name: string; role: string }[];
};

/** The campaign with its first lead (creator and contact of published data) and its people. */
export function exportCampaign(db: Db, campaignId: string): ExportCampaign {
  const campaign = db.select().from(campaigns).where(eq(campaigns.id, campaignId)).get();
  if (!campaign) throw notFound();
  const people = db
    .select({ name: user.name, email: user.email, role: memberships.role })
    .from(memberships)
    .innerJoin(user, eq(user.id, memberships.userId))
    .where(eq(memberships.campaignId, campaignId))
    .orderBy(asc(memberships.createdAt), asc(user.name))
    .all();
  const lead = people.find((p) => p.role === 'lead');
  return {
    ...campaign,
    lead: lead ? { name: lead.name, email: lead.email } : null,
    people: people.map((p) => ({ name: p.name, role: p.role })),
  };
}

export type Extent = {
  rows: number;
  dives: number;
  withPosition: number;
  firstAt: Date | null;
  lastAt: Date | null;
  minDepth: number | null;
  maxDepth: number | null;
  box: { south: number; north: number; west: number; east: number } | null;
};

/** Counts, time span, depth range and bounding box of the entries matching `conditions`, in one query each. */
export function extentOf(db: Db, conditions: SQL[]): Extent {
  const all = db
    .select({
      rows: count(),
      dives: countDistinct(observations.diveId),
      firstAt: min(observations.observedAt),
      lastAt: max(observations.observedAt),
      minDepth: min(observations.depth),
      maxDepth: max(observations.depth),
    })
    .from(observations)
    .where(and(...conditions))
    .get();
  const placed = db
    .select({
      n: count(),
      south: min(observations.lat),
      north: max(observations.lat),
      west: min(observations.lon),
      east: max(observations.lon),
    })
    .from(observations)
    .where(and(...conditions, isNotNull(observations.lat), isNotNull(observations.lon)))
    .get();
  return {
    rows: all?.rows ?? 0,
    dives: all?.dives ?? 0,
    withPosition: placed?.n ?? 0,
    firstAt: all?.firstAt ?? null,
    lastAt: all?.lastAt ?? null,
    minDepth: all?.minDepth ?? null,
    maxDepth: all?.maxDepth ?? null,
    box:
      placed && placed.n > 0 && placed.south !== null && placed.north !== null && placed.west !== null && placed.east !== null
        ? { south: placed.south, north: placed.north, west: placed.west, east: placed.east }
        : null,
  };
}
