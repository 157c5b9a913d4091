/**
 * Search across every campaign the caller belongs to: `GET /api/search?q=…` with the entry
 * filters of the dive log plus a campaign and a dive, ranked, paged by an opaque cursor.
 */
import { z } from 'zod';

import { observationFilterQuerySchema, observationSchema } from './core';

export const SEARCH_MAX_LENGTH = 200;

export const searchQuerySchema = observationFilterQuerySchema
  .extend({
    // Not trimmed: a query ending in a space has finished its last word (no prefix match).
    q: z
      .string()
      .max(SEARCH_MAX_LENGTH)
      .refine((s) => s.trim().length > 0, 'Type something to search for'),
    campaignId: z.string().min(1).max(100).optional(),
    diveId: z.string().min(1).max(100).optional(),
    cursor: z.string().max(200).optional(),
    limit: z.coerce.number().int().min(1).max(50).default(20),
  })
  .strict();
export type SearchQuery = z.infer<typeof searchQuerySchema>;
/** A search's results as CSV: the same query and filters, every page at once (up to a limit). */
export const searchExportQuerySchema = searchQuerySchema.omit({ cursor: true, limit: true });
export const SEARCH_EXPORT_MAX = 10_000;

/** The query as the app builds it (everything a string, as in a URL). */
export type SearchParams = z.input<typeof searchQuerySchema>;

/** The parts of an entry a query can match, in the order their weights rank them. */
export const searchFields = ['title', 'tags', 'scientificName', 'findNumber', 'note'] as const;
export type SearchField = (typeof searchFields)[number];

/** A stretch of text, marked when it matched: the app emphasises it (never raw HTML). */
export const segmentSchema = z.object({ text: z.string(), match: z.boolean() });
export type TextSegment = z.infer<typeof segmentSchema>;

export const searchResultSchema = observationSchema.extend({
  /** Relevance, higher first (FTS5 bm25 with field weights). */
  score: z.number(),
  /** The fields where a query word was found. */
  matchedFields: z.array(z.enum(searchFields)),
  /** The query is exactly this entry's find number or scientific name. */
  exact: z.boolean(),
  campaignName: z.string(),
  diveNumber: z.string(),
  /** The title cut into plain and matched stretches. */
  titleParts: z.array(segmentSchema),
  /** A stretch of the note around its first match (or its start), cut the same way; empty without a note. */
  snippet: z.array(segmentSchema),
  /** The entry's first photo, for a thumbnail (`/api/photos/:id?size=thumb`). */
  thumbnailId: z.string().nullable(),
});
export type SearchResult = z.infer<typeof searchResultSchema>;

export const searchPageSchema = z.object({
  items: z.array(searchResultSchema),
  nextCursor: z.string().nullable(),
  /** How many entries matched in all. */
  total: z.number().int(),
  /** The index words searched for, typo alternatives included. */
  terms: z.array(z.string()),
  /** Known words were widened too, because they alone found (almost) nothing. */
  widened: z.boolean(),
});
export type SearchPage = z.infer<typeof searchPageSchema>;
