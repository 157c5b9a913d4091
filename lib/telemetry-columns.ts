/**
 * Reading vehicle telemetry logs: which CSV column holds which channel, and
 * turning one CSV record into a telemetry sample.
 *
 * Pure functions over strings; the caller does the CSV tokenising and calls
 * {@link recogniseHeaders} once and {@link parseRow} for every record.
 */
import { gpsToUtcMs } from './gnss-time';
import type { TelemetryRow } from './interpolate';
import { depthFromPressure, seaPressureFromAbsolute } from './seawater';

/** Channels a log column can map to. */
export const TELEMETRY_CHANNELS = ['time', 'pressure', 'depth', 'lat', 'lon', 'heading', 'altitude', 'temperature', 'salinity'] as const;

/** A channel a log column can map to. */
export type TelemetryChannel = (typeof TELEMETRY_CHANNELS)[number];

/** Column index (0-based) of each channel found in a log. */
export type ColumnMapping = Partial<Record<TelemetryChannel, number>>;

/** Explicit choice for a header, by header text: a channel, or `'ignore'` to leave the column out. */
export type MappingOverride = Readonly<Record<string, TelemetryChannel | 'ignore'>>;

/** What {@link recogniseHeaders} made of a header row. */
export interface HeaderRecognition {
  mapping: ColumnMapping;
  /** Headers (BOM removed, otherwise as given) mapped to no channel. */
  unknown: string[];
  /** Headers naming a channel but in units this reader does not convert; left unmapped. */
  unsupportedUnits: { header: string; channel: TelemetryChannel; unit: string }[];
  /** Further columns for a channel already mapped to an earlier (or overridden) column; left unmapped. */
  duplicates: { header: string; channel: TelemetryChannel }[];
  /** True when no column holds the time. */
  missingTime: boolean;
  /** Time scale stated in the time column's unit, e.g. "time (GPS)"; null when none is stated. */
  timeScale: 'gps' | 'utc' | null;
}

const ALIASES: Readonly<Record<TelemetryChannel, readonly string[]>> = {
  time: ['time', 'timestamp', 'utc', 'datetime'],
  pressure: ['pressure_dbar', 'pressure'],
  depth: ['depth_m', 'depth'],
  lat: ['lat', 'latitude'],
  lon: ['lon', 'longitude', 'long'],
  heading: ['heading'],
  altitude: ['altitude_m', 'altitude'],
  // The unit run into the name as loggers often write it (common practice): temp_c, temp_degc, water_temp.
  temperature: [
    'temperature_c',
    'temperature_degc',
    'temperature',
    'temp',
    'temp_c',
    'temp_degc',
    'water_temp',
    'water_temp_c',
    'water_temperature',
  ],
  salinity: ['salinity'],
};

const DEGREES = ['deg', 'degree', 'degrees', '°', 'dd', 'decimal degrees'];
const METRES = ['m', 'metre', 'metres', 'meter', 'meters'];

/** Units accepted in brackets after a header; any other unit leaves the column unmapped. */
const UNITS: Readonly<Record<TelemetryChannel, readonly string[]>> = {
  time: ['utc', 'z', 'gps', 'iso', 'iso 8601', 'iso8601', 's', 'ms'],
  pressure: ['dbar', 'db', 'decibar', 'decibars'],
  depth: METRES,
  lat: DEGREES,
  lon: DEGREES,
  heading: [...DEGREES, 'deg true', '°t', 'degt'],
  altitude: METRES,
  temperature: ['c', '°c', 'degc', 'deg c', 'celsius', 'its-90', '°c its-90'],
  salinity: ['psu', 'pss-78', 'pss78', '1'],
};

const CHANNEL_BY_ALIAS = new Map<string, TelemetryChannel>(
  TELEMETRY_CHANNELS.flatMap((channel) => ALIASES[channel].map((alias) => [alias, channel] as const)),
);

