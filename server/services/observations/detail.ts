import { asc, eq } from 'drizzle-orm';

import type { Db, Executor } from '../../../db/client';
import { custodyEvents, finds, identifications } from '../../../db/schema';
import type { Observation, ObservationDetail } from '../../../lib/schemas';
import { photosOf } from '../photos';
import { getObservation } from './hydrate';
import { namesOf } from './map';

/** One observation with everything that hangs off it (reusing the observation when the caller has it). */
export function getObservationDetail(db: Executor, id: string, known?: Observation): ObservationDetail | undefined {
  const observation = known ?? getObservation(db, id);
  if (!observation) return undefined;
  const ident = db.select().from(identifications).where(eq(identifications.observationId, id)).get();
  const find = db.select().from(finds).where(eq(finds.observationId, id)).get();
  const custody = db.select().from(custodyEvents).where(eq(custodyEvents.observationId, id)).orderBy(asc(custodyEvents.since)).all();
  const names = namesOf(db, [ident?.identifiedBy ?? null, ident?.verifiedBy ?? null, ...custody.map((c) => c.recordedBy)]);
  return {
    ...observation,
    // Reads only; the same connection serves the transaction and the database.
    photos: photosOf(db as Db, [id]).get(id) ?? [],
    identificationDetail: ident
      ? {
          scientificName: ident.scientificName,
          taxonRank: ident.taxonRank,
          qualifier: ident.qualifier,
          confidence: ident.confidence,
          taxonId: ident.taxonId,
          verificationStatus: ident.verificationStatus,
          verificationNote: ident.verificationNote,
          identifiedBy: ident.identifiedBy,
          identifiedByName: names.get(ident.identifiedBy) ?? 'Unknown',
          verifiedBy: ident.verifiedBy,
          verifiedByName: ident.verifiedBy ? (names.get(ident.verifiedBy) ?? 'Unknown') : null,
          verifiedAt: ident.verifiedAt ? ident.verifiedAt.toISOString() : null,
          updatedAt: ident.updatedAt.toISOString(),
        }
      : null,
    find: find
      ? {
          findNumber: find.findNumber,
          objectType: find.objectType,
          material: find.material,
          condition: find.condition,
          state: find.state,
          updatedAt: find.updatedAt.toISOString(),
        }
      : null,
    custody: custody.map((c) => ({
      id: c.id,
      holder: c.holder,
      since: c.since.toISOString(),
      location: c.location,
      container: c.container,
      note: c.note,
      recordedBy: c.recordedBy,
      recordedByName: names.get(c.recordedBy) ?? 'Unknown',
      createdAt: c.createdAt.toISOString(),
    })),
  };
}
