import { Router, type RequestHandler } from 'express';

import { telemetryAtQuerySchema, telemetryQuerySchema } from '../../lib/schemas';
import type { AppContext } from '../context';
import { fieldError } from '../errors';
import { accessOf, byDive, requireCampaignRole } from '../middleware/campaign-access';
import { requireSession } from '../middleware/session';
import { validate } from '../middleware/validate';
import { diveSummary, telemetryAt, telemetrySamples } from '../services/telemetry';
import { importTelemetryLog } from '../services/telemetry-import';
import { discardUpload, receiveLog } from '../middleware/telemetry-upload';

/** The dive's telemetry log: import, samples for charts, values at an instant, statistics. */
export function telemetryRoutes({ db, auth, live }: AppContext): Router {
  const r = Router();
  const signedIn = requireSession(auth);
  const member: RequestHandler[] = [signedIn, requireCampaignRole(db, byDive)];
  const samplesQuery = validate(telemetryQuerySchema, 'query');
  const atQuery = validate(telemetryAtQuerySchema, 'query');
  const importer: RequestHandler[] = [signedIn, requireCampaignRole(db, byDive, ['lead', 'pilot'], 'import telemetry logs')];

  r.post('/dives/:diveId/telemetry', ...importer, receiveLog, async (req, res) => {
    try {
      if (!req.file) {
        throw fieldError('file', 'Send the log as multipart/form-data in the field "file"', 'No log was sent.');
      }
      const report = await importTelemetryLog(db, live, {
        diveId: req.params.diveId as string,
        userId: accessOf(req).userId,
        filePath: req.file.path,
        fileName: req.file.originalname.slice(0, 255) || null,
        fields: { ...(req.body as Record<string, unknown>) },
      });
      res.status(201).json(report);
    } finally {
      await discardUpload(req.file);
    }
  });

  r.get('/dives/:diveId/telemetry', ...member, samplesQuery, (req, res) => {
    res.json(telemetrySamples(db, req.params.diveId as string, samplesQuery.of(req)));
  });

  r.get('/dives/:diveId/at', ...member, atQuery, (req, res) => {
    res.json(telemetryAt(db, req.params.diveId as string, atQuery.of(req)));
  });

  r.get('/dives/:diveId/summary', ...member, (req, res) => {
    res.json(diveSummary(db, req.params.diveId as string));
  });

  return r;
}