interface HeaderParts {
  /** Header as given, without a byte-order mark. */
  display: string;
  /** Lower-case name with runs of spaces and hyphens as "_". */
  name: string;
  /** Lower-case unit from trailing "(…)" or "[…]", or null. */
  unit: string | null;
}

function splitHeader(header: string): HeaderParts {
  const display = header.replace(/^\uFEFF/, '');
  let name = display.trim().toLowerCase();
  let unit: string | null = null;
  const bracketed = /^(.*?)\s*[([]([^()[\]]*)[)\]]$/.exec(name);
  if (bracketed !== null) {
    name = bracketed[1] ?? '';
    unit = (bracketed[2] ?? '').trim().replace(/\s+/g, ' ');
  }
  return { display, name: name.replace(/[\s-]+/g, '_'), unit };
}

function overrideKey(header: string): string {
  return header
    .replace(/^\uFEFF/, '')
    .trim()
    .toLowerCase();
}

/**
 * Maps the header row of a log to channels. Matching is case-insensitive,
 * ignores surrounding spaces and a byte-order mark, and reads a unit in
 * brackets ("depth (m)", "Temperature [°C]"): a unit this reader cannot
 * convert (say "depth (ft)") leaves the column unmapped and is reported.
 * The first column found for a channel wins.
 *
 * @param headers the header record
 * @param override explicit channel (or `'ignore'`) per header text, matched
 *   the same case-insensitive way; it takes precedence over recognition
 * @throws RangeError when the override names something that is not a channel
 */
export function recogniseHeaders(headers: readonly string[], override: MappingOverride = {}): HeaderRecognition {
  const overrides = new Map<string, TelemetryChannel | 'ignore'>();
  for (const [header, target] of Object.entries(override)) {
    if (target !== 'ignore' && !(TELEMETRY_CHANNELS as readonly string[]).includes(target)) {
      throw new RangeError(`mapping override for "${header}" names no channel: "${String(target)}"`);
    }
    overrides.set(overrideKey(header), target);
  }

  const result: HeaderRecognition = {
    mapping: {},
    unknown: [],
    unsupportedUnits: [],
    duplicates: [],
    missingTime: true,
    timeScale: null,
  };
  const parts = headers.map(splitHeader);
  const decided = new Set<number>();

  parts.forEach((p, index) => {
    const target = overrides.get(overrideKey(p.display));
    if (target === undefined) return;
    decided.add(index);
    if (target === 'ignore') return;
    if (result.mapping[target] === undefined) result.mapping[target] = index;
    else result.duplicates.push({ header: p.display, channel: target });
  });

  parts.forEach((p, index) => {
    if (decided.has(index)) return;
    const channel = CHANNEL_BY_ALIAS.get(p.name);
    if (channel === undefined) {
      result.unknown.push(p.display);
      return;
    }
    if (p.unit !== null && !UNITS[channel].includes(p.unit)) {
      result.unsupportedUnits.push({ header: p.display, channel, unit: p.unit });
      return;
    }
    if (result.mapping[channel] !== undefined) {
      result.duplicates.push({ header: p.display, channel });
      return;
    }
    result.mapping[channel] = index;
    if (channel === 'time' && p.unit !== null) {
      if (p.unit === 'gps') result.timeScale = 'gps';
      else if (p.unit === 'utc' || p.unit === 'z') result.timeScale = 'utc';
    }
  });

  result.missingTime = result.mapping.time === undefined;
  return result;
}

/** Machine-readable reason a value was refused. */
export type TelemetryErrorCode = 'missing-time' | 'bad-time' | 'no-zone' | 'bad-number' | 'out-of-range';

/** Days in `month` (1 to 12) of `year` in the Gregorian calendar, leap years included. */
function daysInMonth(year: number, month: number): number {
  if (month === 2) return (year % 4 === 0 && year % 100 !== 0) || year % 400 === 0 ? 29 : 28;
  return month === 4 || month === 6 || month === 9 || month === 11 ? 30 : 31;
}

