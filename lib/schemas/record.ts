/**
 * The specialist parts of an observation: a biology entry's identification (Darwin Core terms
 * where they exist), an archaeology entry's find and the custody trail of recovered finds and
 * samples, plus revisions and quick marks.
 */
import { z } from 'zod';

import { multiLine, oneLine } from './text';

const instant = z.iso.datetime({ offset: true, message: 'Expected an ISO 8601 time with a zone, e.g. 2026-05-14T21:14:07.250Z' });
const text = (max: number) => oneLine().max(max);
const longText = (max: number) => multiLine().trim().max(max);
/**
 * The entry's `version` the writer was looking at (the same one `PATCH` carries): a stale one is
 * a 409 `stale_version` and nothing is overwritten.
 */
const version = z.number().int().min(1);

/** Darwin Core taxonRank values the form offers (TDWG recommended vocabulary, lower case). */
/**
 * The tag that marks an entry whose sample was taken: such an entry keeps a custody trail, like a
 * recovered find. The lead cannot rename, merge or retire it away.
 */
export const SAMPLE_TAG = 'sample';

export const taxonRanks = ['kingdom', 'phylum', 'class', 'order', 'family', 'genus', 'species', 'subspecies'] as const;
/** Open-nomenclature qualifiers (Darwin Core identificationQualifier examples). */
export const identificationQualifiers = ['cf.', 'aff.', 'sp.', 'indet.'] as const;
export const identificationConfidences = ['high', 'medium', 'low'] as const;
export const verificationStatuses = ['unverified', 'verified', 'disputed'] as const;
export type VerificationStatus = (typeof verificationStatuses)[number];

export const identificationInputSchema = z
  .object({
    version,
    scientificName: text(200).min(1, 'Give the name, e.g. Desmophyllum pertusum or Munida'),
    taxonRank: z.enum(taxonRanks).nullable().optional(),
    qualifier: z.enum(identificationQualifiers).nullable().optional(),
    confidence: z.enum(identificationConfidences).nullable().optional(),
    taxonId: text(300)
      .regex(/^(urn:lsid:[\w.-]+:[\w.-]+:[\w.-]+|https?:\/\/\S+)$/, 'Use an LSID (urn:lsid:…) or an http(s) link to the taxon')
      .nullable()
      .optional(),
  })
  .strict();
export type IdentificationInput = z.input<typeof identificationInputSchema>;

/** `version` makes sure the name being verified is the one the verifier saw. */
export const verificationInputSchema = z
  .object({
    version,
    status: z.enum(['verified', 'disputed']),
    note: longText(2000).optional(),
  })
  .strict();
export type VerificationInput = z.input<typeof verificationInputSchema>;

export const identificationSchema = z.object({
  scientificName: z.string(),
  taxonRank: z.enum(taxonRanks).nullable(),
  qualifier: z.enum(identificationQualifiers).nullable(),
  confidence: z.enum(identificationConfidences).nullable(),
  taxonId: z.string().nullable(),
  verificationStatus: z.enum(verificationStatuses),
  verificationNote: z.string().nullable(),
  identifiedBy: z.string(),
  identifiedByName: z.string(),
  verifiedBy: z.string().nullable(),
  verifiedByName: z.string().nullable(),
  verifiedAt: z.string().nullable(),
  updatedAt: z.string(),
});
export type Identification = z.infer<typeof identificationSchema>;

export const findStates = ['in-situ', 'recovered'] as const;

export const findInputSchema = z
  .object({
    version,
    findNumber: text(40)
      .min(1, 'A find number is needed')
      .regex(/^[\w./-]+$/, 'Letters, digits and . / - _ only'),
    objectType: text(120).nullable().optional(),
    material: text(120).nullable().optional(),
    condition: text(500).nullable().optional(),
    state: z.enum(findStates).default('in-situ'),
  })
  .strict();
export type FindInput = z.input<typeof findInputSchema>;

export const findSchema = z.object({
  findNumber: z.string(),
  objectType: z.string().nullable(),
  material: z.string().nullable(),
  condition: z.string().nullable(),
  state: z.enum(findStates),
  updatedAt: z.string(),
});
export type Find = z.infer<typeof findSchema>;

export const custodyInputSchema = z
  .object({
    holder: text(200).min(1, 'Who holds it?'),
    since: instant,
    location: text(200).min(1, 'Where is it kept?'),
    container: text(200).nullable().optional(),
    note: longText(2000).nullable().optional(),
  })
  .strict();

export const custodyEventSchema = z.object({
  id: z.string(),
  holder: z.string(),
  since: z.string(),
  location: z.string(),
  container: z.string().nullable(),
  note: z.string().nullable(),
  recordedBy: z.string(),
  recordedByName: z.string(),
  createdAt: z.string(),
});
export type CustodyEvent = z.infer<typeof custodyEventSchema>;

export const revisionSchema = z.object({
  version: z.number().int(),
  action: z.enum(['created', 'updated', 'retired', 'restored']),
  editedBy: z.string(),
  editedByName: z.string(),
  editedAt: z.string(),
  /** The entry as it stood after this change. */
  snapshot: z.record(z.string(), z.unknown()),
});
export type Revision = z.infer<typeof revisionSchema>;
