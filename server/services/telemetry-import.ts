/**
 * Importing a vehicle telemetry log: the CSV is parsed as a stream (comma, semicolon or tab; BOM;
 * CRLF), every row checked, and the rows taken written as they are read, in batches, to a staging
 * file of their own; then one transaction copies them into the dive's log together with the
 * re-stamped entries and the import's record, so an import is never half done. Neither the file
 * nor its rows are ever held whole in memory, however long the log.
 */
import { randomUUID } from 'node:crypto';
import { closeSync, createReadStream, openSync, readSync, rmSync, writeSync } from 'node:fs';
import { open } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { Writable } from 'node:stream';
import { pipeline } from 'node:stream/promises';

import type { Statement } from 'better-sqlite3';
import { Parser, type CsvError, type Options as CsvOptions } from 'csv-parse';
import { ZodError } from 'zod';

import type { Db } from '../../db/client';
import { telemetryImports } from '../../db/schema';
import { upperBound, type TelemetryRow } from '../../lib/interpolate';
import {
  telemetryImportFieldsSchema,
  type ErrorCode,
  telemetryMappingSchema,
  type TelemetryImportReport,
  type TelemetryMapping,
  type TelemetryRejection,
} from '../../lib/schemas';
import {
  parseRow,
  plainRowReader,
  recogniseHeaders,
  type ColumnMapping,
  type HeaderRecognition,
  type TelemetryChannel,
} from '../../lib/telemetry-columns';
import { ApiError, fieldError } from '../errors';
import type { LiveHub } from './live';
import { diveFacts, spanOf, stampDiveFromStoredLog } from './telemetry';
import { countSamples, forgetLog, loadTimes, STORED_CHANNELS } from './telemetry-series';
import { oneAtATimePerKey } from './one-at-a-time';
import { announceStamped } from './telemetry-stamp';

/** Rejected rows listed one by one in the report; the count beyond it is still exact. */
export const REJECTED_LIST_LIMIT = 200;
/** Rows per INSERT statement: nine values a row (and the dive once) stay far below SQLite's limit on parameters. */
const INSERT_BATCH = 200;
const HEAD_BYTES = 64 * 1024;
/**
 * Bytes read from the log at a time. Small enough that each chunk, and the text cut from it, is
 * collected young: reading a long log in megabyte chunks left hundreds of megabytes of dead
 * strings in the old generation before a full collection came.
 */
const READ_CHUNK = 64 * 1024;
/** The longest record read, in characters: a line longer than this is no telemetry row. */
const MAX_RECORD_SIZE = 64 * 1024;

export type ImportRequest = {
  diveId: string;
  userId: string;
  filePath: string;
  fileName: string | null;
  /** The multipart text fields, unparsed. */
  fields: unknown;
};

type Delimiter = TelemetryImportReport['delimiter'];
const DELIMITERS: Record<Delimiter, string> = { comma: ',', semicolon: ';', tab: '\t' };

const fileIssue = (code: ErrorCode, message: string, detail: string) =>
  new ApiError(400, code, message, [{ path: 'file', message: detail }]);

function parseMapping(text: string | undefined): TelemetryMapping {
  if (text === undefined || text.trim() === '') return {};
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch {
    throw fieldError(
      'mapping',
      'Give the mapping as JSON, e.g. {"Zeit": "time", "Tiefe": "depth"}',
      'The column mapping is not valid JSON.',
    );
  }
  const parsed = telemetryMappingSchema.safeParse(json);
  if (!parsed.success) {
    throw new ZodError(parsed.error.issues.map((i) => ({ ...i, path: ['mapping', ...i.path] })));
  }
  return parsed.data;
}