/** Result of {@link parseTime}. */
export type TimeResult = { ok: true; ms: number } | { ok: false; code: TelemetryErrorCode; reason: string };

/** Earliest instant accepted from a log: 1980-01-01 UTC. */
export const EARLIEST_LOG_MS = Date.UTC(1980, 0, 1);
/** First instant no longer accepted from a log: 2200-01-01 UTC. */
export const LATEST_LOG_MS = Date.UTC(2200, 0, 1);

/** Epoch numbers below this are seconds, at or above it milliseconds. */
export const EPOCH_MS_THRESHOLD = 1e11;

const ISO_8601 = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2})(?:[.,](\d+))?)?\s*(?:(Z)|([+-])(\d{2})(?::?(\d{2}))?)?$/i;
const EPOCH_NUMBER = /^\d+(?:\.\d+)?$/;

/**
 * Reads a log time stamp as ms since epoch UTC, rounded to the millisecond.
 *
 * Accepted forms:
 * - ISO 8601 date and time with "Z" or a UTC offset ("2024-03-01T10:15:30.250Z",
 *   "2024-03-01 22:15:30+12:00"). A time without a zone is refused rather than
 *   read in the zone of whichever computer parses it.
 * - Epoch seconds or epoch milliseconds, told apart by size: values below
 *   10¹¹ are seconds (10¹¹ s is in the year 5138), values from 10¹¹ up are
 *   milliseconds (10¹¹ ms is 1973-03-03), so every instant from 1980 on is
 *   read unambiguously.
 *
 * Instants before 1980 or from 2200 on are refused: they come from a column of
 * elapsed seconds or from microseconds, not from a clock.
 *
 * @param options.gpsTime the log's clock runs on GPS time; leap seconds are removed
 */
export function parseTime(value: string, options: { gpsTime?: boolean } = {}): TimeResult {
  const text = value.trim();
  if (text === '') return { ok: false, code: 'missing-time', reason: 'the time is empty' };

  let ms: number;
  if (EPOCH_NUMBER.test(text)) {
    const n = Number(text);
    ms = n < EPOCH_MS_THRESHOLD ? n * 1000 : n;
  } else {
    const m = ISO_8601.exec(text);
    if (m === null) {
      return { ok: false, code: 'bad-time', reason: `"${text}" is not an ISO 8601 time or an epoch number` };
    }
    const [, y, mo, d, h, mi, s, frac, z, sign, oh, om] = m;
    if (z === undefined && sign === undefined) {
      return { ok: false, code: 'no-zone', reason: `"${text}" has no time zone; add Z or an offset such as +12:00` };
    }
    const year = Number(y);
    const month = Number(mo);
    const day = Number(d);
    const hour = Number(h);
    const minute = Number(mi);
    const second = s === undefined ? 0 : Number(s);
    const offsetH = oh === undefined ? 0 : Number(oh);
    const offsetM = om === undefined ? 0 : Number(om);
    const base = Date.UTC(year, month - 1, day, hour, minute, second);
    if (
      hour > 23 ||
      minute > 59 ||
      second > 59 ||
      offsetH > 23 ||
      offsetM > 59 ||
      // Date.UTC reads years 0 to 99 as 1900 to 1999.
      year < 100 ||
      month < 1 ||
      month > 12 ||
      day < 1 ||
      day > daysInMonth(year, month)
    ) {
      return { ok: false, code: 'bad-time', reason: `"${text}" is not a valid date and time` };
    }
    const fractionMs = frac === undefined ? 0 : Number(`0.${frac}`) * 1000;
    const offsetMs = (sign === '-' ? -1 : 1) * (offsetH * 60 + offsetM) * 60_000;
    ms = base + fractionMs - offsetMs;
  }

  ms = Math.round(ms);
  if (options.gpsTime === true) ms = gpsToUtcMs(ms);
  if (!(ms >= EARLIEST_LOG_MS && ms < LATEST_LOG_MS)) {
    return { ok: false, code: 'out-of-range', reason: `"${text}" is not between 1980 and 2200` };
  }
  return { ok: true, ms };
}

