/**
 * Exports: the campaign's publication settings (licence, how positions appear in public files)
 * and the export screen's summary of what each file holds.
 */
import { z } from 'zod';

import { observationFilterQuerySchema } from './core';
import { exportLicences, publicPositionModes } from './publication';

export { exportLicences, publicPositionModes, type ExportLicence, type PublicPositionMode } from './publication';

export const exportKinds = ['darwin-core', 'finds', 'geojson', 'csv'] as const;
export type ExportKind = (typeof exportKinds)[number];

const isoOut = z.string();

export const exportCardSchema = z.object({
  kind: z.enum(exportKinds),
  /** Rows (occurrences, finds, entries) the file will hold. */
  rows: z.number().int(),
  dives: z.number().int(),
  firstAt: isoOut.nullable(),
  lastAt: isoOut.nullable(),
  /** Estimated size of the download in bytes, from a sample of the real rows. */
  estimatedBytes: z.number().int(),
  /** Rows whose position is left out (no position, or withheld by the campaign's setting). */
  withoutPosition: z.number().int(),
  /** Whether this file follows the campaign's public-position setting (false: exact positions). */
  public: z.boolean(),
});
export type ExportCard = z.infer<typeof exportCardSchema>;

export const exportSummarySchema = z.object({
  licence: z.enum(exportLicences),
  publicPositions: z.enum(publicPositionModes),
  cards: z.array(exportCardSchema),
});
export type ExportSummary = z.infer<typeof exportSummarySchema>;

/**
 * The CSV of a list takes the dive log's filters and order, and optionally one dive (without it,
 * the whole campaign).
 */
export const exportCsvQuerySchema = observationFilterQuerySchema
  .extend({
    diveId: z.string().min(1).max(100).optional(),
    sort: z.enum(['time', 'depth', 'kind', 'author']).default('time'),
    order: z.enum(['asc', 'desc']).optional(),
  })
  .strict();
export type ExportCsvQuery = z.infer<typeof exportCsvQuerySchema>;