/** The first lines of the file, decoded, with what they tell about its text encoding. */
async function readHead(filePath: string): Promise<{ bytes: number; size: number; text: string; encoding: 'utf8' | 'latin1' }> {
  const handle = await open(filePath, 'r');
  try {
    const { size } = await handle.stat();
    const buffer = Buffer.alloc(HEAD_BYTES);
    const { bytesRead } = await handle.read(buffer, 0, HEAD_BYTES, 0);
    const head = buffer.subarray(0, bytesRead);
    try {
      // `stream: true` lets a character cut by the end of the sample pass.
      const text = new TextDecoder('utf-8', { fatal: true }).decode(head, { stream: true });
      return { bytes: bytesRead, size, text, encoding: 'utf8' };
    } catch {
      return { bytes: bytesRead, size, text: head.toString('latin1'), encoding: 'latin1' };
    }
  } finally {
    await handle.close();
  }
}

/** Counts a character outside double quotes. */
function countOutsideQuotes(line: string, char: string): number {
  let n = 0;
  let quoted = false;
  for (const c of line) {
    if (c === '"') quoted = !quoted;
    else if (c === char && !quoted) n++;
  }
  return n;
}

/** The delimiter of a log, from its header line: whichever of comma, semicolon and tab it holds most of. */
function detectDelimiter(lines: string[]): Delimiter {
  const header = lines[0] ?? '';
  let best: Delimiter = 'comma';
  let bestCount = 0;
  for (const [name, char] of Object.entries(DELIMITERS) as [Delimiter, string][]) {
    const n = countOutsideQuotes(header, char);
    if (n > bestCount) {
      best = name;
      bestCount = n;
    }
  }
  return best;
}

/**
 * Whether a semicolon log writes decimals with a comma: its first data rows show numbers like
 * "598,4" and none like "598.4". Only semicolon files can, since a comma there is no delimiter.
 */
function detectDecimalComma(lines: string[]): boolean {
  let comma = 0;
  let point = 0;
  for (const line of lines.slice(1, 21)) {
    for (const cell of line.split(';')) {
      const c = cell.trim().replace(/^"|"$/g, '');
      if (/^[+-]?\d+,\d+$/.test(c)) comma++;
      else if (/^[+-]?\d+\.\d+$/.test(c)) point++;
    }
  }
  return comma > 0 && point === 0;
}

/** A csv-parse stream that hands on each record as it is parsed, together with the line it ends on. */
class LogParser extends Parser {
  constructor(
    options: CsvOptions,
    private readonly onRecord: (record: string[], line: number) => void,
  ) {
    super(options);
  }

  /** Where the last record ended, and how many empty and comment lines had been skipped by then. */
  private lastEnd = 0;
  private skippedAtLastEnd = 0;

  // csv-parse's per-record info objects cost more than the parsing itself on a long log, while
  // its running line count is exact at the moment a record is pushed.
  override push(chunk: unknown): boolean {
    if (chunk === null) return super.push(null);
    this.lastEnd = this.info.lines;
    this.skippedAtLastEnd = this.info.empty_lines + this.info.comment_lines;
    if (!this.destroyed) this.onRecord(chunk as string[], this.info.lines);
    return true;
  }

  /**
   * The line the record being read began on: the one after the last record, past the empty and
   * comment lines skipped since (a quote left open runs on over the lines after it).
   */
  recordStart(): number {
    return this.lastEnd + 1 + (this.info.empty_lines + this.info.comment_lines - this.skippedAtLastEnd);
  }
}

/** A header line too long to be one: nothing can be read without the column names. */
const headerTooLong = (line: number) =>
  new ApiError(400, 'record_too_long', `The header (line ${line}) runs past ${MAX_RECORD_SIZE} characters; nothing was imported.`, [
    { path: `file.line.${line}`, message: 'The first line must name the columns, e.g. time,depth_m,lat,lon' },
  ]);

/**
 * Whether a log needs csv-parse: it holds a double quote somewhere (a quoted field may hold a
 * delimiter or a line end) or ends lines with a bare CR. Vehicle logs rarely do; for the rest
 * splitting lines is five times faster than a full parser and reads the same records.
 */