/** Options for {@link parseRow}. */
export interface ParseRowOptions {
  /** Latitude of the dive site in degrees, for depth from pressure. */
  latitudeDeg: number;
  /** Whether the pressure column is sea pressure or absolute pressure (sea + one atmosphere). */
  pressure: 'sea' | 'absolute';
  /** The log's clock runs on GPS time. */
  gpsTime: boolean;
  /**
   * Numbers use "," as the decimal mark ("-7,43"), as in semicolon-separated
   * files from locales that write decimals that way. The caller sets this
   * for the whole file (typically when the delimiter is ";"); it is never
   * guessed per value, since "1,234" could be either. Default false.
   */
  decimalComma?: boolean;
}

/** Result of {@link parseRow}. */
export type RowResult =
  { ok: true; sample: TelemetryRow } | { ok: false; code: TelemetryErrorCode; channel: TelemetryChannel; reason: string };

type NumericChannel = Exclude<TelemetryChannel, 'time'>;

/** Accepted ranges, inclusive (common practice, chosen to catch sensor and unit errors). */
const RANGES: Readonly<Record<NumericChannel, readonly [number, number]>> = {
  pressure: [-5, 11_500],
  depth: [-5, 11_000],
  lat: [-90, 90],
  lon: [-180, 180],
  heading: [-180, 360],
  altitude: [0, 11_000],
  temperature: [-5, 45],
  salinity: [0, 50],
};

const UNITS_FOR_MESSAGE: Readonly<Record<NumericChannel, string>> = {
  pressure: ' dbar',
  depth: ' m',
  lat: '°',
  lon: '°',
  heading: '°',
  altitude: ' m',
  temperature: ' °C',
  salinity: '',
};

const NUMBER = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;
const NO_VALUE = new Set(['', 'nan', 'na', 'n/a', 'null', 'none']);

/** Whether a trimmed cell means "no value"; a cell not starting with a letter (any number) is not looked up. */
function isNoValue(cell: string): boolean {
  if (cell === '') return true;
  const c = cell.charCodeAt(0) | 0x20;
  return c >= 0x61 && c <= 0x7a && NO_VALUE.has(cell.toLowerCase());
}

/**
 * Reads a number strictly: the whole text must be a decimal number ("12abc",
 * "0x1F", "1 000" and "Infinity" are refused). With `decimalComma`, "," is
 * the decimal mark and "." is refused.
 *
 * @returns the number, or null when the text is not one
 */
export function parseStrictNumber(text: string, decimalComma = false): number | null {
  let t = text.trim();
  if (decimalComma) {
    if (t.includes('.')) return null;
    t = t.replace(',', '.');
  }
  if (!NUMBER.test(t)) return null;
  const n = Number(t);
  return Number.isFinite(n) ? n : null;
}

function fail(code: TelemetryErrorCode, channel: TelemetryChannel, reason: string): RowResult {
  return { ok: false, code, channel, reason };
}

/**
 * Turns one CSV record into a telemetry sample.
 *
 * Empty cells and "NaN", "NA", "N/A", "null", "none" mean the channel is
 * absent from this row. Any other cell must be a number within the channel's
 * range, or the whole row is refused, naming the column. Absolute pressure is
 * converted to sea pressure, and when the log has a pressure column but no
 * depth column, depth is computed from pressure (UNESCO 1983) at
 * `latitudeDeg`. Depth is never mixed from both sources within one log.
 * Headings are returned in [0, 360).
 *
 * @throws RangeError when depth must be computed and `latitudeDeg` is not a valid latitude
 */
