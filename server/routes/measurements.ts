import { eq } from 'drizzle-orm';
import { Router, type RequestHandler } from 'express';

import { photos } from '../../db/schema';
import { measurementCreateSchema } from '../../lib/schemas';
import type { AppContext } from '../context';
import { accessOf, byObservation, requireCampaignRole, type CampaignResolver } from '../middleware/campaign-access';
import { requireSession } from '../middleware/session';
import { validate } from '../middleware/validate';
import {
  createMeasurement,
  entryMeasurementsOf,
  measurementCampaignOf,
  photoMeasurementsOf,
  requireMeasurer,
  retireMeasurement,
} from '../services/measurements';

const byPhoto: CampaignResolver = (db, req) => {
  const id = req.params.photoId;
  return typeof id === 'string' ? db.select({ c: photos.campaignId }).from(photos).where(eq(photos.id, id)).get()?.c : undefined;
};

const byMeasurement: CampaignResolver = (db, req) => {
  const id = req.params.measurementId;
  return typeof id === 'string' ? measurementCampaignOf(db, id) : undefined;
};

/** Lengths and areas measured on photos with the laser scale. */
export function measurementRoutes({ db, auth, live }: AppContext): Router {
  const r = Router();
  const signedIn = requireSession(auth);
  const body = validate(measurementCreateSchema);
  // Who may measure is settled before the body is judged, so a refused caller hears why first.
  const mayMeasure: RequestHandler = (req, _res, next) => {
    requireMeasurer(db, accessOf(req), req.params.photoId as string);
    next();
  };

  r.post('/photos/:photoId/measurements', signedIn, requireCampaignRole(db, byPhoto), mayMeasure, body, (req, res) => {
    const created = createMeasurement(db, live, accessOf(req), req.params.photoId as string, body.of(req));
    res.status(201).location(`/api/measurements/${created.id}`).json(created);
  });

  r.get('/photos/:photoId/measurements', signedIn, requireCampaignRole(db, byPhoto), (req, res) => {
    res.json({ items: photoMeasurementsOf(db, req.params.photoId as string) });
  });

  r.get('/observations/:id/measurements', signedIn, requireCampaignRole(db, byObservation), (req, res) => {
    res.json({ items: entryMeasurementsOf(db, req.params.id as string) });
  });

  r.delete('/measurements/:measurementId', signedIn, requireCampaignRole(db, byMeasurement), (req, res) => {
    retireMeasurement(db, live, accessOf(req), req.params.measurementId as string);
    res.status(204).end();
  });

  return r;
}
