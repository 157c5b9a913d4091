import { fromNodeHeaders } from 'better-auth/node';
import { Router, type RequestHandler } from 'express';

import {
  campaignCreateSchema,
  campaignUpdateSchema,
  passwordSetSchema,
  quickMarkInputSchema,
  tagCreateSchema,
  tagUpdateSchema,
} from '../../lib/schemas';
import type { AppContext } from '../context';
import { conflict, forbidden, notFound } from '../errors';
import { accessOf, byCampaign, requireCampaignRole, requirePermission, type CampaignResolver } from '../middleware/campaign-access';
import { requireSession, userOf } from '../middleware/session';
import { validate } from '../middleware/validate';
import { getCampaign, hasPassword, listCampaigns, listMembers, listTags, me } from '../services/campaigns';
import { listDives } from '../services/dives';
import { nextFindNumber } from '../services/record';
import { createCampaign, updateCampaign } from '../services/team';
import {
  createQuickMark,
  createTag,
  listQuickMarks,
  quickMarkCampaign,
  retireQuickMark,
  tagCampaign,
  updateQuickMark,
  updateTag,
} from '../services/vocabulary';

export function campaignRoutes(ctx: AppContext): Router {
  const { db, auth } = ctx;
  const r = Router();
  const signedIn = requireSession(auth);
  const member: RequestHandler[] = [signedIn, requireCampaignRole(db, byCampaign)];
  const siteAdmin: RequestHandler = (req, _res, next) => {
    if (userOf(req).siteRole !== 'admin') throw forbidden('Only the site administrator may do this.');
    next();
  };
  const newCampaign = validate(campaignCreateSchema);
  const campaignChange = validate(campaignUpdateSchema);

  r.get('/me', signedIn, (req, res) => {
    res.json(me(db, userOf(req)));
  });

  // A person who joined by an invitation link has no password to give as the current one:
  // they set a first one here (better-auth's own server-side password setting).
  const firstPassword = validate(passwordSetSchema);
  r.post('/me/password', signedIn, firstPassword, async (req, res) => {
    if (hasPassword(db, userOf(req).id)) {
      throw conflict('password_exists', 'This account already has a password: change it with the current one.');
    }
    await auth.api.setPassword({ body: firstPassword.of(req), headers: fromNodeHeaders(req.headers) });
    res.status(204).end();
  });

  r.get('/campaigns', signedIn, (req, res) => {
    res.json(listCampaigns(db, userOf(req)));
  });

  // The site administrator creates a campaign and names its first lead, whose invitation mail is
  // queued with it (`leadInvitation.mail` says where it is).
  r.post('/campaigns', signedIn, siteAdmin, newCampaign, (req, res) => {
    const { campaignId, leadInvitation } = createCampaign(ctx, { id: userOf(req).id, name: userOf(req).name }, newCampaign.of(req));
    res
      .status(201)
      .location(`/api/campaigns/${campaignId}`)
      .json({ ...getCampaign(db, campaignId, 'admin')!, leadInvited: !!leadInvitation, leadInvitation });
  });

  r.patch('/campaigns/:campaignId', signedIn, requirePermission(db, byCampaign, 'campaign.edit'), campaignChange, (req, res) => {
    const { campaignId, role } = accessOf(req);
    updateCampaign(ctx, campaignId, userOf(req).id, campaignChange.of(req));
    res.json(getCampaign(db, campaignId, role));
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

  const lead = (resolve: CampaignResolver, action: string): RequestHandler[] => [
    signedIn,
    requireCampaignRole(db, resolve, ['lead'], action),
  ];
  const newTag = validate(tagCreateSchema);
  const tagChange = validate(tagUpdateSchema);
  const newQuickMark = validate(quickMarkInputSchema);
  const quickMarkChange = validate(quickMarkInputSchema.partial());
  const byTag: CampaignResolver = (d, req) => tagCampaign(d, req.params.tagId as string);
  const byQuickMark: CampaignResolver = (d, req) => quickMarkCampaign(d, req.params.quickMarkId as string);

  r.post('/campaigns/:campaignId/tags', ...lead(byCampaign, 'change the tag vocabulary'), newTag, (req, res) => {
    res.status(201).json(createTag(db, accessOf(req).campaignId, accessOf(req).userId, newTag.of(req)));
  });

  r.patch('/tags/:tagId', ...lead(byTag, 'change the tag vocabulary'), tagChange, (req, res) => {
    res.json(updateTag(db, req.params.tagId as string, accessOf(req).userId, tagChange.of(req)));
  });

  r.get('/campaigns/:campaignId/quick-marks', ...member, (req, res) => {
    res.json(listQuickMarks(db, accessOf(req).campaignId));
  });

  r.post('/campaigns/:campaignId/quick-marks', ...lead(byCampaign, 'define quick marks'), newQuickMark, (req, res) => {
    res.status(201).json(createQuickMark(db, accessOf(req).campaignId, newQuickMark.of(req)));
  });

  r.patch('/quick-marks/:quickMarkId', ...lead(byQuickMark, 'define quick marks'), quickMarkChange, (req, res) => {
    res.json(updateQuickMark(db, req.params.quickMarkId as string, quickMarkChange.of(req)));
  });

  r.delete('/quick-marks/:quickMarkId', ...lead(byQuickMark, 'define quick marks'), (req, res) => {
    retireQuickMark(db, req.params.quickMarkId as string);
    res.status(204).end();
  });

  r.get('/campaigns/:campaignId/finds/next-number', ...member, (req, res) => {
    res.json({ findNumber: nextFindNumber(db, accessOf(req).campaignId) });
  });

  return r;
}
