/**
 * CSV for exports, following RFC 4180 "Common Format and MIME Type for
 * Comma-Separated Values (CSV) Files" (Y. Shafranovich, 2005): records end
 * with CRLF, and a field is quoted when it contains a comma, a double quote,
 * CR or LF, with inner double quotes doubled.
 *
 * Formula injection ("CSV Injection", OWASP Foundation community page):
 * spreadsheet programs run a cell as a formula when it starts with =, +, -,
 * @, tab or CR. Such TEXT cells get a leading apostrophe, which spreadsheets
 * show as plain text.
 * The rule depends on the JavaScript type of the value, not on how the text
 * looks: a finite `number` or `bigint` (for example a longitude of -7.432) is
 * written unchanged so it stays numeric, while the string "-7.432" is text
 * and is prefixed. Pass measurements as numbers.
 */

export interface CsvColumn {
  /** Property of each row to read. */
  key: string;
  /** Text of the header cell. */
  header: string;
}

export interface CsvOptions {
  /**
   * Start with a UTF-8 byte order mark so that Excel reads non-ASCII text
   * (taxon authorities, station names) as UTF-8 instead of a legacy code page.
   */
  bom?: boolean;
}

const LINE_END = '\r\n';
const BOM = '\ufeff';
const FORMULA_START = /^[=+\-@\t\r]/;
const NEEDS_QUOTES = /[",\r\n]/;

/**
 * Shortest round-trip digits of `value` written without an exponent, so that
 * 1e21 becomes "1000000000000000000000" and 1e-7 becomes "0.0000001".
 */
function plainDecimal(value: number): string {
  if (Object.is(value, -0)) return '0';
  const text = String(value);
  const match = /^(-?)(\d+)(?:\.(\d+))?e([+-]\d+)$/.exec(text);
  if (!match) return text;
  const [, sign = '', whole = '', fraction = '', exponentText = '0'] = match;
  const digits = whole + fraction;
  const point = whole.length + Number(exponentText);
  if (point <= 0) return `${sign}0.${'0'.repeat(-point)}${digits}`;
  if (point >= digits.length) return `${sign}${digits}${'0'.repeat(point - digits.length)}`;
  return `${sign}${digits.slice(0, point)}.${digits.slice(point)}`;
}

function neutraliseFormula(text: string): string {
  return FORMULA_START.test(text) ? `'${text}` : text;
}

function quote(text: string): string {
  return NEEDS_QUOTES.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

function stringify(value: object): string {
  try {
    return JSON.stringify(value) ?? '';
  } catch {
    // Cycles and BigInts inside objects have no JSON form; an empty cell beats a crash.
    return '';
  }
}

/** The text of one field, before quoting. */
function cellText(value: unknown): string {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number') return Number.isFinite(value) ? plainDecimal(value) : '';
  if (typeof value === 'bigint') return value.toString();
  if (typeof value === 'boolean') return value ? 'true' : 'false';
  if (value instanceof Date) return Number.isNaN(value.getTime()) ? '' : value.toISOString();
  if (typeof value === 'string') return neutraliseFormula(value);
  if (typeof value === 'object') return neutraliseFormula(stringify(value));
  // Symbols and functions are not data.
  return '';
}

function field(value: unknown): string {
  return quote(cellText(value));
}

/**
 * One CSV record (without its line end) of the given values, for files written a row at a time.
 * The same rules as {@link toCsv}.
 */
export function csvRecord(values: readonly unknown[]): string {
  const text = values.map(field).join(',');
  // A lone empty field would be an empty line, which many readers skip.
  return text === '' && values.length === 1 ? '""' : text;
}

export const CSV_LINE_END = LINE_END;
export const CSV_BOM = BOM;

/**
 * CSV text with a header record and one record per row, every record ending
 * in CRLF. Missing, null and undefined values give empty fields; numbers are
 * plain decimals (non-finite ones give empty fields); Dates are ISO 8601 in
 * UTC; other objects are written as JSON.
 */
export function toCsv(
  columns: readonly CsvColumn[] | readonly string[],
  rows: readonly Record<string, unknown>[],
  options: CsvOptions = {},
): string {
  const normalised: CsvColumn[] = columns.map((column) => (typeof column === 'string' ? { key: column, header: column } : column));
  const record = csvRecord;
  const records = [
    record(normalised.map((column) => column.header)),
    ...rows.map((row) => record(normalised.map((column) => row[column.key]))),
  ];
  return (options.bom ? BOM : '') + records.map((record) => record + LINE_END).join('');
}
