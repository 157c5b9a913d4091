/** The vehicle's telemetry log, interpolated values and dive statistics. */
import { z } from 'zod';

/** What a log column can hold; the same names as the log reader's channels. */
export const telemetryChannels = ['time', 'pressure', 'depth', 'lat', 'lon', 'heading', 'altitude', 'temperature', 'salinity'] as const;
export type TelemetryChannelName = (typeof telemetryChannels)[number];

export const telemetryImportModes = ['replace', 'append'] as const;
export type TelemetryImportMode = (typeof telemetryImportModes)[number];

/** Why there is no telemetry at an instant. */
export const noTelemetryReasons = ['empty-series', 'before-first-sample', 'after-last-sample', 'gap'] as const;
export type NoTelemetryReason = (typeof noTelemetryReasons)[number];

const at = z.iso.datetime({ offset: true, message: 'Expected an ISO 8601 time with a zone, e.g. 2026-05-14T21:14:07.250Z' });
const isoOut = z.string();
const flag = z.enum(['true', 'false', '1', '0']).transform((v) => v === 'true' || v === '1');

/** An explicit channel (or "ignore") for headers the reader does not recognise by itself. */
export const telemetryMappingSchema = z
  .record(z.string().trim().min(1).max(200), z.enum([...telemetryChannels, 'ignore']))
  .refine((m) => Object.keys(m).length <= 64, { message: 'At most 64 mapped headers' });
export type TelemetryMapping = z.infer<typeof telemetryMappingSchema>;

/**
 * The form fields beside the `file` of an import. `gpsTime` unset follows the time column's
 * own unit ("time (GPS)"); `decimal` "auto" reads decimal commas only in semicolon files whose
 * first rows use them. `mapping` is JSON text of {@link telemetryMappingSchema}.
 */
export const telemetryImportFieldsSchema = z
  .object({
    mode: z.enum(telemetryImportModes).default('replace'),
    gpsTime: flag.optional(),
    pressure: z.enum(['sea', 'absolute']).default('sea'),
    decimal: z.enum(['auto', 'point', 'comma']).default('auto'),
    mapping: z.string().max(16_000).optional(),
  })
  .strict();
export type TelemetryImportFields = z.input<typeof telemetryImportFieldsSchema>;

export const telemetrySpanSchema = z.object({ firstAt: isoOut, lastAt: isoOut });
export type TelemetrySpan = z.infer<typeof telemetrySpanSchema>;

export const telemetryRejectionSchema = z.object({
  /** Line of the file (the header is line 1). */
  line: z.number().int(),
  reason: z.string(),
  code: z.string(),
  /** The column that made the row fail, when one did. */
  channel: z.string().nullable(),
});
export type TelemetryRejection = z.infer<typeof telemetryRejectionSchema>;

export const telemetryColumnsSchema = z.object({
  recognised: z.array(z.object({ header: z.string(), channel: z.enum(telemetryChannels) })),
  unknown: z.array(z.string()),
  unsupportedUnits: z.array(z.object({ header: z.string(), channel: z.enum(telemetryChannels), unit: z.string() })),
  duplicates: z.array(z.object({ header: z.string(), channel: z.enum(telemetryChannels) })),
});

/** What `POST /api/dives/:diveId/telemetry` answers: the import report. */
export const telemetryImportReportSchema = z.object({
  importId: z.string(),
  diveId: z.string(),
  fileName: z.string().nullable(),
  mode: z.enum(telemetryImportModes),
  rowsTaken: z.number().int(),
  rowsRejected: z.number().int(),
  /** The first rejected rows (at most `rejectedListLimit`), in file order. */
  rejected: z.array(telemetryRejectionSchema),
  rejectedListLimit: z.number().int(),
  /** Time span of the rows taken. */
  span: telemetrySpanSchema.nullable(),
  columns: telemetryColumnsSchema,
  delimiter: z.enum(['comma', 'semicolon', 'tab']),
  decimal: z.enum(['point', 'comma']),
  timeScale: z.enum(['utc', 'gps']),
  pressure: z.enum(['sea', 'absolute']),
  /** Where depth came from: a depth column, or computed from pressure (UNESCO 1983) at the site datum's latitude. */
  depthFrom: z.enum(['depth', 'pressure']).nullable(),
  /** Samples the dive had before and has after the import. */
  samplesBefore: z.number().int(),
  samplesAfter: z.number().int(),
  /** Entries whose telemetry values changed, and how many of the dive's entries now fall in a gap of the log. */
  stamped: z.object({ updated: z.number().int(), noTelemetry: z.number().int() }),
  /**
   * What the import noticed, each with a code: `outside_dive` when the log's span does not overlap
   * the dive's phases (a log of another dive, or a clock in local time). Reports kept from before
   * warnings had codes read as code `note`.
   */
  warnings: z.array(
    z.union([z.object({ code: z.string(), message: z.string() }), z.string().transform((message) => ({ code: 'note', message }))]),
  ),
  importedAt: isoOut,
});
export type TelemetryImportReport = z.infer<typeof telemetryImportReportSchema>;