export function parseRow(record: readonly string[], mapping: ColumnMapping, options: ParseRowOptions): RowResult {
  const timeIndex = mapping.time;
  if (timeIndex === undefined) return fail('missing-time', 'time', 'the log has no time column');
  const timeCell = record[timeIndex] ?? '';
  if (isNoValue(timeCell.trim())) return fail('missing-time', 'time', 'the time is empty');
  const time = parseTime(timeCell, options);
  if (!time.ok) return fail(time.code, 'time', time.reason);

  const sample: TelemetryRow = { t: time.ms };
  const decimalComma = options.decimalComma ?? false;

  for (const channel of TELEMETRY_CHANNELS) {
    if (channel === 'time') continue;
    const index = mapping[channel];
    if (index === undefined) continue;
    const cell = (record[index] ?? '').trim();
    if (isNoValue(cell)) continue;
    let value = parseStrictNumber(cell, decimalComma);
    if (value === null) return fail('bad-number', channel, `${channel} "${cell}" is not a number`);
    if (channel === 'pressure' && options.pressure === 'absolute') value = seaPressureFromAbsolute(value);
    const [min, max] = RANGES[channel];
    if (value < min || value > max) {
      const unit = UNITS_FOR_MESSAGE[channel];
      return fail('out-of-range', channel, `${channel} ${cell} is outside ${min}${unit} to ${max}${unit}`);
    }
    if (channel === 'heading') value = value < 0 || value >= 360 ? value - 360 * Math.floor(value / 360) : value;
    sample[channel] = value;
  }

  if (mapping.depth === undefined && sample.pressure !== undefined && sample.pressure !== null) {
    const lat = options.latitudeDeg;
    if (!Number.isFinite(lat) || Math.abs(lat) > 90) {
      throw new RangeError(`latitudeDeg must be a latitude for depth from pressure, got ${lat}`);
    }
    const depth = depthFromPressure(sample.pressure, lat);
    const [min, max] = RANGES.depth;
    if (depth < min || depth > max) {
      return fail('out-of-range', 'pressure', `depth ${depth.toFixed(1)} m from pressure is outside ${min} m to ${max} m`);
    }
    sample.depth = depth;
  }
  return { ok: true, sample };
}

/** Powers of ten a double holds exactly (10²² is the last). */
const EXACT_POWERS_OF_TEN = Float64Array.from({ length: 23 }, (_, k) => 10 ** k);
/** Mantissas up to this many digits are integers a double holds exactly (below 2⁵³). */
const EXACT_DIGITS = 15;
const NOT_READ = -1;
/** The digit at `i` as a number (outside 0 to 9 for any other character). */
const digitAt = (line: string, i: number) => line.charCodeAt(i) - 0x30;
/** Where "YYYY-MM-DDTHH:MM:SS" has its digits. */
const ISO_DIGITS_AT = [0, 1, 2, 3, 5, 6, 8, 9, 11, 12, 14, 15, 17, 18] as const;

/**
 * A reader of one plain log line (no quotes, no spaces, decimal point) straight into numbers,
 * for the rows that make up nearly all of a long log: "2026-05-13T17:40:00.100Z,598.41,...".
 * It reads exactly what {@link parseRow} reads from the same line, or gives up (returns false)
 * on any line it is not sure of (a space, an exponent, a "NaN", an offset other than Z, a value
 * out of range, a field count other than the header's), leaving that line to the full reader,
 * which then says what is wrong with it.
 *
 * Decimals are read as an integer mantissa divided by an exact power of ten, which a double
 * rounds correctly (Clinger 1990, "How to read floating point numbers accurately", PLDI '90, the
 * fast path): the same number `Number(text)` gives. Longer mantissas go to the full reader.
 *
 * @param channels the order of the numbers written after the time in `out`
 * @returns a function writing the time to `out[0]` and each channel to `out[1 + k]` (NaN for none);
 *   it reads `line` from `start` to `end`, so a caller holding many lines in one string need not
 *   cut each out
 */
