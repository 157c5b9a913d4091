import { eq } from 'drizzle-orm';
import { Router, type RequestHandler } from 'express';

import { identifications } from '../../db/schema';
import type { Action } from '../../lib/permissions';
import {
  custodyInputSchema,
  findInputSchema,
  identificationInputSchema,
  sampleInputSchema,
  observationCreateSchema,
  observationListQuerySchema,
  observationUpdateSchema,
  verificationInputSchema,
} from '../../lib/schemas';
import type { AppContext } from '../context';
import { notFound } from '../errors';
import { accessOf, assertCan, byDive, byObservation, requirePermission } from '../middleware/campaign-access';
import { requireSession } from '../middleware/session';
import { validate } from '../middleware/validate';
import {
  createObservation,
  getObservationDetail,
  getObservationRow,
  listObservations,
  listRevisions,
  restoreObservation,
  retireObservation,
  updateObservation,
} from '../services/observations';
import { addCustody, setFind, setIdentification, verifyIdentification } from '../services/record';
import { setSample } from '../services/samples';

export function observationRoutes({ db, auth, live }: AppContext): Router {
  const r = Router();
  const signedIn = requireSession(auth);
  const id = (req: { params: Record<string, unknown> }) => req.params.id as string;
  const actor = (req: Parameters<RequestHandler>[0]) => ({ userId: accessOf(req).userId, role: accessOf(req).role });

  /**
   * The permission table's rules that depend on the entry (its author, who named it), checked
   * before the body is read so that a refused caller learns nothing from a 400.
   */
  const entryRule =
    (action: Action): RequestHandler =>
    (req, _res, next) => {
      const row = getObservationRow(db, id(req));
      if (!row) throw notFound();
      const { role, userId } = accessOf(req);
      const isIdentifier =
        action === 'identification.verify' &&
        db.select({ by: identifications.identifiedBy }).from(identifications).where(eq(identifications.observationId, row.id)).get()?.by ===
          userId;
      assertCan(role, action, { isAuthor: row.authorId === userId, isIdentifier });
      next();
    };
  const onEntry = (action: Action): RequestHandler[] => [signedIn, requirePermission(db, byObservation, action), entryRule(action)];
  const reader: RequestHandler[] = [signedIn, requirePermission(db, byObservation, 'campaign.read')];

  const listQuery = validate(observationListQuerySchema, 'query');
  const newEntry = validate(observationCreateSchema);
  const edit = validate(observationUpdateSchema);
  const identification = validate(identificationInputSchema);
  const verification = validate(verificationInputSchema);
  const find = validate(findInputSchema);
  const custody = validate(custodyInputSchema);
  const sample = validate(sampleInputSchema);

  r.get('/dives/:diveId/observations', signedIn, requirePermission(db, byDive, 'campaign.read'), listQuery, (req, res) => {
    const query = listQuery.of(req);
    if (query.retired === 'only') assertCan(accessOf(req).role, 'entry.seeRetired');
    res.json(listObservations(db, req.params.diveId as string, query));
  });

  r.post('/dives/:diveId/observations', signedIn, requirePermission(db, byDive, 'entry.create'), newEntry, async (req, res) => {
    const { campaignId, userId } = accessOf(req);
    const target = { diveId: req.params.diveId as string, campaignId, authorId: userId };
    const input = newEntry.of(req);
    // New entries arrive in bursts (a crowd pressing send at once): they share commits.
    const { observation, repeated } = await live.inGroupCommit(() => createObservation(db, live, target, input));
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

  r.patch('/observations/:id', ...onEntry('entry.edit'), edit, (req, res) => {
    updateObservation(db, live, id(req), actor(req), edit.of(req));
    res.json(getObservationDetail(db, id(req)));
  });

  r.delete('/observations/:id', ...onEntry('entry.retire'), (req, res) => {
    retireObservation(db, live, id(req), actor(req));
    res.json(getObservationDetail(db, id(req)));
  });

  r.post('/observations/:id/restore', ...onEntry('entry.restore'), (req, res) => {
    restoreObservation(db, live, id(req), actor(req));
    res.json(getObservationDetail(db, id(req)));
  });

  r.get('/observations/:id/revisions', ...reader, (req, res) => {
    res.json(listRevisions(db, id(req)));
  });

  r.put('/observations/:id/identification', ...onEntry('identification.propose'), identification, (req, res) => {
    res.json(setIdentification(db, live, id(req), actor(req), identification.of(req)));
  });

  r.post('/observations/:id/identification/verify', ...onEntry('identification.verify'), verification, (req, res) => {
    res.json(verifyIdentification(db, live, id(req), actor(req), verification.of(req)));
  });

  r.put('/observations/:id/find', ...onEntry('find.edit'), find, (req, res) => {
    res.json(setFind(db, live, id(req), actor(req), find.of(req)));
  });

  r.put('/observations/:id/sample', ...onEntry('sample.edit'), sample, (req, res) => {
    res.json(setSample(db, live, id(req), actor(req), sample.of(req)));
  });

  r.post('/observations/:id/custody', ...onEntry('custody.record'), custody, (req, res) => {
    res.status(201).json(addCustody(db, live, id(req), actor(req), custody.of(req)));
  });

  return r;
}