async function needsFullParser(filePath: string): Promise<boolean> {
  let previousCr = false;
  for await (const chunk of createReadStream(filePath, { highWaterMark: READ_CHUNK }) as AsyncIterable<Buffer>) {
    if (previousCr && chunk[0] !== 0x0a) return true;
    if (chunk.indexOf(0x22) !== -1) return true;
    for (let i = chunk.indexOf(0x0d); i !== -1; i = chunk.indexOf(0x0d, i + 1)) {
      if (i + 1 < chunk.length && chunk[i + 1] !== 0x0a) return true;
    }
    previousCr = chunk[chunk.length - 1] === 0x0d;
  }
  return false;
}

/**
 * The lines of a log without quotes, with csv-parse's rules as the import sets them: a BOM
 * dropped, LF or CRLF line ends, empty lines and lines starting with "#" skipped, a record longer
 * than MAX_RECORD_SIZE refused. `line` counts every line of the file from 1.
 */
async function readPlainRecords(
  filePath: string,
  s: { encoding: 'utf8' | 'latin1' },
  onLine: (text: string, from: number, to: number, line: number) => void,
  onTooLong: (line: number) => void,
): Promise<void> {
  let line = 0;
  /**
   * Takes the line of `text` from `from` to `to` (its LF left out). Lines are handed on as places
   * in the chunk they were read in, not cut out of it: a string per line was most of the garbage
   * a long import left behind.
   */
  const take = (text: string, from: number, to: number) => {
    line++;
    if (to > from && text.charCodeAt(to - 1) === 0x0d) to--;
    if (line === 1) {
      // A UTF-8 byte-order mark, as decoded in UTF-8 or in Latin-1.
      text = text.slice(from, to).replace(/^(\uFEFF|\u00EF\u00BB\u00BF)/, '');
      from = 0;
      to = text.length;
    }
    if (from === to || text.charCodeAt(from) === 0x23 /* # */) return;
    if (to - from > MAX_RECORD_SIZE) return onTooLong(line);
    onLine(text, from, to, line);
  };
  let rest = '';
  // Inside a line already refused as too long: its remainder is skipped up to its end.
  let skipping = false;
  const stream = createReadStream(filePath, { highWaterMark: READ_CHUNK, encoding: s.encoding });
  for await (const chunk of stream as AsyncIterable<string>) {
    let start = 0;
    if (skipping) {
      const nl = chunk.indexOf('\n');
      if (nl === -1) continue;
      start = nl + 1;
      skipping = false;
    }
    const text = rest === '' ? chunk.slice(start) : rest + chunk;
    start = 0;
    for (let nl = text.indexOf('\n'); nl !== -1; nl = text.indexOf('\n', start)) {
      take(text, start, nl);
      start = nl + 1;
    }
    rest = text.slice(start);
    if (rest.length > MAX_RECORD_SIZE + 1) {
      // A line without end in sight (a file with no line breaks): refuse it without holding it.
      line++;
      onTooLong(line);
      rest = '';
      skipping = true;
    }
  }
  if (rest !== '' && !skipping) take(rest, 0, rest.length);
}

type ParseOutcome = {
  rowsTaken: number;
  firstMs: number;
  lastMs: number;
  recognition: HeaderRecognition;
  headers: string[];
  rowsRejected: number;
  rejected: TelemetryRejection[];
};

type ParseSettings = {
  delimiter: Delimiter;
  encoding: 'utf8' | 'latin1';
  decimalComma: boolean;
  gpsTime: boolean | undefined;
  pressure: 'sea' | 'absolute';
  latitudeDeg: number;
  mapping: TelemetryMapping;
  /** Times already stored (append), ascending. */
  existing: Float64Array | null;
  /** Where each row taken goes, as soon as it is checked. */
  take: (sample: TelemetryRow) => void;
  /** The same for a row read straight into numbers: its time, then each of STORED_CHANNELS (NaN for none). */
  takeRow: (row: Float64Array) => void;
};

const isoOf = (ms: number) => new Date(ms).toISOString();

function hasValue(sample: TelemetryRow): boolean {
  for (const c of STORED_CHANNELS) if (sample[c] != null) return true;
  return false;
}

