import { Router, type RequestHandler } from 'express';

import type { AppContext } from '../context';
import { notFound } from '../errors';
import { accessOf, byCampaign, byDive, requireCampaignRole } from '../middleware/campaign-access';
import { requireSession } from '../middleware/session';
import { createDive, getDive, setPhase, updateDive } from '../services/dives';
import { diveStream } from '../services/stream';

export function diveRoutes(ctx: AppContext): Router {
  const { db, auth, live } = ctx;
  const r = Router();
  const signedIn = requireSession(auth);
  const member: RequestHandler[] = [signedIn, requireCampaignRole(db, byDive)];
  const operator = (action: string): RequestHandler[] => [signedIn, requireCampaignRole(db, byDive, ['lead', 'pilot'], action)];

  r.post('/campaigns/:campaignId/dives', signedIn, requireCampaignRole(db, byCampaign, ['lead', 'pilot'], 'plan dives'), (req, res) => {
    const dive = createDive(db, live, accessOf(req).campaignId, req.body);
    res.status(201).location(`/api/dives/${dive.id}`).json(dive);
  });

  r.get('/dives/:diveId', ...member, (req, res) => {
    const dive = getDive(db, req.params.diveId as string);
    if (!dive) throw notFound();
    res.json(dive);
  });

  r.patch('/dives/:diveId', ...operator('change dives'), (req, res) => {
    res.json(updateDive(db, live, req.params.diveId as string, req.body));
  });

  r.post('/dives/:diveId/phases', ...operator('mark dive phases'), (req, res) => {
    res.json(setPhase(db, live, req.params.diveId as string, req.body));
  });

  r.get('/dives/:diveId/stream', ...member, diveStream(ctx));

  return r;
}
