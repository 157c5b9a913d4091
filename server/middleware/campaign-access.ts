import { and, eq, sql } from 'drizzle-orm';
import type { Request, RequestHandler } from 'express';

import type { Db, Executor } from '../../db/client';
import { preparedOn } from '../../db/prepared';
import { campaigns, dives, memberships, observations } from '../../db/schema';
import { refusal, rolesFor, roleWithArticle, type AccessRole, type Action, type Facts } from '../../lib/permissions';
import { forbidden, notFound } from '../errors';
import { userOf } from './session';

export type { AccessRole };
export type CampaignAccess = { campaignId: string; role: AccessRole; userId: string };

declare module 'express-serve-static-core' {
  interface Request {
    access?: CampaignAccess;
  }
}

/** How a route's path leads to its campaign. */
export type CampaignResolver = (db: Db, req: Request) => string | undefined;

const param = (req: Request, name: string): string | undefined => {
  const v = req.params[name];
  return typeof v === 'string' ? v : undefined;
};

// Every request that touches a campaign asks one of these: built once per connection.
const campaignQuery = (db: Executor) =>
  db
    .select({ c: campaigns.id })
    .from(campaigns)
    .where(eq(campaigns.id, sql.placeholder('id')))
    .prepare();
const diveCampaignQuery = (db: Executor) =>
  db
    .select({ c: dives.campaignId })
    .from(dives)
    .where(eq(dives.id, sql.placeholder('id')))
    .prepare();
const entryCampaignQuery = (db: Executor) =>
  db
    .select({ c: observations.campaignId })
    .from(observations)
    .where(eq(observations.id, sql.placeholder('id')))
    .prepare();

export const byCampaign: CampaignResolver = (db, req) => {
  const id = param(req, 'campaignId');
  return id ? preparedOn(db, campaignQuery).get({ id })?.c : undefined;
};

export const byDive: CampaignResolver = (db, req) => {
  const id = param(req, 'diveId');
  return id ? preparedOn(db, diveCampaignQuery).get({ id })?.c : undefined;
};

export const byObservation: CampaignResolver = (db, req) => {
  const id = param(req, 'id');
  return id ? preparedOn(db, entryCampaignQuery).get({ id })?.c : undefined;
};

const roleQuery = (db: Executor) =>
  db
    .select({ role: memberships.role })
    .from(memberships)
    .where(and(eq(memberships.campaignId, sql.placeholder('campaignId')), eq(memberships.userId, sql.placeholder('userId'))))
    .prepare();

/** The caller's role in a campaign; asked on every request. */
export function roleIn(db: Db, campaignId: string, user: { id: string; siteRole: string }): AccessRole | undefined {
  const role = preparedOn(db, roleQuery).get({ campaignId, userId: user.id })?.role;
  if (role) return role;
  return user.siteRole === 'admin' ? 'admin' : undefined;
}

/**
 * Resolves the campaign a request touches and the caller's role in it. A caller who is not a
 * member gets the same 404 as for something that does not exist, so a campaign never reveals
 * itself to outsiders. With `allowed`, other members get a 403 that names their role.
 */
export function requireCampaignRole(
  db: Db,
  resolve: CampaignResolver,
  allowed?: readonly AccessRole[],
  action = 'do this',
): RequestHandler {
  return (req, _res, next) => {
    const user = userOf(req);
    const campaignId = resolve(db, req);
    const role = campaignId ? roleIn(db, campaignId, user) : undefined;
    if (!campaignId || !role) throw notFound();
    if (allowed && !allowed.includes(role)) {
      throw forbidden(`As ${roleWithArticle[role]} of this campaign you may not ${action}.`);
    }
    req.access = { campaignId, role, userId: user.id };
    next();
  };
}

export function accessOf(req: Request): CampaignAccess {
  if (!req.access) throw notFound();
  return req.access;
}

/** `requireCampaignRole` with the roles and the refusal of an action in the permission table. */
export function requirePermission(db: Db, resolve: CampaignResolver, action: Action): RequestHandler {
  const allowed = rolesFor(action);
  return (req, _res, next) => {
    const user = userOf(req);
    const campaignId = resolve(db, req);
    const role = campaignId ? roleIn(db, campaignId, user) : undefined;
    if (!campaignId || !role) throw notFound();
    if (!allowed.includes(role)) throw forbidden(refusal(role, action)!);
    req.access = { campaignId, role, userId: user.id };
    next();
  };
}

/** Refuses with 403 and the table's reason when the caller may not do `action` given the facts. */
export function assertCan(role: AccessRole, action: Action, facts: Facts = {}): void {
  const why = refusal(role, action, facts);
  if (why) throw forbidden(why);
}

/**
 * The campaigns a person may read at this moment: those they are a member of, or every campaign
 * for the site administrator. Asked per request, never cached, so a removed member stops seeing
 * a campaign on their next request.
 */
export function memberCampaignIds(db: Db, user: { id: string; siteRole: string }): string[] {
  if (user.siteRole === 'admin')
    return db
      .select({ id: campaigns.id })
      .from(campaigns)
      .all()
      .map((c) => c.id);
  return db
    .select({ id: memberships.campaignId })
    .from(memberships)
    .where(eq(memberships.userId, user.id))
    .all()
    .map((m) => m.id);
}