async function parseLog(filePath: string, s: ParseSettings): Promise<ParseOutcome & { gpsTime: boolean }> {
  let rowsTaken = 0;
  let firstMs = Number.NaN;
  const rejected: TelemetryRejection[] = [];
  let rowsRejected = 0;
  let headers: string[] | null = null;
  let recognition: HeaderRecognition | null = null;
  let mapping: ColumnMapping = {};
  let gpsTime = s.gpsTime ?? false;
  let lastT = Number.NEGATIVE_INFINITY;
  let lastLine = 0;

  const reject = (line: number, code: string, channel: TelemetryChannel | null, reason: string) => {
    rowsRejected++;
    if (rejected.length < REJECTED_LIST_LIMIT) rejected.push({ line, code, channel, reason });
  };

  /** Takes one record, the last line of which is `line`; throws to stop the import. */
  const onRecord = (record: string[], line: number): void => {
    if (!headers) {
      headers = record;
      recognition = recogniseHeaders(record, s.mapping);
      if (recognition.missingTime) {
        throw new ApiError(400, 'no_time_column', 'The log has no time column, so none of its rows can be placed in time.', [
          {
            path: 'file',
            message: `Columns found: ${record.map((h) => `"${h.replace(/^\uFEFF/, '')}"`).join(', ')}. Name one "time" (ISO 8601 UTC or epoch seconds or ms), or map it with the mapping option.`,
          },
        ]);
      }
      mapping = recognition.mapping;
      if (s.gpsTime === undefined && recognition.timeScale === 'gps') gpsTime = true;
      return;
    }
    if (record.length !== headers.length) {
      reject(line, 'field-count', null, `the row has ${record.length} fields where the header has ${headers.length}`);
      return;
    }
    const result = parseRow(record, mapping, {
      latitudeDeg: s.latitudeDeg,
      pressure: s.pressure,
      gpsTime,
      decimalComma: s.decimalComma,
    });
    if (!result.ok) {
      reject(line, result.code, result.channel, result.reason);
      return;
    }
    const sample = result.sample;
    if (!hasValue(sample)) {
      reject(line, 'no-values', null, 'the row has a time but no values');
      return;
    }
    if (!timeTaken(sample.t, line)) return;
    s.take(sample);
    counted(sample.t, line);
  };

  /** Whether a row's time follows the rows taken and is not stored yet; refuses the row if not. */
  const timeTaken = (t: number, line: number): boolean => {
    if (t === lastT) {
      reject(line, 'duplicate-time', 'time', `the time ${isoOf(t)} repeats line ${lastLine}`);
      return false;
    }
    if (t < lastT) {
      reject(line, 'time-backwards', 'time', `the time ${isoOf(t)} is earlier than line ${lastLine} (${isoOf(lastT)})`);
      return false;
    }
    if (s.existing) {
      const i = upperBound(s.existing, t) - 1;
      if (i >= 0 && s.existing[i] === t) {
        reject(line, 'already-stored', 'time', `the dive's log already has a sample at ${isoOf(t)}`);
        return false;
      }
    }
    return true;
  };

  const counted = (t: number, line: number) => {
    if (rowsTaken++ === 0) firstMs = t;
    lastT = t;
    lastLine = line;
  };

  const separator = DELIMITERS[s.delimiter];
  const row = new Float64Array(1 + STORED_CHANNELS.length);
  // Built at the first data line, once the header has told the columns (and maybe the GPS clock).
  let plainRow: ReturnType<typeof plainRowReader> | undefined;
  /** Takes one line of a log without quotes: read straight into numbers where it can be, else split and read in full. */
  const onLine = (text: string, from: number, to: number, line: number): void => {
    if (headers) {
      plainRow ??= plainRowReader(
        mapping,
        { latitudeDeg: s.latitudeDeg, pressure: s.pressure, gpsTime, decimalComma: s.decimalComma },
        headers.length,
        separator,
        STORED_CHANNELS,
      );
      if (plainRow?.(text, row, from, to)) {
        let values = false;
        for (let k = 1; k < row.length; k++) if (row[k] === row[k]) values = true;
        if (!values) return reject(line, 'no-values', null, 'the row has a time but no values');
        const t = row[0]!;
        if (!timeTaken(t, line)) return;
        s.takeRow(row);
        counted(t, line);
        return;
      }
    }
    onRecord(text.slice(from, to).split(separator), line);
  };

  if (await needsFullParser(filePath)) {
    const parser: LogParser = new LogParser(
      {
        delimiter: DELIMITERS[s.delimiter],
        encoding: s.encoding,
        bom: true,
        relax_column_count: true,
        skip_empty_lines: true,
        comment: '#',
        comment_no_infix: true,
        skip_records_with_error: true,
        max_record_size: MAX_RECORD_SIZE,
        on_skip: (err: CsvError | undefined) => {
          const line = (err as { lines?: number } | undefined)?.lines ?? lastLine + 1;
          if (err?.code === 'CSV_MAX_RECORD_SIZE') {
            // csv-parse reads no further after this error, so the rest of the log would be lost unsaid.
            const start = parser.recordStart();
            parser.destroy(
              !headers
                ? headerTooLong(start)
                : new ApiError(
                    400,
                    'record_too_long',
                    `The record starting on line ${start} of the log runs past ${MAX_RECORD_SIZE} characters (to line ${line}); nothing was imported.`,
                    [{ path: `file.line.${start}`, message: 'Look for a double quote on that line that is never closed' }],
                  ),
            );
            return;
          }
          reject(line, 'bad-csv', null, `not valid CSV: ${err?.message ?? 'unreadable record'}`);
        },
      },
      (record, line) => {
        try {
          onRecord(record, line);
        } catch (err) {
          parser.destroy(err as Error);
        }
      },
    );
    const sink = new Writable({ objectMode: true, write: (_chunk, _enc, done) => done() });
    await pipeline(createReadStream(filePath, { highWaterMark: READ_CHUNK }), parser, sink);
  } else {
    await readPlainRecords(filePath, s, onLine, (line) => {
      if (!headers) throw headerTooLong(line);
      reject(line, 'bad-csv', null, `not valid CSV: the record is longer than ${MAX_RECORD_SIZE} characters`);
    });
  }

  if (!headers || !recognition) {
    throw fileIssue('empty_log', 'The log holds no header and no rows.', 'The first line must name the columns, e.g. time,depth_m,lat,lon');
  }
  return { rowsTaken, firstMs, lastMs: lastT, recognition, headers, rowsRejected, rejected, gpsTime };
}

