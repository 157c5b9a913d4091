import { Router, type RequestHandler } from 'express';

import type { AppContext } from '../context';
import { notFound } from '../errors';
import { accessOf, byCampaign, requireCampaignRole } from '../middleware/campaign-access';
import { requireSession, userOf } from '../middleware/session';
import { getCampaign, listCampaigns, listDives, listMembers, listTags, me } from '../services/campaigns';

export function campaignRoutes({ db, auth }: AppContext): Router {
  const r = Router();
  const signedIn = requireSession(auth);
  const member: RequestHandler[] = [signedIn, requireCampaignRole(db, byCampaign)];

  r.get('/me', signedIn, (req, res) => {
    res.json(me(db, userOf(req)));
  });

  r.get('/campaigns', signedIn, (req, res) => {
    res.json(listCampaigns(db, userOf(req)));
  });

  r.get('/campaigns/:campaignId', ...member, (req, res) => {
    const { campaignId, role } = accessOf(req);
    const campaign = getCampaign(db, campaignId, role);
    if (!campaign) throw notFound();
    res.json(campaign);
  });

  r.get('/campaigns/:campaignId/members', ...member, (req, res) => {
    res.json(listMembers(db, accessOf(req).campaignId));
  });

  r.get('/campaigns/:campaignId/tags', ...member, (req, res) => {
    res.json(listTags(db, accessOf(req).campaignId));
  });

  r.get('/campaigns/:campaignId/dives', ...member, (req, res) => {
    res.json(listDives(db, accessOf(req).campaignId));
  });

  return r;
}
