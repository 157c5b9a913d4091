/** The campaign's watch plan and the handover notes written at each change of watch. */
import { Router, type RequestHandler } from 'express';

import { handoverQuerySchema, watchPlanUpdateSchema } from '../../lib/schemas';
import type { AppContext } from '../context';
import { accessOf, byCampaign, requireCampaignRole, requirePermission, type CampaignResolver } from '../middleware/campaign-access';
import { requireSession } from '../middleware/session';
import { validate } from '../middleware/validate';
import { acknowledgeHandover, handoverCampaign, listHandovers, mailHandover } from '../services/handovers';
import { loadPlan, setWatchPlan, toWatchPlan } from '../services/watches';

export function watchRoutes(ctx: AppContext): Router {
  const { db, auth } = ctx;
  const r = Router();
  const signedIn = requireSession(auth);
  const member = (resolve: CampaignResolver): RequestHandler[] => [signedIn, requireCampaignRole(db, resolve)];
  const byHandover: CampaignResolver = (d, req) => handoverCampaign(d, req.params.handoverId as string);
  const planBody = validate(watchPlanUpdateSchema);
  const handoverQuery = validate(handoverQuerySchema, 'query');

  r.get('/campaigns/:campaignId/watches', ...member(byCampaign), (req, res) => {
    res.json(toWatchPlan(loadPlan(db, accessOf(req).campaignId), new Date()));
  });

  // Setting the watch plan is part of running the campaign, which the permission table gives to leads.
  r.put('/campaigns/:campaignId/watches', signedIn, requirePermission(db, byCampaign, 'campaign.edit'), planBody, (req, res) => {
    const { campaignId, userId } = accessOf(req);
    res.json(toWatchPlan(setWatchPlan(db, campaignId, userId, planBody.of(req)), new Date()));
  });

  r.get('/campaigns/:campaignId/handovers', ...member(byCampaign), handoverQuery, (req, res) => {
    res.json({ items: listHandovers(db, accessOf(req).campaignId, handoverQuery.of(req)) });
  });

  r.post(
    '/handovers/:handoverId/acknowledge',
    signedIn,
    requireCampaignRole(db, byHandover, ['lead', 'scientist', 'pilot', 'guest'], 'acknowledge a handover'),
    (req, res) => {
      const { userId, role } = accessOf(req);
      res.json(acknowledgeHandover(db, ctx.live, req.params.handoverId as string, userId, role));
    },
  );

  r.post('/handovers/:handoverId/mail', signedIn, requirePermission(db, byHandover, 'campaign.edit'), (req, res) => {
    const sent = mailHandover(db, ctx.env.PUBLIC_URL, req.params.handoverId as string);
    if (sent.queued > 0) ctx.mail.kick();
    res.status(202).json(sent);
  });

  return r;
}