type ImportWarning = { code: string; message: string };

function warningsOf(r: HeaderRecognition, extra: ImportWarning[]): ImportWarning[] {
  const out: ImportWarning[] = [];
  const say = (code: string, message: string) => out.push({ code, message });
  if (r.unknown.length > 0) {
    say(
      'columns_not_read',
      `Columns not read: ${r.unknown.map((h) => `"${h}"`).join(', ')}. If one holds a channel, name it with the mapping option.`,
    );
  }
  for (const u of r.unsupportedUnits)
    say('unsupported_unit', `"${u.header}" is in ${u.unit}, which is not read; give ${u.channel} in the units of the log format.`);
  for (const d of r.duplicates) say('duplicate_column', `"${d.header}" is a second ${d.channel} column; only the first is read.`);
  if (r.mapping.depth === undefined && r.mapping.pressure === undefined)
    say('no_depth', 'The log has no depth or pressure column, so entries get no depth from it.');
  if (r.mapping.lat === undefined || r.mapping.lon === undefined)
    say('no_position', 'The log has no latitude and longitude columns, so entries get no position from it.');
  return [...out, ...extra];
}

/** Imports of the same dive run one after another, so an append always sees the log before it. */
const oneAtATime = oneAtATimePerKey();

/** Numbers a staged row holds: its time, then each stored channel (NaN for none). */
const STAGED_WIDTH = 1 + STORED_CHANNELS.length;
/** Rows written to, and read back from, the staging file at a time. */
const STAGED_CHUNK_ROWS = 4096;

