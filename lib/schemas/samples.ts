import { z } from 'zod';

import { oneLine } from './text';

/** What a sample is of. */
export const sampleTypes = ['biological', 'sediment', 'water', 'rock', 'concretion'] as const;
export type SampleType = (typeof sampleTypes)[number];

/** Gear a new campaign starts from; a campaign may name its own. */
export const sampleGear = ['push core', 'suction sampler', 'water bottle', 'scoop', 'manipulator grab', 'net'] as const;

/** Common ways of keeping a sample; others may be typed. */
export const samplePreservations = ['frozen at −80 °C', '96 % ethanol', '4 % formalin', 'RNA stabiliser', 'dried', 'chilled'] as const;

const sampleNumber = oneLine()
  .min(1, 'A sample number is needed')
  .max(40, 'At most 40 characters')
  .regex(/^[\w./-]+$/, 'Letters, digits, dots, dashes, slashes and underscores only');
const label = (max: number) => oneLine().min(1).max(max, `At most ${max} characters`);

/**
 * `PUT /api/observations/:id/sample`: records or corrects the sample an entry carries. `version`,
 * when sent, must be the entry's current one, as for an edit.
 */
export const sampleInputSchema = z
  .object({
    version: z.number().int().min(1).optional(),
    sampleNumber,
    sampleType: z.enum(sampleTypes),
    gear: label(80).nullable().optional(),
    container: label(80).nullable().optional(),
    preservation: label(80).nullable().optional(),
    parentSampleNumber: sampleNumber.nullable().optional(),
    lab: label(200).nullable().optional(),
  })
  .strict();
export type SampleInput = z.input<typeof sampleInputSchema>;

export const sampleSchema = z.object({
  sampleNumber: z.string(),
  sampleType: z.enum(sampleTypes),
  gear: z.string().nullable(),
  container: z.string().nullable(),
  preservation: z.string().nullable(),
  parentSampleNumber: z.string().nullable(),
  lab: z.string().nullable(),
});
export type Sample = z.infer<typeof sampleSchema>;

/** One row of the sample register, as the lists show it. */
export const sampleRowSchema = sampleSchema.extend({
  observationId: z.string(),
  title: z.string(),
  kind: z.string(),
  diveId: z.string(),
  diveNumber: z.string(),
  observedAt: z.string(),
  custodySteps: z.number().int(),
  /** Who holds it now, by the last step of its trail. */
  heldBy: z.string().nullable(),
  /** Its dive is on deck and nobody has recorded holding it since: the register's warning. */
  noCustodySinceRecovery: z.boolean(),
});
export type SampleRow = z.infer<typeof sampleRowSchema>;
export const sampleListSchema = z.object({ items: z.array(sampleRowSchema) });
