import { eq } from 'drizzle-orm';
import { Router, type RequestHandler } from 'express';

import { photos } from '../../db/schema';
import { galleryQuerySchema, photoFileQuerySchema, photoUpdateSchema, photoUploadFieldsSchema } from '../../lib/schemas';
import { validate } from '../middleware/validate';
import type { AppContext } from '../context';
import { accessOf, byDive, byObservation, requireCampaignRole, type CampaignResolver } from '../middleware/campaign-access';
import { requireSession } from '../middleware/session';
import { readPhotoUpload, sendPhotoFile, uploadedFiles } from './photo-http';
import { localFolderStorage } from '../services/photo-storage';
import { galleryOf, photoFile, photoRow, requirePhotoEditor, retirePhoto, updatePhoto, uploadPhotos } from '../services/photos';

const byPhoto: CampaignResolver = (db, req) => {
  const id = req.params.photoId;
  return typeof id === 'string' ? db.select({ c: photos.campaignId }).from(photos).where(eq(photos.id, id)).get()?.c : undefined;
};

/** Photos on observations: upload, serve, edit, retire, and a dive's gallery. */
export function photoRoutes({ db, auth, env, live }: AppContext): Router {
  const r = Router();
  const storage = localFolderStorage(env.UPLOADS_DIR);
  const signedIn = requireSession(auth);
  const photoMember: RequestHandler[] = [signedIn, requireCampaignRole(db, byPhoto)];
  const photoChange = validate(photoUpdateSchema);
  const galleryQuery = validate(galleryQuerySchema, 'query');
  const uploadFields = validate(photoUploadFieldsSchema);

  // Who may upload is settled before the body is read, so a refused caller never sends megabytes.
  const mayUpload: RequestHandler = (req, _res, next) => {
    requirePhotoEditor(db, accessOf(req), req.params.id as string);
    next();
  };
  const mayEditPhoto: RequestHandler = (req, _res, next) => {
    requirePhotoEditor(db, accessOf(req), photoRow(db, req.params.photoId as string)?.observationId ?? '');
    next();
  };

  r.post(
    '/observations/:id/photos',
    signedIn,
    requireCampaignRole(db, byObservation),
    mayUpload,
    readPhotoUpload,
    uploadFields,
    async (req, res) => {
      const { campaignId, userId } = accessOf(req);
      const observationId = req.params.id as string;
      const result = await uploadPhotos(db, live, storage, { observationId, campaignId, userId }, uploadedFiles(req), uploadFields.of(req));
      const { created, ...body } = result;
      if (created === 1 && result.photos.length === 1) res.location(`/api/photos/${result.photos[0]!.id}`);
      res.status(created > 0 ? 201 : 200).json(body);
    },
  );

  r.get('/dives/:diveId/photos', signedIn, requireCampaignRole(db, byDive), galleryQuery, (req, res) => {
    res.json(galleryOf(db, req.params.diveId as string, galleryQuery.of(req)));
  });

  r.get('/photos/:photoId', ...photoMember, async (req, res) => {
    const { size } = photoFileQuerySchema.parse(req.query);
    const photoId = req.params.photoId as string;
    await sendPhotoFile(req, res, storage, photoId, size, photoFile(db, photoId, size));
  });

  r.patch('/photos/:photoId', ...photoMember, mayEditPhoto, photoChange, (req, res) => {
    res.json(updatePhoto(db, live, req.params.photoId as string, photoChange.of(req)));
  });

  r.delete('/photos/:photoId', ...photoMember, mayEditPhoto, (req, res) => {
    retirePhoto(db, live, req.params.photoId as string, accessOf(req).userId);
    res.status(204).end();
  });

  return r;
}