const stagedInserts = new WeakMap<Db, Map<number, Statement>>();

/**
 * The INSERT of `rows` rows into the dive's log, prepared once per connection and row count. The
 * dive is one named parameter shared by every row, bound once per statement rather than once a
 * row: its text is converted for SQLite once, not 360,000 times for a 10-hour log.
 */
function stagedInsertOf(db: Db, rows: number): Statement {
  let byRows = stagedInserts.get(db);
  if (!byRows) stagedInserts.set(db, (byRows = new Map<number, Statement>()));
  let stmt = byRows.get(rows);
  if (!stmt) {
    const tuple = `(@diveId, ?, ${STORED_CHANNELS.map(() => '?').join(', ')})`;
    stmt = db.$client.prepare(
      `insert into telemetry_samples (dive_id, t, ${STORED_CHANNELS.join(', ')}) values ${Array(rows).fill(tuple).join(', ')}`,
    );
    byRows.set(rows, stmt);
  }
  return stmt;
}

/**
 * The rows of a log being read, staged as plain 64-bit numbers in a file of their own beside the
 * database (thrown away whatever happens), so that memory holds one chunk, never the log. The
 * dive's log is not touched until the import's transaction copies them in (`copyInto`); nothing
 * else on the server's connection waits on the reading meanwhile. Numbers rather than a SQLite
 * file: the rows are written once into the record, not built into a second table first.
 */
class StagedRows {
  readonly file: string;
  private fd: number | null;
  private readonly chunk = new Float64Array(STAGED_CHUNK_ROWS * STAGED_WIDTH);
  private filled = 0;
  private rows = 0;

  constructor(dir: string) {
    this.file = path.join(dir, `.bathynote-import-${randomUUID()}.bin`);
    this.fd = openSync(this.file, 'w+');
  }

  /** Stages a row already in the staged layout: its time, then each of STORED_CHANNELS (NaN for none). */
  pushRow(row: Float64Array): void {
    this.chunk.set(row, this.filled * STAGED_WIDTH);
    if (++this.filled === STAGED_CHUNK_ROWS) this.flush();
  }

  push(sample: TelemetryRow): void {
    const c = this.chunk;
    let o = this.filled * STAGED_WIDTH;
    c[o++] = sample.t;
    for (const ch of STORED_CHANNELS) c[o++] = sample[ch] ?? Number.NaN;
    if (++this.filled === STAGED_CHUNK_ROWS) this.flush();
  }

  private flush(): void {
    if (this.filled === 0 || this.fd === null) return;
    writeSync(this.fd, new Uint8Array(this.chunk.buffer, 0, this.filled * STAGED_WIDTH * 8));
    this.rows += this.filled;
    this.filled = 0;
  }

  /** Writes the last chunk: the file then holds every row taken. */
  finish(): void {
    this.flush();
  }

  /**
   * Copies the staged rows, in the order they were read, into dive `diveId`'s log inside the
   * caller's transaction: INSERT_BATCH rows per statement, with NaN written as NULL.
   */
  copyInto(db: Db, diveId: string): void {
    if (this.fd === null) throw new Error('staged rows already discarded');
    const full = stagedInsertOf(db, INSERT_BATCH);
    const dive = { diveId };
    const args: unknown[] = new Array(INSERT_BATCH * STAGED_WIDTH);
    const bytes = new Uint8Array(this.chunk.buffer);
    const c = this.chunk;
    let pending = 0;
    for (let at = 0; at < this.rows;) {
      const n = Math.min(STAGED_CHUNK_ROWS, this.rows - at);
      readSync(this.fd, bytes, 0, n * STAGED_WIDTH * 8, at * STAGED_WIDTH * 8);
      for (let r = 0; r < n; r++) {
        let i = r * STAGED_WIDTH;
        let a = pending * STAGED_WIDTH;
        args[a++] = c[i++];
        for (let k = 1; k < STAGED_WIDTH; k++, i++) {
          const v = c[i]!;
          args[a++] = v === v ? v : null;
        }
        if (++pending === INSERT_BATCH) {
          full.run(args, dive);
          pending = 0;
        }
      }
      at += n;
    }
    if (pending > 0) stagedInsertOf(db, pending).run(args.slice(0, pending * STAGED_WIDTH), dive);
  }

