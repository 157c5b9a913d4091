/**
 * The biology record beyond a name: counts and cover, sizes, the substrate an entry sits on, the
 * campaign's species list and the taxa a dive or campaign saw. Darwin Core's terms where it has
 * them (individualCount, organismQuantity, organismQuantityType); our own plain names elsewhere.
 */
import { z } from 'zod';

import { oneLine } from './text';

/** Darwin Core organismQuantityType values this product offers. */
export const organismQuantityTypes = ['individuals', '% cover', 'individuals per m²'] as const;
export type OrganismQuantityType = (typeof organismQuantityTypes)[number];

export const sizeDimensions = ['length', 'width', 'height'] as const;
export type SizeDimension = (typeof sizeDimensions)[number];
export const sizeMethods = ['measured', 'estimated'] as const;
export type SizeMethod = (typeof sizeMethods)[number];

export const substrateOrigins = ['geologic', 'biogenic', 'anthropogenic'] as const;
export type SubstrateOrigin = (typeof substrateOrigins)[number];

/** Counts are whole and never negative. */
export const individualCountSchema = z
  .number()
  .int('A count is a whole number')
  .min(0, 'A count cannot be negative')
  .max(10_000_000, 'At most 10,000,000');

const quantity = z.number().finite().min(0, 'A quantity cannot be negative').max(10_000_000, 'At most 10,000,000');

/**
 * A quantity and its type, both or neither; percent cover is 0–100. Checked on the pair, so the
 * message lands on the quantity.
 */
export function checkQuantity(
  o: { organismQuantity?: number | null; organismQuantityType?: OrganismQuantityType | null },
  ctx: z.RefinementCtx,
) {
  const q = o.organismQuantity;
  const t = o.organismQuantityType;
  if (q === undefined && t === undefined) return;
  if ((q == null) !== (t == null)) {
    ctx.addIssue({ code: 'custom', path: ['organismQuantityType'], message: 'Give a quantity with its type, or neither' });
    return;
  }
  if (t === '% cover' && q != null && q > 100) {
    ctx.addIssue({ code: 'custom', path: ['organismQuantity'], message: 'Cover is a percentage, 0 to 100' });
  }
}

export const sizeInputSchema = z
  .object({
    dimension: z.enum(sizeDimensions),
    valueCm: z.number().finite().gt(0, 'A size is more than 0 cm').max(100_000, 'At most 100,000 cm'),
    method: z.enum(sizeMethods),
  })
  .strict();
export type SizeInput = z.infer<typeof sizeInputSchema>;

/** At most one size per dimension. */
export const sizesInputSchema = z
  .array(sizeInputSchema)
  .max(3)
  .refine((list) => new Set(list.map((s) => s.dimension)).size === list.length, 'Give each dimension once');

/** The record fields an entry create or edit may carry. */
export const recordFieldsInput = {
  individualCount: individualCountSchema.nullable().optional(),
  organismQuantity: quantity.nullable().optional(),
  organismQuantityType: z.enum(organismQuantityTypes).nullable().optional(),
  sizes: sizesInputSchema.optional(),
  /** The substrate class's name in the campaign's vocabulary; null clears it. */
  substrate: oneLine().min(1).max(80).nullable().optional(),
};

export const sizeSchema = z.object({
  dimension: z.enum(sizeDimensions),
  valueCm: z.number(),
  method: z.enum(sizeMethods),
});
export type Size = z.infer<typeof sizeSchema>;

/* ---- substrate vocabulary ---- */

export const substrateClassSchema = z.object({
  id: z.string(),
  name: z.string(),
  origin: z.enum(substrateOrigins).nullable(),
  standardName: z.string().nullable(),
  retired: z.boolean(),
  entryCount: z.number().int(),
});
export type SubstrateClass = z.infer<typeof substrateClassSchema>;
export const substrateListSchema = z.object({ items: z.array(substrateClassSchema) });

const substrateName = oneLine().min(1, 'A name is needed').max(80, 'At most 80 characters');
export const substrateCreateSchema = z.object({ name: substrateName, origin: z.enum(substrateOrigins).nullable().optional() }).strict();
export const substrateUpdateSchema = z
  .object({ name: substrateName.optional(), retired: z.boolean().optional() })
  .strict()
  .refine((o) => o.name !== undefined || o.retired !== undefined, 'Give a new name or retire it');

/* ---- species list ---- */

export const checklistEntrySchema = z.object({
  id: z.string(),
  scientificName: z.string(),
  authorship: z.string().nullable(),
  taxonRank: z.string().nullable(),
  identifier: z.string().nullable(),
  vernacularName: z.string().nullable(),
  genus: z.string().nullable(),
  specificEpithet: z.string().nullable(),
  infraspecificRank: z.string().nullable(),
  infraspecificEpithet: z.string().nullable(),
});
export type ChecklistEntry = z.infer<typeof checklistEntrySchema>;

export const checklistRejectionSchema = z.object({ line: z.number().int(), code: z.string(), message: z.string() });
export const checklistReportSchema = z.object({
  taken: z.number().int(),
  added: z.number().int(),
  updated: z.number().int(),
  rejected: z.array(checklistRejectionSchema),
  total: z.number().int(),
});
export type ChecklistReport = z.infer<typeof checklistReportSchema>;

export const checklistSchema = z.object({ items: z.array(checklistEntrySchema) });

/** `GET /api/campaigns/:campaignId/names?q=`: names to suggest as one types. */
export const nameSuggestionQuerySchema = z.object({
  q: z.string().max(120).default(''),
  limit: z.coerce.number().int().min(1).max(50).default(10),
});
export const nameSuggestionSchema = z.object({
  scientificName: z.string(),
  authorship: z.string().nullable(),
  taxonRank: z.string().nullable(),
  vernacularName: z.string().nullable(),
  identifier: z.string().nullable(),
  /** On the campaign's species list (else a name already used in the campaign). */
  onChecklist: z.boolean(),
  /** Entries in the campaign identified with this name. */
  uses: z.number().int(),
});
export type NameSuggestion = z.infer<typeof nameSuggestionSchema>;
export const nameSuggestionListSchema = z.object({
  items: z.array(nameSuggestionSchema),
  /** The campaign has a species list at all (else nothing is "outside the list"). */
  hasChecklist: z.boolean(),
});

/* ---- taxa seen ---- */

export const taxaSorts = ['name', 'entries', 'count', 'first', 'last', 'depth'] as const;
export const taxaQuerySchema = z.object({ sort: z.enum(taxaSorts).default('name') });

export const taxonSeenSchema = z.object({
  scientificName: z.string(),
  taxonRank: z.string().nullable(),
  onChecklist: z.boolean().nullable(),
  entries: z.number().int(),
  /** Sum of individual counts (and quantities given as individuals) over the entries that have one. */
  totalCount: z.number().nullable(),
  firstSeen: z.string(),
  lastSeen: z.string(),
  depthMin: z.number().nullable(),
  depthMax: z.number().nullable(),
  /** Share of the entries whose identification is verified, 0–1. */
  verifiedShare: z.number(),
  /** A photo of the taxon, where an entry has one. */
  photoId: z.string().nullable(),
  observationIds: z.array(z.string()),
  /** The entries themselves, in time order, for the list's links. */
  sightings: z.array(z.object({ id: z.string(), title: z.string(), observedAt: z.string(), depth: z.number().nullable() })),
});
export type TaxonSeen = z.infer<typeof taxonSeenSchema>;
export const taxaListSchema = z.object({ items: z.array(taxonSeenSchema) });
