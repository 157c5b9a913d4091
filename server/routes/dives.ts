import { Router } from 'express';

import { diveCreateSchema, diveUpdateSchema, phaseInputSchema } from '../../lib/schemas';
import type { AppContext } from '../context';
import { notFound } from '../errors';
import { accessOf, byCampaign, byDive, requirePermission } from '../middleware/campaign-access';
import { requireSession } from '../middleware/session';
import { validate } from '../middleware/validate';
import { queueDigests } from '../services/digests';
import { createDive, getDive, setPhase, updateDive } from '../services/dives';
import { diveStream } from './dive-stream';

export function diveRoutes(ctx: AppContext): Router {
  const { db, auth, live } = ctx;
  const r = Router();
  const signedIn = requireSession(auth);
  const diveId = (req: { params: Record<string, unknown> }) => req.params.diveId as string;
  const newDive = validate(diveCreateSchema);
  const diveChange = validate(diveUpdateSchema);
  const phase = validate(phaseInputSchema);

  r.post('/campaigns/:campaignId/dives', signedIn, requirePermission(db, byCampaign, 'dive.plan'), newDive, (req, res) => {
    const dive = createDive(db, live, accessOf(req).campaignId, newDive.of(req));
    res.status(201).location(`/api/dives/${dive.id}`).json(dive);
  });

  r.get('/dives/:diveId', signedIn, requirePermission(db, byDive, 'campaign.read'), (req, res) => {
    const dive = getDive(db, diveId(req));
    if (!dive) throw notFound();
    res.json(dive);
  });

  r.patch('/dives/:diveId', signedIn, requirePermission(db, byDive, 'dive.run'), diveChange, (req, res) => {
    res.json(updateDive(db, live, diveId(req), diveChange.of(req)));
  });

  r.post('/dives/:diveId/phases', signedIn, requirePermission(db, byDive, 'dive.run'), phase, (req, res) => {
    const digests = { publicUrl: ctx.env.PUBLIC_URL, secret: ctx.env.AUTH_SECRET };
    const dive = setPhase(db, live, diveId(req), phase.of(req), undefined, (tx, d) =>
      queueDigests(tx, digests, d.campaignId, { trigger: 'after-dive', diveId: d.id }),
    );
    ctx.mail.kick();
    res.json(dive);
  });

  r.get('/dives/:diveId/stream', signedIn, requirePermission(db, byDive, 'campaign.read'), diveStream(ctx));

  return r;
}