export function plainRowReader(
  mapping: ColumnMapping,
  options: ParseRowOptions,
  fieldCount: number,
  separator: string,
  channels: readonly Exclude<TelemetryChannel, 'time'>[],
): ((line: string, out: Float64Array, start?: number, end?: number) => boolean) | null {
  const timeIndex = mapping.time;
  if (timeIndex === undefined || options.decimalComma === true || separator.length !== 1) return null;
  const sep = separator.charCodeAt(0);
  // For each field: the slot in `out` it goes to (0 for the time), or NOT_READ.
  const slotOf = new Int32Array(fieldCount).fill(NOT_READ);
  // Each field's range and what is done to its value, looked up by field rather than by channel
  // name, which is one of the costs a million rows multiply.
  const minOf = new Float64Array(fieldCount);
  const maxOf = new Float64Array(fieldCount);
  const absolutePressureField = options.pressure === 'absolute' && mapping.pressure !== undefined ? mapping.pressure : NOT_READ;
  const headingField = mapping.heading ?? NOT_READ;
  slotOf[timeIndex] = 0;
  for (const channel of TELEMETRY_CHANNELS) {
    if (channel === 'time') continue;
    const index = mapping[channel];
    if (index === undefined || index >= fieldCount) continue;
    const k = channels.indexOf(channel);
    // A channel the caller does not keep is still checked by the full reader.
    if (k === -1) return null;
    slotOf[index] = 1 + k;
    [minOf[index], maxOf[index]] = RANGES[channel];
  }
  const pressureSlot = mapping.pressure !== undefined ? 1 + channels.indexOf('pressure') : NOT_READ;
  const depthSlot = 1 + channels.indexOf('depth');
  const depthFromPressureNeeded = mapping.depth === undefined && mapping.pressure !== undefined;
  if (depthFromPressureNeeded && (depthSlot === 0 || !Number.isFinite(options.latitudeDeg) || Math.abs(options.latitudeDeg) > 90))
    return null;
  const gpsTime = options.gpsTime;
  // The last date read and its midnight, so a row costs no Date.UTC while the day stays the same.
  let dayKey = -1;
  let dayMs = 0;

  /** The time of `line` from `from` to `to`, or NaN when the full reader must read it. */
  const readTime = (line: string, from: number, to: number): number => {
    const n = to - from;
    let ms: number;
    if (n >= 20 && line.charCodeAt(to - 1) === 0x5a /* Z */) {
      // YYYY-MM-DDTHH:MM:SS[.f+]Z
      if (
        line.charCodeAt(from + 4) !== 0x2d ||
        line.charCodeAt(from + 7) !== 0x2d ||
        (line.charCodeAt(from + 10) !== 0x54 && line.charCodeAt(from + 10) !== 0x20) ||
        line.charCodeAt(from + 13) !== 0x3a ||
        line.charCodeAt(from + 16) !== 0x3a
      )
        return Number.NaN;
      for (const i of ISO_DIGITS_AT) {
        const v = digitAt(line, from + i);
        if (v < 0 || v > 9) return Number.NaN;
      }
      const year = digitAt(line, from + 0) * 1000 + digitAt(line, from + 1) * 100 + digitAt(line, from + 2) * 10 + digitAt(line, from + 3);
      const month = digitAt(line, from + 5) * 10 + digitAt(line, from + 6);
      const day = digitAt(line, from + 8) * 10 + digitAt(line, from + 9);
      const hour = digitAt(line, from + 11) * 10 + digitAt(line, from + 12);
      const minute = digitAt(line, from + 14) * 10 + digitAt(line, from + 15);
      const second = digitAt(line, from + 17) * 10 + digitAt(line, from + 18);
      if (hour > 23 || minute > 59 || second > 59) return Number.NaN;
      const key = year * 10000 + month * 100 + day;
      if (key !== dayKey) {
        if (year < 100 || month < 1 || month > 12 || day < 1 || day > daysInMonth(year, month)) return Number.NaN;
        dayKey = key;
        dayMs = Date.UTC(year, month - 1, day);
      }
      ms = dayMs + hour * 3_600_000 + minute * 60_000 + second * 1000;
      if (n === 20) {
        // No fraction.
      } else if (line.charCodeAt(from + 19) === 0x2e || line.charCodeAt(from + 19) === 0x2c) {
        const digits = n - 21;
        if (digits < 1) return Number.NaN;
        for (let i = 20; i < n - 1; i++) {
          const v = digitAt(line, from + i);
          if (v < 0 || v > 9) return Number.NaN;
        }
        // Three digits are whole milliseconds; other lengths are read as the full reader reads them.
        ms +=
          digits === 3
            ? digitAt(line, from + 20) * 100 + digitAt(line, from + 21) * 10 + digitAt(line, from + 22)
            : Number(`0.${line.slice(from + 20, to - 1)}`) * 1000;
      } else return Number.NaN;
    } else {
      // Epoch seconds or milliseconds as whole digits.
      if (n < 1 || n > 15) return Number.NaN;
      let v = 0;
      for (let i = from; i < to; i++) {
        const x = line.charCodeAt(i) - 0x30;
        if (x < 0 || x > 9) return Number.NaN;
        v = v * 10 + x;
      }
      ms = v < EPOCH_MS_THRESHOLD ? v * 1000 : v;
    }
    ms = Math.round(ms);
    if (gpsTime) ms = gpsToUtcMs(ms);
    return ms >= EARLIEST_LOG_MS && ms < LATEST_LOG_MS ? ms : Number.NaN;
  };

  // Each field is read as it is scanned for its end: numbers digit by digit in the one pass, so a
  // line's characters are each looked at once (the time, checked by its fixed layout, is the exception).
  return (line, out, start = 0, end = line.length) => {
    out.fill(Number.NaN);
    let from = start;
    for (let field = 0; ; field++) {
      const slot = slotOf[field]!;
      let at = from;
      if (slot > 0) {
        let negative = false;
        if (at < end) {
          const first = line.charCodeAt(at);
          if (first === 0x2d || first === 0x2b) {
            negative = first === 0x2d;
            at++;
          }
        }
        let mantissa = 0;
        let digits = 0;
        let decimals = -1;
        for (; at < end; at++) {
          const ch = line.charCodeAt(at);
          if (ch === sep) break;
          if (ch === 0x2e) {
            if (decimals !== -1) return false;
            decimals = 0;
            continue;
          }
          const x = ch - 0x30;
          if (x < 0 || x > 9) return false;
          mantissa = mantissa * 10 + x;
          digits++;
          if (decimals !== -1) decimals++;
        }
        // An empty field is no value; anything else must be a number of at most EXACT_DIGITS digits.
        if (at > from) {
          if (digits === 0 || digits > EXACT_DIGITS) return false;
          let value = decimals > 0 ? mantissa / EXACT_POWERS_OF_TEN[decimals]! : mantissa;
          if (negative) value = -value;
          if (field === absolutePressureField) value = seaPressureFromAbsolute(value);
          if (value < minOf[field]! || value > maxOf[field]!) return false;
          if (field === headingField && (value < 0 || value >= 360)) value = value - 360 * Math.floor(value / 360);
          out[slot] = value;
        }
      } else {
        while (at < end && line.charCodeAt(at) !== sep) at++;
        if (slot === 0) {
          const t = readTime(line, from, at);
          if (t !== t) return false;
          out[0] = t;
        }
      }
      // The line must have as many fields as the header, no more and no fewer.
      if (at >= end) {
        if (field + 1 !== fieldCount) return false;
        break;
      }
      if (field + 1 >= fieldCount) return false;
      from = at + 1;
    }
    if (depthFromPressureNeeded) {
      const pressure = out[pressureSlot]!;
      if (pressure === pressure) {
        const depth = depthFromPressure(pressure, options.latitudeDeg);
        if (!(depth >= RANGES.depth[0] && depth <= RANGES.depth[1])) return false;
        out[depthSlot] = depth;
      }
    }
    return true;
  };
}