export const telemetryImportSummarySchema = z.object({
  id: z.string(),
  fileName: z.string().nullable(),
  mode: z.enum(telemetryImportModes),
  rowsTaken: z.number().int(),
  rowsRejected: z.number().int(),
  span: telemetrySpanSchema.nullable(),
  importedBy: z.string(),
  importedByName: z.string(),
  importedAt: isoOut,
  /** The import's own report, kept: its first rejected lines and what it noticed. */
  rejected: z.array(telemetryRejectionSchema),
  warnings: z.array(z.object({ code: z.string(), message: z.string() })),
});
export type TelemetryImportSummary = z.infer<typeof telemetryImportSummarySchema>;

export const telemetryQuerySchema = z
  .object({
    points: z.coerce.number().int().min(3, 'At least 3 points').max(5000, 'At most 5000 points').default(1000),
  })
  .strict();

/** `GET /api/dives/:diveId/telemetry`: the log thinned for charts, with its gaps and import history. */
export const telemetrySamplesSchema = z.object({
  diveId: z.string(),
  sampleCount: z.number().int(),
  span: telemetrySpanSchema.nullable(),
  /** Samples further apart than this (seconds) leave "no telemetry" between them. */
  gapS: z.number(),
  /** Samples per channel in the whole log. */
  channels: z.object({
    depth: z.number().int(),
    position: z.number().int(),
    temperature: z.number().int(),
    pressure: z.number().int(),
    heading: z.number().int(),
    altitude: z.number().int(),
    salinity: z.number().int(),
  }),
  /** The depth profile, at most `points` samples chosen by largest-triangle-three-buckets; first and last kept. */
  points: z.array(z.object({ t: isoOut, depth: z.number().nullable(), temperature: z.number().nullable() })),
  /** The position track, at most `points` fixes evenly spread over the log, on the site plan of the campaign's datum. */
  track: z.array(z.object({ t: isoOut, lat: z.number(), lon: z.number(), east: z.number(), north: z.number() })),
  /** Stretches longer than `gapS` with no sample at all (at most 200, earliest first). */
  gaps: z.array(z.object({ from: isoOut, to: isoOut })),
  imports: z.array(telemetryImportSummarySchema),
});
export type TelemetrySamples = z.infer<typeof telemetrySamplesSchema>;

export const telemetryAtQuerySchema = z.object({ t: at }).strict();

/** `GET /api/dives/:diveId/at?t=`: the log's values at one instant. */
export const telemetryAtSchema = z.object({
  t: isoOut,
  depth: z.number().nullable(),
  lat: z.number().nullable(),
  lon: z.number().nullable(),
  temperature: z.number().nullable(),
  noTelemetry: z.enum(noTelemetryReasons).nullable(),
});
export type TelemetryAt = z.infer<typeof telemetryAtSchema>;

const labelCount = z.object({ label: z.string(), count: z.number().int() });

export const diveStatsSchema = z.object({
  /** Durations in ms: launch → on bottom, on bottom → off bottom, off bottom → on deck, launch → on deck. */
  descentMs: z.number().nullable(),
  bottomTimeMs: z.number().nullable(),
  ascentMs: z.number().nullable(),
  totalMs: z.number().nullable(),
  maxDepthM: z.number().nullable(),
  descentRateMPerMin: z.number().nullable(),
  ascentRateMPerMin: z.number().nullable(),
  trackLengthM: z.number().nullable(),
  entryCount: z.number().int(),
  entriesByKind: z.array(labelCount),
  entriesByTag: z.array(labelCount),
});
export type DiveStatsAnswer = z.infer<typeof diveStatsSchema>;

export const summaryObservationSchema = z.object({
  id: z.string(),
  kind: z.enum(['biology', 'archaeology', 'environment', 'operations']),
  title: z.string(),
  observedAt: isoOut,
  depth: z.number().nullable(),
  depthSource: z.enum(['telemetry', 'manual']).nullable(),
  /** Metres east and north of the campaign's datum; null without a position. */
  east: z.number().nullable(),
  north: z.number().nullable(),
  findNumber: z.string().nullable(),
  /** Logged outside the dive's window: kept, but left out of the statistics and the plots' scales. */
  outsideDive: z.boolean(),
});
export type SummaryObservation = z.infer<typeof summaryObservationSchema>;

/** `GET /api/dives/:diveId/summary`: statistics and the site plan's entries. */
export const diveSummarySchema = z.object({
  diveId: z.string(),
  /** Deepest depth in metres: from the log within launch..on deck, else from the entries' depths. */
  maxDepth: z.number().nullable(),
  maxDepthSource: z.enum(['telemetry', 'observations']).nullable(),
  stats: diveStatsSchema,
  span: telemetrySpanSchema.nullable(),
  datum: z.object({ lat: z.number(), lon: z.number() }),
  observations: z.array(summaryObservationSchema),
  finds: z.array(
    z.object({ observationId: z.string(), findNumber: z.string(), east: z.number().nullable(), north: z.number().nullable() }),
  ),
});
export type DiveSummary = z.infer<typeof diveSummarySchema>;
