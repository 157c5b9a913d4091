import { eq } from 'drizzle-orm';
import { Router, type RequestHandler } from 'express';

import { dives } from '../../db/schema';
import { exportCsvQuerySchema } from '../../lib/schemas';
import type { AppContext } from '../context';
import { notFound } from '../errors';
import { accessOf, byCampaign, requirePermission } from '../middleware/campaign-access';
import { requireSession } from '../middleware/session';
import { validate } from '../middleware/validate';
import { exportSummary, slug, writeDarwinCore, writeEntryCsv, writeFindRegister, writeGeoJson } from '../services/exports';
import { exportCampaign } from '../services/exports/campaign';
import { filtersFromQuery, observationFilters } from '../services/observations/filters';

/** Every member (and the site administrator) may download the exports; public files follow the lead's position setting. */
export function exportRoutes({ db, auth, env }: AppContext): Router {
  const r = Router();
  const member: RequestHandler[] = [requireSession(auth), requirePermission(db, byCampaign, 'export')];
  const csvQuery = validate(exportCsvQuerySchema, 'query');

  r.get('/campaigns/:campaignId/export/summary', ...member, (req, res) => {
    res.json(exportSummary(db, accessOf(req).campaignId, env.PUBLIC_URL));
  });

  r.get('/campaigns/:campaignId/export/darwin-core.zip', ...member, async (req, res) => {
    await writeDarwinCore(db, res, accessOf(req).campaignId, env.PUBLIC_URL);
  });

  r.get('/campaigns/:campaignId/export/finds.csv', ...member, async (req, res) => {
    await writeFindRegister(db, res, accessOf(req).campaignId);
  });

  r.get('/campaigns/:campaignId/export/observations.geojson', ...member, async (req, res) => {
    await writeGeoJson(db, res, accessOf(req).campaignId);
  });

  r.get('/campaigns/:campaignId/export/observations.csv', ...member, csvQuery, async (req, res) => {
    const { campaignId } = accessOf(req);
    const q = csvQuery.of(req);
    let name = slug(exportCampaign(db, campaignId).name);
    if (q.diveId) {
      const dive = db.select({ campaignId: dives.campaignId, number: dives.number }).from(dives).where(eq(dives.id, q.diveId)).get();
      if (!dive || dive.campaignId !== campaignId) throw notFound('No such dive in this campaign.');
      name += `-${slug(dive.number)}`;
    }
    const conditions = observationFilters({ ...filtersFromQuery(q), campaignIds: [campaignId], ...(q.diveId ? { diveId: q.diveId } : {}) });
    const ascending = (q.order ?? (q.sort === 'time' ? 'desc' : 'asc')) === 'asc';
    await writeEntryCsv(db, res, campaignId, conditions, { sort: q.sort, ascending }, `${name}-observations.csv`);
  });

  return r;
}
