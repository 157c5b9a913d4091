/** Lengths and areas measured on a photo with the laser scale, in the photo's original pixels. */
import { z } from 'zod';

const coordinate = z.number().finite().min(-1_000_000).max(1_000_000);
const pointSchema = z.tuple([coordinate, coordinate]);

export const measurementKinds = ['length', 'area'] as const;

export const measurementCreateSchema = z
  .object({
    /** Distance between the two lasers, in cm. */
    spacingCm: z.number().finite().gt(0, 'The laser spacing is more than 0 cm').max(1000, 'At most 1000 cm'),
    /** The two laser dots. */
    laser: z.tuple([pointSchema, pointSchema]),
    kind: z.enum(measurementKinds),
    /** A polyline (length, 2 or more) or a polygon (area, 3 or more). */
    points: z.array(pointSchema).min(2, 'At least 2 points').max(500, 'At most 500 points'),
    /** How far each placed point may be off, in pixels (finer when placed zoomed in); 2 when not given. */
    placementPx: z.number().finite().min(0.05, 'At least 0.05 px').max(100, 'At most 100 px').optional(),
  })
  .strict()
  .superRefine((m, ctx) => {
    if (m.kind === 'area' && m.points.length < 3)
      ctx.addIssue({ code: 'custom', path: ['points'], message: 'An area needs at least 3 points' });
  });
export type MeasurementCreate = z.infer<typeof measurementCreateSchema>;

export const measurementSchema = z.object({
  id: z.string(),
  photoId: z.string(),
  observationId: z.string(),
  kind: z.enum(measurementKinds),
  spacingCm: z.number(),
  laser: z.array(pointSchema),
  points: z.array(pointSchema),
  placementPx: z.number(),
  value: z.number(),
  unit: z.string(),
  uncertainty: z.number(),
  createdBy: z.string(),
  createdByName: z.string(),
  createdAt: z.string(),
});
export type Measurement = z.infer<typeof measurementSchema>;

export const measurementListSchema = z.object({ items: z.array(measurementSchema) });
export type MeasurementList = z.infer<typeof measurementListSchema>;
