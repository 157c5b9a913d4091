import { parse } from 'csv-parse/sync';
import { describe, expect, it } from 'vitest';
import { toCsv } from '@/lib/csv';

// Reads CSV the way RFC 4180 (Shafranovich, 2005) describes it, using the
// independent csv-parse package (Adaltas, node-csv project) in strict mode.
function readCsv(text: string): string[][] {
  return parse(text, {
    bom: true,
    relax_quotes: false,
    relax_column_count: false,
    skip_empty_lines: false,
    record_delimiter: '\r\n',
  });
}

describe('toCsv layout (RFC 4180)', () => {
  it('writes a header record and one record per row, each ending in CRLF', () => {
    expect(
      toCsv(
        ['a', 'b'],
        [
          { a: 1, b: 'x' },
          { a: 2, b: 'y' },
        ],
      ),
    ).toBe('a,b\r\n1,x\r\n2,y\r\n');
  });

  it('uses column headers distinct from the row keys', () => {
    const columns = [
      { key: 'taxon', header: 'scientificName' },
      { key: 'depth', header: 'depth (m)' },
    ];
    expect(toCsv(columns, [{ taxon: 'Lophelia pertusa', depth: 812, ignored: 'x' }])).toBe(
      'scientificName,depth (m)\r\nLophelia pertusa,812\r\n',
    );
  });

  it('writes only the header when there are no rows', () => {
    expect(toCsv(['a', 'b'], [])).toBe('a,b\r\n');
  });

  it('quotes fields with a comma, a double quote, CR or LF and doubles inner quotes', () => {
    expect(toCsv(['v'], [{ v: 'a,b' }])).toBe('v\r\n"a,b"\r\n');
    expect(toCsv(['v'], [{ v: 'say "hi"' }])).toBe('v\r\n"say ""hi"""\r\n');
    expect(toCsv(['v'], [{ v: 'line1\nline2' }])).toBe('v\r\n"line1\nline2"\r\n');
    expect(toCsv(['v'], [{ v: 'line1\r\nline2' }])).toBe('v\r\n"line1\r\nline2"\r\n');
    expect(toCsv(['v'], [{ v: 'a\rb' }])).toBe('v\r\n"a\rb"\r\n');
  });

  it('leaves other fields unquoted, spaces included', () => {
    expect(toCsv(['v'], [{ v: ' Bathymodiolus azoricus ' }])).toBe('v\r\n Bathymodiolus azoricus \r\n');
    expect(toCsv(['v'], [{ v: "it's" }])).toBe("v\r\nit's\r\n");
  });

  it('writes null, undefined and missing values as empty fields', () => {
    expect(toCsv(['a', 'b', 'c'], [{ a: null, b: undefined }])).toBe('a,b,c\r\n,,\r\n');
  });

  it('keeps a lone empty field visible as ""', () => {
    expect(toCsv(['v'], [{ v: '' }, { v: null }])).toBe('v\r\n""\r\n""\r\n');
    expect(readCsv(toCsv(['v'], [{ v: '' }]))).toEqual([['v'], ['']]);
  });

  it('prepends a UTF-8 byte order mark only when asked', () => {
    expect(toCsv(['v'], [{ v: 'é' }], { bom: true })).toBe('\ufeffv\r\né\r\n');
    expect(toCsv(['v'], [{ v: 'é' }]).startsWith('\ufeff')).toBe(false);
  });
});

describe('toCsv values', () => {
  it('writes numbers as plain decimals, never in exponent notation', () => {
    const values = [0, -0, 812, -7.432, 0.1, 1e21, 1.5e-7, -2.5e-10, 123456789012345680000, Number.MAX_SAFE_INTEGER];
    const csv = toCsv(
      ['v'],
      values.map((v) => ({ v })),
    );
    expect(csv).toBe(
      [
        'v',
        '0',
        '0',
        '812',
        '-7.432',
        '0.1',
        '1000000000000000000000',
        '0.00000015',
        '-0.00000000025',
        '123456789012345680000',
        '9007199254740991',
        '',
      ].join('\r\n'),
    );
    for (const [index, row] of readCsv(csv).slice(1).entries()) {
      expect(Number(row[0])).toBe(values[index] === 0 ? 0 : values[index]);
    }
  });

  it('writes non-finite numbers as empty fields', () => {
    expect(toCsv(['a', 'b', 'c'], [{ a: Number.NaN, b: Infinity, c: -Infinity }])).toBe('a,b,c\r\n,,\r\n');
  });

  it('writes Dates as ISO 8601 in UTC whatever the local time zone', () => {
    // The suite runs with TZ=Pacific/Chatham (UTC+12:45/+13:45), so a local rendering would show.
    const date = new Date(Date.UTC(2026, 2, 14, 23, 30, 5, 120));
    expect(toCsv(['t'], [{ t: date }])).toBe('t\r\n2026-03-14T23:30:05.120Z\r\n');
    expect(toCsv(['t'], [{ t: new Date(Number.NaN) }])).toBe('t\r\n""\r\n');
  });

  it('writes booleans, bigints and objects readably', () => {
    expect(toCsv(['a', 'b', 'c', 'd'], [{ a: true, b: -12n, c: ['Porifera', 'Cnidaria'], d: { n: 1 } }])).toBe(
      'a,b,c,d\r\ntrue,-12,"[""Porifera"",""Cnidaria""]","{""n"":1}"\r\n',
    );
  });
});

