/**
 * Exports: the campaign's publication settings (licence, how positions appear in public files)
 * and the export screen's summary of what each file holds.
 */
import { z } from 'zod';

import { observationFilterQuerySchema } from './core';

/** Licences a lead may publish the campaign's data under (Creative Commons identifiers as SPDX spells them). */
export const exportLicences = ['CC0-1.0', 'CC-BY-4.0', 'CC-BY-NC-4.0'] as const;
export type ExportLicence = (typeof exportLicences)[number];

/**
 * How positions appear in the exports meant for the public (Darwin Core Archive, GeoJSON):
 * exact, rounded to a 0.01° or 0.1° grid, or left out. The find register always carries exact
 * positions: it goes to the heritage authority, not to the public.
 */
export const publicPositionModes = ['exact', 'grid-0.01', 'grid-0.1', 'withheld'] as const;
export type PublicPositionMode = (typeof publicPositionModes)[number];

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
