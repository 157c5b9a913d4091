import { and, asc, count, eq, inArray } from 'drizzle-orm';

import type { Db } from '../../db/client';
import { campaigns, dives, memberships, observations, tags, user } from '../../db/schema';
import type { Campaign, Me, Member, Tag } from '../../lib/schemas';
import type { AccessRole } from '../middleware/campaign-access';
import type { SessionUser } from '../middleware/session';

type CampaignRow = typeof campaigns.$inferSelect;

export function me(db: Db, sessionUser: SessionUser): Me {
  const rows = db
    .select({ campaignId: memberships.campaignId, role: memberships.role })
    .from(memberships)
    .where(eq(memberships.userId, sessionUser.id))
    .all();
  return {
    user: { id: sessionUser.id, name: sessionUser.name, email: sessionUser.email },
    siteRole: sessionUser.siteRole,
    memberships: rows,
    hasPassword: hasPassword(db, sessionUser.id),
  };
}

/** Whether the account signs in with a password (better-auth keeps it on the credential account). */
export function hasPassword(db: Db, userId: string): boolean {
  return !!db.$client
    .prepare("select 1 from account where user_id = ? and provider_id = 'credential' and password is not null")
    .get(userId);
}

function countsBy(db: Db, table: typeof dives | typeof observations, ids: string[]) {
  if (ids.length === 0) return new Map<string, number>();
  const base = db.select({ id: table.campaignId, n: count() }).from(table);
  const rows =
    table === observations
      ? base
          .where(and(inArray(table.campaignId, ids), eq(observations.retired, false)))
          .groupBy(table.campaignId)
          .all()
      : base.where(inArray(table.campaignId, ids)).groupBy(table.campaignId).all();
  return new Map(rows.map((r) => [r.id, r.n]));
}

function toCampaigns(db: Db, rows: { campaign: CampaignRow; role: AccessRole }[]): Campaign[] {
  const ids = rows.map((r) => r.campaign.id);
  const diveCounts = countsBy(db, dives, ids);
  const obsCounts = countsBy(db, observations, ids);
  return rows.map(({ campaign: c, role }) => ({
    id: c.id,
    name: c.name,
    siteName: c.siteName,
    datumLat: c.datumLat,
    datumLon: c.datumLon,
    permitRef: c.permitRef,
    vessel: c.vessel,
    vehicle: c.vehicle,
    startDate: c.startDate,
    endDate: c.endDate,
    timeZone: c.timeZone,
    allowFreeTags: c.allowFreeTags,
    keepPhotoPositions: c.keepPhotoPositions,
    exportLicence: c.exportLicence,
    publicPositions: c.publicPositions,
    myRole: role,
    diveCount: diveCounts.get(c.id) ?? 0,
    observationCount: obsCounts.get(c.id) ?? 0,
    createdAt: c.createdAt.toISOString(),
    updatedAt: c.updatedAt.toISOString(),
  }));
}

/** The campaigns a user belongs to, newest first; a site administrator sees them all. */
export function listCampaigns(db: Db, sessionUser: SessionUser): Campaign[] {
  const mine = db
    .select({ campaign: campaigns, role: memberships.role })
    .from(memberships)
    .innerJoin(campaigns, eq(campaigns.id, memberships.campaignId))
    .where(eq(memberships.userId, sessionUser.id))
    .all();
  const rows: { campaign: CampaignRow; role: AccessRole }[] = mine;
  if (sessionUser.siteRole === 'admin') {
    const seen = new Set(mine.map((r) => r.campaign.id));
    for (const c of db.select().from(campaigns).all()) if (!seen.has(c.id)) rows.push({ campaign: c, role: 'admin' });
  }
  return toCampaigns(db, rows).sort((a, b) => (b.startDate ?? '').localeCompare(a.startDate ?? ''));
}

export function getCampaign(db: Db, campaignId: string, role: AccessRole): Campaign | undefined {
  const c = db.select().from(campaigns).where(eq(campaigns.id, campaignId)).get();
  return c ? toCampaigns(db, [{ campaign: c, role }])[0] : undefined;
}

export function listMembers(db: Db, campaignId: string): Member[] {
  return db
    .select({ userId: user.id, name: user.name, email: user.email, role: memberships.role, joinedAt: memberships.createdAt })
    .from(memberships)
    .innerJoin(user, eq(user.id, memberships.userId))
    .where(eq(memberships.campaignId, campaignId))
    .orderBy(asc(user.name))
    .all()
    .map((m) => ({ ...m, joinedAt: m.joinedAt.toISOString() }));
}

export function listTags(db: Db, campaignId: string): Tag[] {
  const rows = db.select().from(tags).where(eq(tags.campaignId, campaignId)).orderBy(asc(tags.name)).all();
  const usage = new Map(
    db.$client
      .prepare(
        `select ot.tag_id as id, count(*) as n from observation_tags ot
         join observations o on o.id = ot.observation_id
         where o.campaign_id = ? and o.retired = 0 group by ot.tag_id`,
      )
      .all(campaignId)
      .map((r) => {
        const row = r as { id: string; n: number };
        return [row.id, row.n] as const;
      }),
  );
  return rows.map((t) => ({ id: t.id, name: t.name, retired: t.retired, usage: usage.get(t.id) ?? 0 }));
}
