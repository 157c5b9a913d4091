import { Router, type RequestHandler } from 'express';

import type { AppContext } from '../context';
import { notFound } from '../errors';
import { accessOf, byDive, byObservation, requireCampaignRole } from '../middleware/campaign-access';
import { requireSession } from '../middleware/session';
import { createObservation, getObservationDetail, listObservations } from '../services/observations';

export function observationRoutes({ db, auth }: AppContext): Router {
  const r = Router();
  const signedIn = requireSession(auth);
  const diveMember: RequestHandler[] = [signedIn, requireCampaignRole(db, byDive)];
  const diveLogger: RequestHandler[] = [signedIn, requireCampaignRole(db, byDive, ['lead', 'scientist', 'pilot', 'guest'], 'log entries')];
  const observationMember: RequestHandler[] = [signedIn, requireCampaignRole(db, byObservation)];

  r.get('/dives/:diveId/observations', ...diveMember, (req, res) => {
    res.json(listObservations(db, req.params.diveId as string, req.query));
  });

  r.post('/dives/:diveId/observations', ...diveLogger, (req, res) => {
    const { campaignId, userId } = accessOf(req);
    const created = createObservation(db, { diveId: req.params.diveId as string, campaignId, authorId: userId }, req.body);
    res.status(201).location(`/api/observations/${created.id}`).json(created);
  });

  r.get('/observations/:id', ...observationMember, (req, res) => {
    const observation = getObservationDetail(db, req.params.id as string);
    if (!observation) throw notFound();
    res.json(observation);
  });

  return r;
}
