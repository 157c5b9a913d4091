import { eq } from 'drizzle-orm';
import { Router, type RequestHandler } from 'express';

import { photos } from '../../db/schema';
import { photoFileQuerySchema } from '../../lib/schemas';
import type { AppContext } from '../context';
import { accessOf, byDive, byObservation, requireCampaignRole, type CampaignResolver } from '../middleware/campaign-access';
import { requireSession } from '../middleware/session';
import { getObservation } from '../services/observations';
import { readPhotoUpload, sendPhotoFile, uploadedFiles } from '../services/photo-http';
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

  // Tell the dive's readers that an entry's photos changed (added, captioned, moved, retired), so
  // counts, strips and galleries refresh. Called once the change is committed. It lives here
  // rather than in the photo service because observations.ts already imports that service.
  const announce = (observationId: string) => {
    const observation = getObservation(db, observationId);
    if (observation) live.publish(observation.campaignId, observation.diveId, 'observation.updated', observation);
  };

  // Who may upload is settled before the body is read, so a refused caller never sends megabytes.
  const mayUpload: RequestHandler = (req, _res, next) => {
    requirePhotoEditor(db, accessOf(req), req.params.id as string);
    next();
  };
  const mayEditPhoto: RequestHandler = (req, _res, next) => {
    requirePhotoEditor(db, accessOf(req), photoRow(db, req.params.photoId as string)?.observationId ?? '');
    next();
  };

  r.post('/observations/:id/photos', signedIn, requireCampaignRole(db, byObservation), mayUpload, readPhotoUpload, async (req, res) => {
    const { campaignId, userId } = accessOf(req);
    const observationId = req.params.id as string;
    const result = await uploadPhotos(db, storage, { observationId, campaignId, userId }, uploadedFiles(req), req.body);
    if (result.created > 0) announce(observationId);
    const { created, ...body } = result;
    if (created === 1 && result.photos.length === 1) res.location(`/api/photos/${result.photos[0]!.id}`);
    res.status(created > 0 ? 201 : 200).json(body);
  });

  r.get('/dives/:diveId/photos', signedIn, requireCampaignRole(db, byDive), (req, res) => {
    res.json(galleryOf(db, req.params.diveId as string, req.query));
  });

  r.get('/photos/:photoId', ...photoMember, async (req, res) => {
    const { size } = photoFileQuerySchema.parse(req.query);
    const photoId = req.params.photoId as string;
    await sendPhotoFile(req, res, storage, photoId, size, photoFile(db, photoId, size));
  });

  r.patch('/photos/:photoId', ...photoMember, mayEditPhoto, (req, res) => {
    const photo = updatePhoto(db, req.params.photoId as string, req.body);
    announce(photo.observationId);
    res.json(photo);
  });

  r.delete('/photos/:photoId', ...photoMember, mayEditPhoto, (req, res) => {
    const retired = retirePhoto(db, req.params.photoId as string);
    announce(retired.observationId);
    res.status(204).end();
  });

  return r;
}