  /** Closes and removes the staging file. */
  discard(): void {
    if (this.fd !== null) closeSync(this.fd);
    this.fd = null;
    rmSync(this.file, { force: true });
  }
}

/** Staging goes beside the database (same disk, and not a memory-backed /tmp), or to the temporary folder for one in memory. */
const stagingDirOf = (db: Db) => (db.$client.memory ? tmpdir() : path.dirname(path.resolve(db.$client.name)));

/**
 * Imports one log file into a dive: replaces its log or adds to it, re-stamps its entries from
 * the result, records the import and announces the entries that changed.
 */
export async function importTelemetryLog(db: Db, live: LiveHub, req: ImportRequest): Promise<TelemetryImportReport> {
  const fields = telemetryImportFieldsSchema.parse(req.fields ?? {});
  const mapping = parseMapping(fields.mapping);
  const head = await readHead(req.filePath);
  if (head.bytes === 0) throw fileIssue('empty_file', 'The file is empty.', 'Choose the vehicle log; this file has no content');
  const lines = head.text
    .replace(/^\uFEFF/, '')
    .split(/\r\n|\n|\r/)
    .filter((l) => l.trim() !== '' && !l.startsWith('#'));
  const delimiter = detectDelimiter(lines);
  const decimalComma = fields.decimal === 'comma' || (fields.decimal === 'auto' && delimiter === 'semicolon' && detectDecimalComma(lines));
  if (decimalComma && delimiter === 'comma') {
    throw fieldError(
      'decimal',
      'Use "point", or save the log with semicolons',
      'A comma-separated log cannot use the comma as its decimal mark.',
    );
  }

  return oneAtATime(req.diveId, async () => {
    const facts = diveFacts(db, req.diveId);
    const existing = fields.mode === 'append' ? loadTimes(db, req.diveId) : null;
    const staged = new StagedRows(stagingDirOf(db));
    try {
      return await importStaged(db, live, req, staged, {
        fields,
        facts,
        existing,
        head,
        settings: { delimiter, encoding: head.encoding, decimalComma, mapping },
      });
    } finally {
      staged.discard();
    }
  });
}

