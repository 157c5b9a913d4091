import { Router, type RequestHandler } from 'express';

import type { AppContext } from '../context';
import { forbidden, notFound } from '../errors';
import { accessOf, byDive, byObservation, requireCampaignRole } from '../middleware/campaign-access';
import { requireSession } from '../middleware/session';
import {
  createObservation,
  getObservationDetail,
  listObservations,
  listRevisions,
  restoreObservation,
  retireObservation,
  updateObservation,
} from '../services/observations';
import { addCustody, setFind, setIdentification, verifyIdentification } from '../services/record';

const members = ['lead', 'scientist', 'pilot', 'guest'] as const;

export function observationRoutes({ db, auth, live }: AppContext): Router {
  const r = Router();
  const signedIn = requireSession(auth);
  const diveMember: RequestHandler[] = [signedIn, requireCampaignRole(db, byDive)];
  const diveLogger: RequestHandler[] = [signedIn, requireCampaignRole(db, byDive, members, 'log entries')];
  const reader: RequestHandler[] = [signedIn, requireCampaignRole(db, byObservation)];
  const writer = (action: string): RequestHandler[] => [signedIn, requireCampaignRole(db, byObservation, members, action)];
  const lead = (action: string): RequestHandler[] => [signedIn, requireCampaignRole(db, byObservation, ['lead'], action)];
  const id = (req: { params: Record<string, unknown> }) => req.params.id as string;
  const actor = (req: Parameters<RequestHandler>[0]) => ({ userId: accessOf(req).userId, role: accessOf(req).role });

  r.get('/dives/:diveId/observations', ...diveMember, (req, res) => {
    const { retired, ...query } = req.query;
    if (retired === 'only' && accessOf(req).role !== 'lead') throw forbidden('Only a campaign lead sees retired entries.');
    res.json(listObservations(db, req.params.diveId as string, query, { retired: retired === 'only' }));
  });

  r.post('/dives/:diveId/observations', ...diveLogger, (req, res) => {
    const { campaignId, userId } = accessOf(req);
    const { observation, repeated } = createObservation(
      db,
      live,
      { diveId: req.params.diveId as string, campaignId, authorId: userId },
      req.body,
    );
    // A repeated send of the same entry answers 200 with the entry that was stored the first time.
    res
      .status(repeated ? 200 : 201)
      .location(`/api/observations/${observation.id}`)
      .json(observation);
  });

  r.get('/observations/:id', ...reader, (req, res) => {
    const observation = getObservationDetail(db, id(req));
    if (!observation) throw notFound();
    res.json(observation);
  });

  r.patch('/observations/:id', ...writer('edit entries'), (req, res) => {
    updateObservation(db, live, id(req), actor(req), req.body);
    res.json(getObservationDetail(db, id(req)));
  });

  r.delete('/observations/:id', ...writer('retire entries'), (req, res) => {
    retireObservation(db, live, id(req), actor(req));
    res.json(getObservationDetail(db, id(req)));
  });

  r.post('/observations/:id/restore', ...lead('restore retired entries'), (req, res) => {
    restoreObservation(db, live, id(req), actor(req));
    res.json(getObservationDetail(db, id(req)));
  });

  r.get('/observations/:id/revisions', ...reader, (req, res) => {
    res.json(listRevisions(db, id(req)));
  });

  r.put('/observations/:id/identification', ...writer('propose identifications'), (req, res) => {
    res.json(setIdentification(db, live, id(req), actor(req), req.body));
  });

  r.post('/observations/:id/identification/verify', ...writer('verify identifications'), (req, res) => {
    res.json(verifyIdentification(db, live, id(req), actor(req), req.body));
  });

  r.put('/observations/:id/find', ...writer('record finds'), (req, res) => {
    res.json(setFind(db, live, id(req), actor(req), req.body));
  });

  r.post('/observations/:id/custody', ...writer('record custody'), (req, res) => {
    res.status(201).json(addCustody(db, live, id(req), actor(req), req.body));
  });

  return r;
}