describe('toCsv formula-injection neutralisation (OWASP CSV Injection)', () => {
  it.each(['=HYPERLINK("http://evil.example","x")', '+1+1', '-2+3', '@SUM(A1:A2)', '\tleading tab', '\rleading CR'])(
    'prefixes the text cell %j with an apostrophe',
    (text) => {
      const [, row] = readCsv(toCsv(['v'], [{ v: text }]));
      expect(row).toEqual([`'${text}`]);
    },
  );

  it('writes the prefixed cell with RFC 4180 quoting when needed', () => {
    expect(toCsv(['v'], [{ v: '=1+1' }])).toBe("v\r\n'=1+1\r\n");
    expect(toCsv(['v'], [{ v: '=cmd|"/c calc"!A1' }])).toBe('v\r\n"\'=cmd|""/c calc""!A1"\r\n');
  });

  it('does not alter finite numbers, negative ones included', () => {
    expect(toCsv(['lon', 'depth'], [{ lon: -7.432, depth: -812 }])).toBe('lon,depth\r\n-7.432,-812\r\n');
    expect(toCsv(['v'], [{ v: -5n }])).toBe('v\r\n-5\r\n');
  });

  it('treats a number written as text as text', () => {
    expect(toCsv(['lon'], [{ lon: '-7.432' }])).toBe("lon\r\n'-7.432\r\n");
  });

  it('leaves text that only contains those characters later alone', () => {
    expect(toCsv(['v'], [{ v: 'T = 4.2 °C, S - 35' }])).toBe('v\r\n"T = 4.2 °C, S - 35"\r\n');
    expect(toCsv(['v'], [{ v: 'chief@example.org' }])).toBe('v\r\nchief@example.org\r\n');
  });

  it('neutralises header cells and object values as well', () => {
    expect(toCsv([{ key: 'a', header: '=A1' }], [{ a: { '=x': 1 } }])).toBe('\'=A1\r\n"{""=x"":1}"\r\n');
  });
});

describe('toCsv round trip through an independent RFC 4180 reader', () => {
  it('reads back every value, awkward text included', () => {
    const rows = [
      { id: 1, note: 'Dense *Lophelia pertusa*, live polyps', lon: -7.432, lat: 51.4, when: new Date(Date.UTC(2026, 0, 2, 3, 4, 5)) },
      { id: 2, note: 'He said "look, a squid"\r\nthen, later:\nnothing', lon: 0, lat: -0.5, when: null },
      { id: 3, note: '=IMPORTXML("http://evil.example","//a")', lon: 179.999999, lat: -89.1, when: undefined },
      { id: 4, note: 'Ümlaut, 日本語, emoji 🦑, tab\tinside', lon: -180, lat: 90, when: new Date(Date.UTC(1999, 11, 31)) },
      { id: 5, note: '', lon: 1e-7, lat: 12345678.9, when: null },
    ];
    const columns = ['id', 'note', 'lon', 'lat', 'when'];
    const parsed = readCsv(toCsv(columns, rows, { bom: true }));
    expect(parsed[0]).toEqual(columns);
    expect(parsed.slice(1)).toEqual([
      ['1', 'Dense *Lophelia pertusa*, live polyps', '-7.432', '51.4', '2026-01-02T03:04:05.000Z'],
      ['2', 'He said "look, a squid"\r\nthen, later:\nnothing', '0', '-0.5', ''],
      ['3', `'=IMPORTXML("http://evil.example","//a")`, '179.999999', '-89.1', ''],
      ['4', 'Ümlaut, 日本語, emoji 🦑, tab\tinside', '-180', '90', '1999-12-31T00:00:00.000Z'],
      ['5', '', '0.0000001', '12345678.9', ''],
    ]);
  });
});
