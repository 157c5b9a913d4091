/** Photos and frame grabs on observations. */
import { z } from 'zod';

export const photoSizes = ['thumb', 'display', 'original'] as const;
export type PhotoSize = (typeof photoSizes)[number];

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
