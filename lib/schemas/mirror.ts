import { z } from 'zod';

/** `GET /api/health`: a shore mirror adds which ship it copies and how far behind it is. */
export const healthSchema = z.object({
  ok: z.boolean(),
  mirror: z
    .object({
      of: z.string(),
      lagSeconds: z.number().int().min(0),
      link: z.enum(['up', 'down']).optional(),
      restoredAt: z.string().nullable().optional(),
    })
    .optional(),
});
export type Health = z.infer<typeof healthSchema>;
