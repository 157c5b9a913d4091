import { and, eq } from 'drizzle-orm';
import { Router } from 'express';

import { dives } from '../../db/schema';
import { digestSendSchema, subscriptionUpdateSchema, type DigestSendResult } from '../../lib/schemas';
import type { AppContext } from '../context';
import { notFound } from '../errors';
import { accessOf, byCampaign, requireCampaignRole } from '../middleware/campaign-access';
import { requireSession, userOf } from '../middleware/session';
import { getSubscription, listDigests, putSubscription, queueDigests, unsubscribe } from '../services/digests';

const memberRoles = ['lead', 'scientist', 'pilot', 'guest'] as const;

/** A member's digest subscription, and the lead's digest log and "send now". */
export function digestRoutes(ctx: AppContext): Router {
  const { db, auth } = ctx;
  const r = Router();
  const signedIn = requireSession(auth);
  const member = requireCampaignRole(db, byCampaign, memberRoles, 'have a digest subscription (only members do)');
  const lead = requireCampaignRole(db, byCampaign, ['lead'], 'send digests or read their log');

  r.get('/campaigns/:campaignId/subscription', signedIn, member, (req, res) => {
    res.json(getSubscription(db, accessOf(req).campaignId, userOf(req).id));
  });

  r.put('/campaigns/:campaignId/subscription', signedIn, member, (req, res) => {
    const input = subscriptionUpdateSchema.parse(req.body);
    res.json(putSubscription(db, accessOf(req).campaignId, userOf(req).id, input));
  });

  r.get('/campaigns/:campaignId/digests', signedIn, lead, (req, res) => {
    res.json(listDigests(db, accessOf(req).campaignId));
  });

  // Send now: every subscriber whose digest is not off gets what is new for them (of one dive, if named).
  r.post('/campaigns/:campaignId/digests', signedIn, lead, (req, res) => {
    const { campaignId } = accessOf(req);
    const { diveId } = digestSendSchema.parse(req.body ?? {});
    if (
      diveId &&
      !db
        .select({ id: dives.id })
        .from(dives)
        .where(and(eq(dives.id, diveId), eq(dives.campaignId, campaignId)))
        .get()
    ) {
      throw notFound('No such dive in this campaign.');
    }
    const { digestIds, nothingNew } = db.transaction((tx) =>
      queueDigests(tx, { publicUrl: ctx.env.PUBLIC_URL, secret: ctx.env.AUTH_SECRET }, campaignId, {
        trigger: 'manual',
        ...(diveId ? { diveId } : {}),
        sentBy: userOf(req).id,
      }),
    );
    ctx.mail.kick();
    const queued = listDigests(db, campaignId, digestIds);
    const body: DigestSendResult = { queued, nothingNew };
    res.status(201).json(body);
  });

  return r;
}

/**
 * RFC 8058 one-click unsubscribe: a POST with the signed link, no sign-in, answered 200 (never a
 * redirect). Mounted before the same-origin check, since the mail provider posts it from its own
 * servers; the signature is what authorises it. A GET finds no route: following the link never
 * unsubscribes anyone.
 */
export function unsubscribeRoutes(ctx: AppContext): Router {
  const r = Router();
  r.post('/unsubscribe/:token', (req, res) => {
    const { campaignName } = unsubscribe(ctx.db, ctx.env.AUTH_SECRET, req.params.token);
    res.json({ unsubscribed: true, campaignName, message: `You will get no more digests of ${campaignName}.` });
  });
  return r;
}
