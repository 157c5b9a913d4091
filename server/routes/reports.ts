import { Router } from 'express';

import { reportDateSchema } from '../../lib/schemas';
import type { AppContext } from '../context';
import { fieldError } from '../errors';
import { accessOf, byCampaign, byDive, requireCampaignRole } from '../middleware/campaign-access';
import { requireSession } from '../middleware/session';
import { dayReport, diveReport } from '../services/reports';

/** The daily dive report: one dive's, or a day's across its dives; any member may read them. */
export function reportRoutes({ db, auth }: AppContext): Router {
  const r = Router();
  const signedIn = requireSession(auth);

  r.get('/dives/:diveId/report', signedIn, requireCampaignRole(db, byDive), (req, res) => {
    res.json(diveReport(db, req.params.diveId as string));
  });

  r.get('/campaigns/:campaignId/reports/:date', signedIn, requireCampaignRole(db, byCampaign), (req, res) => {
    const date = reportDateSchema.safeParse(req.params.date);
    if (!date.success) throw fieldError('date', date.error.issues[0]?.message ?? 'Not a date', 'The date is not valid.');
    res.json(dayReport(db, accessOf(req).campaignId, date.data));
  });

  return r;
}
