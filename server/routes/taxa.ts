/**
 * The campaign's biology vocabulary and what it saw: substrate classes, the species list (import
 * and name suggestions), the taxa a dive or campaign identified and its sample register.
 */
import { Router, type RequestHandler } from 'express';
import multer, { MulterError } from 'multer';

import { nameSuggestionQuerySchema, substrateCreateSchema, substrateUpdateSchema, taxaQuerySchema } from '../../lib/schemas';
import type { AppContext } from '../context';
import { ApiError, fieldError, notFound } from '../errors';
import { accessOf, byCampaign, byDive, requireCampaignRole, requirePermission, type CampaignResolver } from '../middleware/campaign-access';
import { requireSession } from '../middleware/session';
import { refusalOf } from '../middleware/telemetry-upload';
import { validate } from '../middleware/validate';
import { MAX_CHECKLIST_BYTES, importChecklist, listChecklist, suggestNames } from '../services/checklist';
import { listSamples, nextSampleNumber } from '../services/samples';
import { createSubstrate, listSubstrates, substrateCampaign, updateSubstrate } from '../services/substrates';
import { taxaSeen } from '../services/taxa';

const checklistParser = multer({
  storage: multer.memoryStorage(),
  limits: { fileSize: MAX_CHECKLIST_BYTES, files: 1, fields: 2, parts: 3, fieldNameSize: 64, fieldSize: 1024, headerPairs: 20 },
}).single('file');

const readChecklist: RequestHandler = (req, res, next) => {
  if (!req.is('multipart/form-data')) {
    next(fieldError('file', 'No file was sent', 'Send the species list as multipart/form-data in the field "file".'));
    return;
  }
  checklistParser(req, res, (err?: unknown) => {
    if (!err) return next();
    if (err instanceof MulterError && err.code === 'LIMIT_FILE_SIZE') {
      return next(new ApiError(413, 'too_large', `A species list may be at most ${MAX_CHECKLIST_BYTES / (1024 * 1024)} MB.`));
    }
    if (err instanceof MulterError && err.code === 'LIMIT_UNEXPECTED_FILE') {
      return next(fieldError(err.field ?? '(body)', 'Unexpected file field', 'Send the species list in the field "file".'));
    }
    next(new ApiError(400, 'bad_multipart', 'The upload could not be read; it may have been cut off.'));
  });
};

export function taxaRoutes(ctx: AppContext): Router {
  const { db, auth } = ctx;
  const r = Router();
  const signedIn = requireSession(auth);
  const member = (resolve: CampaignResolver): RequestHandler[] => [signedIn, requireCampaignRole(db, resolve)];
  const bySubstrate: CampaignResolver = (d, req) => substrateCampaign(d, req.params.substrateId as string);
  const newSubstrate = validate(substrateCreateSchema);
  const substrateChange = validate(substrateUpdateSchema);
  const names = validate(nameSuggestionQuerySchema, 'query');
  const taxaQuery = validate(taxaQuerySchema, 'query');

  r.get('/campaigns/:campaignId/substrates', ...member(byCampaign), (req, res) => {
    res.json({ items: listSubstrates(db, accessOf(req).campaignId) });
  });

  r.post('/campaigns/:campaignId/substrates', signedIn, requirePermission(db, byCampaign, 'substrate.manage'), newSubstrate, (req, res) => {
    res.status(201).json(createSubstrate(db, accessOf(req).campaignId, newSubstrate.of(req)));
  });

  r.patch('/substrates/:substrateId', signedIn, requirePermission(db, bySubstrate, 'substrate.manage'), substrateChange, (req, res) => {
    res.json(updateSubstrate(db, req.params.substrateId as string, substrateChange.of(req)));
  });

  r.get('/campaigns/:campaignId/checklist', ...member(byCampaign), (req, res) => {
    res.json({ items: listChecklist(db, accessOf(req).campaignId) });
  });

  r.post(
    '/campaigns/:campaignId/checklist',
    signedIn,
    requirePermission(db, byCampaign, 'checklist.import'),
    readChecklist,
    async (req, res) => {
      const file = (req as { file?: { buffer: Buffer } }).file;
      if (!file) throw fieldError('file', 'No file was sent', 'Send the species list in the field "file".');
      if (file.buffer.length === 0) throw new ApiError(400, 'empty_file', 'The species list is empty.');
      const refusal = await refusalOf(file.buffer.subarray(0, 64 * 1024));
      if (refusal) throw new ApiError(refusal.status, refusal.code, refusal.message.replace('a CSV telemetry log', 'a CSV species list'));
      const { campaignId, userId } = accessOf(req);
      res.json(importChecklist(db, campaignId, userId, file.buffer));
    },
  );

  r.get('/campaigns/:campaignId/names', ...member(byCampaign), names, (req, res) => {
    const { q, limit } = names.of(req);
    res.json(suggestNames(db, accessOf(req).campaignId, q, limit));
  });

  r.get('/campaigns/:campaignId/taxa', ...member(byCampaign), taxaQuery, (req, res) => {
    res.json({ items: taxaSeen(db, { campaignId: accessOf(req).campaignId }, taxaQuery.of(req).sort) });
  });

  r.get('/dives/:diveId/taxa', ...member(byDive), taxaQuery, (req, res) => {
    const diveId = req.params.diveId as string;
    const { campaignId } = accessOf(req);
    if (!campaignId) throw notFound();
    res.json({ items: taxaSeen(db, { campaignId, diveId }, taxaQuery.of(req).sort) });
  });

  r.get('/campaigns/:campaignId/samples', ...member(byCampaign), (req, res) => {
    res.json({ items: listSamples(db, { campaignId: accessOf(req).campaignId }) });
  });

  r.get('/campaigns/:campaignId/samples/next-number', ...member(byCampaign), (req, res) => {
    res.json({ sampleNumber: nextSampleNumber(db, accessOf(req).campaignId) });
  });

  r.get('/dives/:diveId/samples', ...member(byDive), (req, res) => {
    res.json({ items: listSamples(db, { campaignId: accessOf(req).campaignId, diveId: req.params.diveId as string }) });
  });

  return r;
}
