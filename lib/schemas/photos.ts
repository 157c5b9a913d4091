/** Photos and frame grabs on observations. */
import { z } from 'zod';

import { oneLine } from './text';

export const photoSizes = ['thumb', 'display', 'original'] as const;
export type PhotoSize = (typeof photoSizes)[number];

/** What an upload may carry; the server holds every request to these. */
export const photoLimits = {
  /** Bytes per file. */
  maxBytes: 25 * 1024 * 1024,
  /** Files per request. */
  maxFiles: 10,
  /** Decoded pixels per image (width × height); more is refused as a decompression bomb. */
  maxPixels: 100_000_000,
  /** Longest side of the thumbnail and of the display size, in pixels. */
  thumbEdge: 320,
  displayEdge: 1600,
} as const;

/** The kinds of file taken, decided by the file's content; HEIC only where the server can decode it. */
export const acceptedPhotoTypes = ['image/jpeg', 'image/png', 'image/webp', 'image/heic', 'image/heif'] as const;

export const photoSchema = z.object({
  id: z.string(),
  observationId: z.string(),
  mime: z.string(),
  width: z.number().int(),
  height: z.number().int(),
  bytes: z.number().int(),
  caption: z.string().nullable(),
  credit: z.string().nullable(),
  /** When the camera took it (from the file's metadata), if it said. */
  capturedAt: z.string().nullable(),
  lat: z.number().nullable(),
  lon: z.number().nullable(),
  position: z.number().int(),
  uploadedBy: z.string(),
  createdAt: z.string(),
  /** Where to fetch each size: `/api/photos/:id?size=thumb|display|original`. */
  urls: z.object({ thumb: z.string(), display: z.string(), original: z.string() }),
});
export type Photo = z.infer<typeof photoSchema>;

// core.ts imports this file for `photoSchema`, so the observation kinds are spelled out here
// rather than imported back from it.
const kind = z.enum(['biology', 'archaeology', 'environment', 'operations']);

/**
 * The answer to an upload: every photo of the request in order, with their ids. A file already
 * on the entry (same SHA-256) is not stored again: the existing photo is answered, and its id is
 * listed in `duplicates`.
 */
export const photoUploadResultSchema = z.object({
  photos: z.array(photoSchema),
  duplicates: z.array(z.string()),
});
export type PhotoUploadResult = z.infer<typeof photoUploadResultSchema>;

const caption = oneLine().max(500, 'Captions are at most 500 characters');
const credit = oneLine().max(200, 'Credits are at most 200 characters');

/** Text fields an upload may carry beside its files; they apply to every file of the request. */
export const photoUploadFieldsSchema = z
  .object({
    caption: caption.optional(),
    credit: credit.optional(),
  })
  .strict();

/** `PATCH /api/photos/:photoId`: an empty caption or credit clears it; `position` moves the photo. */
export const photoUpdateSchema = z
  .object({
    caption: caption.nullable().optional(),
    credit: credit.nullable().optional(),
    position: z.number().int().min(0).max(10_000).optional(),
  })
  .strict()
  .refine((b) => b.caption !== undefined || b.credit !== undefined || b.position !== undefined, {
    message: 'Give a caption, a credit or a position',
    path: ['(body)'],
  });
export type PhotoUpdate = z.input<typeof photoUpdateSchema>;

export const photoFileQuerySchema = z.object({ size: z.enum(photoSizes).default('original') }).strict();

/** One photo of a dive's gallery, with the entry it belongs to. */
export const galleryPhotoSchema = photoSchema.extend({
  observation: z.object({
    id: z.string(),
    title: z.string(),
    kind,
    observedAt: z.string(),
    tags: z.array(z.string()),
    authorName: z.string(),
  }),
});
export type GalleryPhoto = z.infer<typeof galleryPhotoSchema>;

export const galleryPageSchema = z.object({
  items: z.array(galleryPhotoSchema),
  nextCursor: z.string().nullable(),
  /** How many photos match the filters, over all pages. */
  total: z.number().int(),
});
export type GalleryPage = z.infer<typeof galleryPageSchema>;

export const galleryQuerySchema = z
  .object({
    kind: kind.optional(),
    tag: z.string().max(40).optional(),
    cursor: z.string().max(40).optional(),
    limit: z.coerce.number().int().min(1).max(200).default(60),
  })
  .strict();
export type GalleryQuery = z.input<typeof galleryQuerySchema>;
