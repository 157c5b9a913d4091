/**
 * The record fields an entry create or edit may carry beside its text and place: a biology entry's
 * count or cover and sizes, and any entry's substrate. A field left out keeps what is stored;
 * `null` (or an empty list of sizes) clears it.
 */
import { eq } from 'drizzle-orm';

import type { Executor } from '../../../db/client';
import { type observations, observationSizes } from '../../../db/schema';
import type { ObservationKind, OrganismQuantityType, SizeInput } from '../../../lib/schemas';
import { fieldError } from '../../errors';
import { resolveSubstrate } from '../substrates';

export type RecordFieldsInput = {
  individualCount?: number | null;
  organismQuantity?: number | null;
  organismQuantityType?: OrganismQuantityType | null;
  sizes?: SizeInput[];
  substrate?: string | null;
};

type Columns = Partial<
  Pick<typeof observations.$inferInsert, 'individualCount' | 'organismQuantity' | 'organismQuantityType' | 'substrateId'>
>;

/** The columns to write for the given fields; refuses counts and sizes on an entry that is not biology. */
export function recordColumns(
  db: Executor,
  campaignId: string,
  kind: ObservationKind,
  input: RecordFieldsInput,
  currentSubstrateId: string | null = null,
): Columns {
  const biologyOnly = [
    ['individualCount', input.individualCount != null],
    ['organismQuantity', input.organismQuantity != null],
    ['sizes', !!input.sizes?.length],
  ] as const;
  if (kind !== 'biology') {
    const given = biologyOnly.find(([, set]) => set);
    if (given)
      throw fieldError(given[0], 'Counts, cover and sizes belong to biology entries', 'Counts, cover and sizes belong to biology entries.');
  }
  const out: Columns = {};
  if (input.individualCount !== undefined) out.individualCount = input.individualCount;
  if (input.organismQuantity !== undefined) out.organismQuantity = input.organismQuantity;
  if (input.organismQuantityType !== undefined) out.organismQuantityType = input.organismQuantityType;
  if (input.substrate !== undefined) {
    out.substrateId = input.substrate === null ? null : resolveSubstrate(db, campaignId, input.substrate, currentSubstrateId);
  }
  return out;
}

/** Replaces an entry's sizes when the edit names them; a size sent back unchanged keeps the photo measurement it came from. */
export function writeSizes(db: Executor, observationId: string, sizes: SizeInput[] | undefined) {
  if (sizes === undefined) return;
  const before = db.select().from(observationSizes).where(eq(observationSizes.observationId, observationId)).all();
  const originOf = (s: SizeInput) =>
    before.find((b) => b.dimension === s.dimension && b.valueCm === s.valueCm && b.method === s.method)?.measurementId ?? null;
  db.delete(observationSizes).where(eq(observationSizes.observationId, observationId)).run();
  if (sizes.length === 0) return;
  db.insert(observationSizes)
    .values(sizes.map((s) => ({ observationId, dimension: s.dimension, valueCm: s.valueCm, method: s.method, measurementId: originOf(s) })))
    .run();
}