/** Reads the log into `staged`, then copies it into the dive, stamps its entries and records the import in one transaction. */
async function importStaged(
  db: Db,
  live: LiveHub,
  req: ImportRequest,
  staged: StagedRows,
  o: {
    fields: ReturnType<typeof telemetryImportFieldsSchema.parse>;
    facts: ReturnType<typeof diveFacts>;
    existing: Float64Array | null;
    head: { encoding: 'utf8' | 'latin1' };
    settings: { delimiter: Delimiter; encoding: 'utf8' | 'latin1'; decimalComma: boolean; mapping: TelemetryMapping };
  },
): Promise<TelemetryImportReport> {
  const { fields, facts, existing, head } = o;
  const { delimiter, decimalComma } = o.settings;
  const parsed = await parseLog(req.filePath, {
    ...o.settings,
    gpsTime: fields.gpsTime,
    pressure: fields.pressure,
    latitudeDeg: facts.datum.lat,
    existing,
    take: (sample) => staged.push(sample),
    takeRow: (row) => staged.pushRow(row),
  });
  staged.finish();
  const { recognition, rowsTaken, firstMs, lastMs } = parsed;
  if (rowsTaken === 0) {
    if (parsed.rowsRejected === 0) {
      throw fileIssue('no_rows', 'The log has a header but no rows.', 'Export the log again with its data rows');
    }
    throw new ApiError(
      400,
      'no_rows_taken',
      `None of the log's ${parsed.rowsRejected} rows could be taken; the dive's log is unchanged.`,
      parsed.rejected.slice(0, 20).map((r) => ({ path: `file.line.${r.line}`, message: r.reason, code: r.code })),
    );
  }

  const extra: ImportWarning[] = [];
  if (head.encoding === 'latin1') extra.push({ code: 'latin1', message: 'The file is not UTF-8; it was read as Latin-1 (ISO 8859-1).' });
  if (fields.gpsTime === false && recognition.timeScale === 'gps') {
    extra.push({
      code: 'gps_label_ignored',
      message: 'The time column is labelled GPS, but the import was told the clock runs on UTC; times were read as UTC.',
    });
  }
  // A log of another dive, or a clock in local time: taken, but said plainly (a dive under way has no end yet).
  const { launch, onDeck } = facts.phases;
  if (launch !== null && (lastMs < launch || (onDeck !== null && firstMs > onDeck))) {
    extra.push({
      code: 'outside_dive',
      message: `The log (${isoOf(firstMs)} to ${isoOf(lastMs)}) does not overlap the dive (launch ${isoOf(launch)} to ${onDeck !== null ? `on deck ${isoOf(onDeck)}` : 'now'}); check the dive and the log's clock.`,
    });
  }

  const importId = randomUUID();
  const importedAt = new Date();
  const samplesBefore = existing ? existing.length : countSamples(db, req.diveId);
  const report: TelemetryImportReport = {
    importId,
    diveId: req.diveId,
    fileName: req.fileName,
    mode: fields.mode,
    rowsTaken,
    rowsRejected: parsed.rowsRejected,
    rejected: parsed.rejected,
    rejectedListLimit: REJECTED_LIST_LIMIT,
    span: spanOf(firstMs, lastMs),
    columns: {
      recognised: (Object.entries(recognition.mapping) as [TelemetryChannel, number][])
        .sort((a, b) => a[1] - b[1])
        .map(([channel, index]) => ({ header: (parsed.headers[index] ?? '').replace(/^\uFEFF/, ''), channel })),
      unknown: recognition.unknown,
      unsupportedUnits: recognition.unsupportedUnits,
      duplicates: recognition.duplicates,
    },
    delimiter,
    decimal: decimalComma ? 'comma' : 'point',
    timeScale: parsed.gpsTime ? 'gps' : 'utc',
    pressure: fields.pressure,
    depthFrom: recognition.mapping.depth !== undefined ? 'depth' : recognition.mapping.pressure !== undefined ? 'pressure' : null,
    samplesBefore,
    samplesAfter: fields.mode === 'append' ? samplesBefore + rowsTaken : rowsTaken,
    stamped: { updated: 0, noTelemetry: 0 },
    warnings: warningsOf(recognition, extra),
    importedAt: importedAt.toISOString(),
  };

  live.withEvents((_tx, stage) => {
    if (fields.mode === 'replace') db.$client.prepare('delete from telemetry_samples where dive_id = ?').run(req.diveId);
    staged.copyInto(db, req.diveId);
    // The log in memory, if any, is no longer the stored one (dropped again if this rolls back: it is only a cache).
    forgetLog(db, req.diveId);
    const result = stampDiveFromStoredLog(db, req.diveId, facts.gapMs);
    report.stamped = { updated: result.changed.length, noTelemetry: result.noTelemetry };
    db.insert(telemetryImports)
      .values({
        id: importId,
        diveId: req.diveId,
        fileName: req.fileName,
        mode: fields.mode,
        rowsTaken,
        rowsRejected: parsed.rowsRejected,
        firstAt: new Date(firstMs),
        lastAt: new Date(lastMs),
        report,
        importedBy: req.userId,
        importedAt,
      })
      .run();
    announceStamped(stage, facts.campaignId, req.diveId, result.changed);
  });
  return report;
}
