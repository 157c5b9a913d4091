import { Router, type RequestHandler } from 'express';

import type { AppContext } from '../context';
import { notFound } from '../errors';
import { byDive, requireCampaignRole } from '../middleware/campaign-access';
import { requireSession } from '../middleware/session';
import { getDive } from '../services/campaigns';

export function diveRoutes({ db, auth }: AppContext): Router {
  const r = Router();
  const member: RequestHandler[] = [requireSession(auth), requireCampaignRole(db, byDive)];

  r.get('/dives/:diveId', ...member, (req, res) => {
    const dive = getDive(db, req.params.diveId as string);
    if (!dive) throw notFound();
    res.json(dive);
  });

  return r;
}
