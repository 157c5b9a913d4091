import { createWriteStream, mkdtempSync, rmSync } from 'node:fs';
import { once } from 'node:events';
import { tmpdir } from 'node:os';
import path from 'node:path';

import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

import { campaigns } from '@/db/schema';
import { telemetryImportReportSchema, telemetrySamplesSchema } from '@/lib/schemas';
import { MAX_LOG_BYTES } from '@/server/middleware/telemetry-upload';
import { diveFacts, stampDiveObservations } from '@/server/services/telemetry';
import { logOf } from '@/server/services/telemetry-series';
import { emails } from '../helpers/demo';
import { buildFixtures, type Fixtures } from '../helpers/fixtures';
import { startTestServer, type TestServer } from '../helpers/test-server';
import { csv, htmlPage, iso, linearLog, pngBytes, writeVehicleLog } from '../fixtures/telemetry/logs';

let t: TestServer;
let ids: Fixtures;

beforeAll(async () => {
  t = await startTestServer();
  ids = await buildFixtures(t, { telemetry: true });
});
afterAll(() => t.close());

/** 2026-05-13T18:00:00Z, during the descent of the fixture dive. */
const T0 = Date.UTC(2026, 4, 13, 18, 0, 0);

const samples = () => t.ctx.db.$client.prepare('select count(*) from telemetry_samples where dive_id = ?').pluck().get(ids.dive) as number;
const stored = () =>
  t.ctx.db.$client
    .prepare('select t, depth, pressure, lat, lon, heading, temperature from telemetry_samples where dive_id = ? order by t')
    .all(ids.dive) as {
    t: number;
    depth: number | null;
    pressure: number | null;
    lat: number | null;
    lon: number | null;
    heading: number | null;
    temperature: number | null;
  }[];
const importCount = () =>
  t.ctx.db.$client.prepare('select count(*) from telemetry_imports where dive_id = ?').pluck().get(ids.dive) as number;

async function upload(
  file: Buffer | string,
  fields: Record<string, string> = {},
  options: { as?: string; name?: string; type?: string } = {},
) {
  const agent = await t.signIn(options.as ?? emails.pilot);
  const req = agent.post(`/api/dives/${ids.dive}/telemetry`);
  for (const [k, v] of Object.entries(fields)) void req.field(k, v);
  return req.attach('file', file, { filename: options.name ?? 'skerry-nav.csv', contentType: options.type ?? 'text/csv' });
}

async function imported(file: Buffer, fields: Record<string, string> = {}) {
  const res = await upload(file, fields);
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return telemetryImportReportSchema.parse(res.body);
}

describe('a good log', () => {
  it('takes an ISO 8601 comma-separated log, replacing the log before it, and records the import', async () => {
    const before = importCount();
    const report = await imported(linearLog(T0, 10, 10));
    expect(report).toMatchObject({
      rowsTaken: 10,
      rowsRejected: 0,
      rejected: [],
      mode: 'replace',
      delimiter: 'comma',
      decimal: 'point',
      timeScale: 'utc',
      depthFrom: 'depth',
      samplesAfter: 10,
      fileName: 'skerry-nav.csv',
      span: { firstAt: '2026-05-13T18:00:00.000Z', lastAt: '2026-05-13T18:01:30.000Z' },
    });
    expect(report.samplesBefore).toBeGreaterThan(1000);
    expect(report.columns.recognised.map((c) => c.channel)).toEqual(['time', 'depth', 'lat', 'lon', 'temperature']);
    expect(samples()).toBe(10);
    expect(stored()[3]).toMatchObject({ t: T0 + 30_000, depth: 590.3, lat: 36.145003, lon: -7.432003, temperature: 10.803 });
    expect(importCount()).toBe(before + 1);

    const history = telemetrySamplesSchema.parse((await (await t.signIn(emails.guest)).get(`/api/dives/${ids.dive}/telemetry`)).body);
    expect(history.imports[0]).toMatchObject({
      id: report.importId,
      fileName: 'skerry-nav.csv',
      rowsTaken: 10,
      importedByName: 'Dev Pillai',
    });
  });

  it('reads epoch seconds and epoch milliseconds', async () => {
    const seconds = await imported(
      csv(
        ['timestamp', 'depth (m)'],
        [0, 1, 2, 3, 4, 5].map((k) => [T0 / 1000 + 10 * k, 100 + k]),
      ),
    );
    expect(seconds).toMatchObject({ rowsTaken: 6, span: { firstAt: '2026-05-13T18:00:00.000Z', lastAt: '2026-05-13T18:00:50.000Z' } });
    expect(T0 / 1000).toBe(1778695200);

    const ms = await imported(
      csv(
        ['utc', 'depth'],
        [0, 1, 2, 3, 4].map((k) => [T0 + 250 + 1000 * k, 100 + k]),
      ),
    );
    expect(ms).toMatchObject({ rowsTaken: 5, span: { firstAt: '2026-05-13T18:00:00.250Z', lastAt: '2026-05-13T18:00:04.250Z' } });
    expect(stored().map((s) => s.t)).toEqual([0, 1, 2, 3, 4].map((k) => T0 + 250 + 1000 * k));
  });

  it('reads a semicolon log with decimal commas', async () => {
    const report = await imported(
      csv(
        ['Time', 'Depth [m]', 'Latitude', 'Longitude', 'Temp'],
        [
          ['2026-05-13T18:00:00Z', '598,4', '36,14501', '-7,43188', '10,92'],
          ['2026-05-13T18:00:01Z', '598,6', '36,14502', '-7,43189', '10,91'],
          ['2026-05-13T18:00:02Z', '598,9', '36,14503', '-7,43190', '10,90'],
          ['2026-05-13T18:00:03Z', '599,1', '36,14504', '-7,43191', '10,89'],
        ],
        { delimiter: ';' },
      ),
    );
    expect(report).toMatchObject({ rowsTaken: 4, rowsRejected: 0, delimiter: 'semicolon', decimal: 'comma' });
    expect(stored()[0]).toMatchObject({ depth: 598.4, lat: 36.14501, lon: -7.43188, temperature: 10.92 });
  });

  it('reads a semicolon log with decimal points', async () => {
    const report = await imported(
      csv(
        ['time', 'depth_m'],
        [
          ['2026-05-13T18:00:00Z', '598.4'],
          ['2026-05-13T18:00:01Z', '598.6'],
        ],
        { delimiter: ';' },
      ),
    );
    expect(report).toMatchObject({ rowsTaken: 2, delimiter: 'semicolon', decimal: 'point' });
    expect(stored().map((s) => s.depth)).toEqual([598.4, 598.6]);
  });

  it('reads a tab-separated log', async () => {
    const headings = ['350', '355', '359.5', '-1', '-5'];
    const rows = headings.map((h, k) => [iso(T0 + k * 1000), (200 + k).toFixed(1), h]);
    const report = await imported(csv(['time', 'depth_m', 'heading'], rows, { delimiter: '\t' }));
    expect(report).toMatchObject({ rowsTaken: 5, delimiter: 'tab' });
    // Headings are kept in [0, 360): −1° and −5° are 359° and 355°.
    expect(stored().map((s) => s.heading)).toEqual([350, 355, 359.5, 359, 355]);
  });

  it('reads a log with a byte-order mark and CRLF line ends', async () => {
    const file = csv(
      ['time', 'depth_m'],
      [
        ['2026-05-13T18:00:00.000Z', '10'],
        ['2026-05-13T18:00:01.000Z', '11'],
        ['2026-05-13T18:00:02.000Z', '12'],
      ],
      { bom: true, eol: '\r\n' },
    );
    expect(file.subarray(0, 3)).toEqual(Buffer.from([0xef, 0xbb, 0xbf]));
    const report = await imported(file);
    expect(report).toMatchObject({ rowsTaken: 3, rowsRejected: 0 });
    expect(report.columns.recognised[0]).toEqual({ header: 'time', channel: 'time' });
    expect(stored().map((s) => s.depth)).toEqual([10, 11, 12]);
  });

  it('reads a log the same whether or not it has quoted fields (line splitting or the full CSV parser)', async () => {
    const lines = [
      '# exported by the vehicle, comment lines and blank lines count as lines',
      'time,depth_m,note',
      '2026-05-13T18:00:00Z,10,start',
      '',
      '2026-05-13T18:00:01Z,abc,x',
      '# a comment in the middle',
      '2026-05-13T18:00:02Z,12',
      '2026-05-13T18:00:03Z,13,end',
    ];
    const plain = await imported(Buffer.from(`\uFEFF${lines.join('\r\n')}\r\n`, 'utf8'));
    const stripVolatile = (r: typeof plain) => ({ ...r, importId: '', importedAt: '', samplesBefore: 0, stamped: null });
    // A quoted note holding the delimiter and a line end: only a CSV parser reads it as one field.
    const quotedLines = [...lines.slice(0, 2), '2026-05-13T18:00:00Z,10,"start, with a comma"', ...lines.slice(3)];
    quotedLines.splice(quotedLines.length - 1, 1, '2026-05-13T18:00:03Z,13,"end"');
    const quoted = await imported(Buffer.from(`\uFEFF${quotedLines.join('\r\n')}\r\n`, 'utf8'));
    expect(stripVolatile(quoted)).toEqual(stripVolatile(plain));
    expect(plain.rowsTaken).toBe(2);
    expect(plain.rejected.map((r) => [r.line, r.code])).toEqual([
      [5, 'bad-number'],
      [7, 'field-count'],
    ]);
    expect(stored().map((s) => s.depth)).toEqual([10, 13]);
    // The dive's import history keeps each import's rejected lines, for the dive settings screen.
    const history = telemetrySamplesSchema.parse((await (await t.signIn(emails.guest)).get(`/api/dives/${ids.dive}/telemetry`)).body);
    expect(history.imports[0]!.rejected.map((r) => [r.line, r.code])).toEqual([
      [5, 'bad-number'],
      [7, 'field-count'],
    ]);

    // A field quoted across a line end is one record ending on the later line.
    const multiline = await imported(Buffer.from('time,depth_m,note\n2026-05-13T18:00:00Z,10,"two\nlines"\n2026-05-13T18:00:01Z,11,x\n'));
    expect(multiline).toMatchObject({ rowsTaken: 2, rowsRejected: 0 });
  });

  it('rejects an unquoted line longer than 64 KiB, and refuses a log whose quoted field runs past it', async () => {
    const long = 'x'.repeat(70 * 1024);
    const log = (note: string) =>
      Buffer.from(`time,depth_m,note\n2026-05-13T18:00:00Z,10,a\n2026-05-13T18:00:01Z,11,${note}\n2026-05-13T18:00:02Z,12,b\n`);
    // One over-long line inside a read, and one running across several reads of the file.
    for (const note of [long, 'y'.repeat(3 * 1024 * 1024)]) {
      const report = await imported(log(note));
      expect(report.rowsTaken).toBe(2);
      expect(report.rejected.map((r) => [r.line, r.code])).toEqual([[3, 'bad-csv']]);
      expect(stored().map((x) => x.depth)).toEqual([10, 12]);
    }

    // A quote never closed swallows the rest of the file; the import stops rather than take half.
    const before = stored();
    const res = await upload(log(`"${long}`));
    expect(res.status).toBe(400);
    expect(res.body.error).toMatchObject({
      code: 'record_too_long',
      message: expect.stringMatching(/starting on line 3 .*nothing was imported/),
    });
    expect(stored()).toEqual(before);
  });

  describe('depth from pressure', () => {
    const setDatumLat = (lat: number) => t.ctx.db.update(campaigns).set({ datumLat: lat }).where(eq(campaigns.id, ids.campaign)).run();

    it('computes depth by UNESCO 1983 at the datum latitude from a pressure-only log', async () => {
      setDatumLat(30);
      try {
        const report = await imported(
          csv(
            ['time', 'pressure_dbar'],
            [
              ['2026-05-13T18:00:00Z', '10000'],
              ['2026-05-13T18:00:01Z', '10000.5'],
            ],
          ),
        );
        expect(report.depthFrom).toBe('pressure');
        // Fofonoff & Millard (1983), UNESCO Technical Papers in Marine Science 44, DEPTH check
        // value: 10000 dbar at 30° latitude is 9712.653 m.
        expect(stored()[0]!.depth).toBeCloseTo(9712.653, 3);
        expect(stored()[0]!.pressure).toBe(10000);
      } finally {
        setDatumLat(36.145);
      }
    });

    it('uses the campaign datum latitude', async () => {
      await imported(csv(['time', 'pressure (dbar)'], [['2026-05-13T18:00:00Z', '1000']]));
      // Common practice: about one metre per dbar, the depth 0.8–1.3 % less than the
      // pressure at 1000 dbar.
      const depth = stored()[0]!.depth!;
      expect(depth).toBeGreaterThan(1000 * (1 - 0.013));
      expect(depth).toBeLessThan(1000 * (1 - 0.008));
    });

    it('subtracts one atmosphere from absolute pressure', async () => {
      setDatumLat(30);
      try {
        // Common practice: absolute pressure minus one standard atmosphere, 10.1325 dbar, is
        // sea pressure; 10010.1325 dbar absolute is the 10000 dbar of the UNESCO check value.
        const report = await imported(csv(['time', 'pressure_dbar'], [['2026-05-13T18:00:00Z', '10010.1325']]), { pressure: 'absolute' });
        expect(report.pressure).toBe('absolute');
        expect(stored()[0]!.pressure).toBeCloseTo(10000, 6);
        expect(stored()[0]!.depth).toBeCloseTo(9712.653, 3);
      } finally {
        setDatumLat(36.145);
      }
    });
  });

  it('takes 18 s off a log kept in GPS time, when told or when its time column says so', async () => {
    // Common practice: GPS time runs 18 s ahead of UTC since 2017-01-01.
    const told = await imported(csv(['time', 'depth_m'], [['2026-05-13T18:00:18Z', '5']]), { gpsTime: 'true' });
    expect(told.timeScale).toBe('gps');
    expect(stored()[0]!.t).toBe(T0);

    const labelled = await imported(csv(['time (GPS)', 'depth_m'], [['2026-05-13T18:00:28Z', '5']]));
    expect(labelled.timeScale).toBe('gps');
    expect(stored()[0]!.t).toBe(T0 + 10_000);

    const refused = await imported(csv(['time (GPS)', 'depth_m'], [['2026-05-13T18:00:28Z', '5']]), { gpsTime: 'false' });
    expect(refused.timeScale).toBe('utc');
    expect(refused.warnings.map((w) => w.message).join(' ')).toMatch(/labelled GPS/);
    expect(stored()[0]!.t).toBe(T0 + 28_000);
  });

  it('reads other headers through a mapping, and says which columns it did not read', async () => {
    const file = csv(
      ['Zeit', 'Tiefe', 'Kurs', 'Bemerkung'],
      [
        ['2026-05-13T18:00:00Z', '500.5', '90', 'ok'],
        ['2026-05-13T18:00:01Z', '500.7', '91', 'ok'],
      ],
    );
    const report = await imported(file, {
      mapping: JSON.stringify({ Zeit: 'time', Tiefe: 'depth', Kurs: 'heading', Bemerkung: 'ignore' }),
    });
    expect(report.rowsTaken).toBe(2);
    expect(report.columns.recognised).toEqual([
      { header: 'Zeit', channel: 'time' },
      { header: 'Tiefe', channel: 'depth' },
      { header: 'Kurs', channel: 'heading' },
    ]);
    expect(stored().map((s) => s.depth)).toEqual([500.5, 500.7]);

    const partly = await imported(csv(['time', 'depth_m', 'Bemerkung'], [['2026-05-13T18:00:00Z', '1', 'x']]));
    expect(partly.columns.unknown).toEqual(['Bemerkung']);
    expect(partly.warnings.map((w) => w.message).join(' ')).toMatch(/"Bemerkung"/);
  });

  it('refuses a mapping that is not JSON or names no channel, and unknown fields', async () => {
    const file = linearLog(T0, 1, 3);
    const notJson = await upload(file, { mapping: '{Zeit: time' });
    expect(notJson.status).toBe(400);
    expect(notJson.body.error.issues[0].path).toBe('mapping');
    const noChannel = await upload(file, { mapping: JSON.stringify({ Zeit: 'depth_ft' }) });
    expect(noChannel.status).toBe(400);
    expect(noChannel.body.error.issues[0].path).toMatch(/^mapping/);
    const unknown = await upload(file, { campaignId: ids.otherCampaign });
    expect(unknown.status).toBe(400);
    const badMode = await upload(file, { mode: 'merge' });
    expect(badMode.status).toBe(400);
    expect(badMode.body.error.issues[0].path).toBe('mode');
  });
});

describe('a bad log leaves the dive as it was', () => {
  it('keeps nothing of an import that fails while its rows are being written, and keeps the log it was replacing', async () => {
    await imported(linearLog(T0, 10, 7));
    const before = stored();
    const imports = importCount();
    const entries = () =>
      t.ctx.db.$client.prepare('select id, depth, depth_source from observations where dive_id = ? order by id').all(ids.dive);
    const entriesBefore = entries();
    // The disk fills up (or anything else goes wrong inside SQLite) at the 900th row of 1,000.
    const failAt = T0 + 899 * 2000;
    t.ctx.db.$client.exec(
      `create trigger test_fail_import before insert on telemetry_samples when new.t = ${failAt} begin select raise(abort, 'database or disk is full'); end`,
    );
    try {
      const res = await upload(linearLog(T0, 2, 1000));
      expect(res.status).toBe(500);
      expect(res.body.error.code).toBe('internal');
      expect(JSON.stringify(res.body)).not.toMatch(/disk is full|telemetry_samples|trigger/);
    } finally {
      t.ctx.db.$client.exec('drop trigger test_fail_import');
    }
    expect(stored()).toEqual(before);
    expect(importCount()).toBe(imports);
    expect(entries()).toEqual(entriesBefore);
    // And the same log goes in whole once the fault is gone.
    expect((await imported(linearLog(T0, 2, 1000))).rowsTaken).toBe(1000);
  });

  it('refuses a log with no time column', async () => {
    await imported(linearLog(T0, 10, 7));
    const before = samples();
    const res = await upload(csv(['depth_m', 'lat'], [['500', '36.1']]));
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('no_time_column');
    expect(res.body.error.issues[0].message).toMatch(/"depth_m", "lat"/);
    expect(samples()).toBe(before);
  });

  it('rejects rows whose time goes backwards or repeats, with their lines, and takes the rest', async () => {
    const file = csv(
      ['time', 'depth_m'],
      [
        ['2026-05-13T18:00:00Z', '1'],
        ['2026-05-13T18:00:10Z', '2'],
        ['2026-05-13T18:00:10Z', '3'],
        ['2026-05-13T18:00:05Z', '4'],
        ['2026-05-13T18:00:20Z', '5'],
      ],
    );
    const report = await imported(file);
    expect(report.rowsTaken).toBe(3);
    expect(report.rowsRejected).toBe(2);
    expect(report.rejected).toEqual([
      expect.objectContaining({ line: 4, code: 'duplicate-time', reason: expect.stringMatching(/repeats line 3/) }),
      expect.objectContaining({ line: 5, code: 'time-backwards', reason: expect.stringMatching(/earlier than line 3/) }),
    ]);
    expect(stored().map((s) => s.depth)).toEqual([1, 2, 5]);
  });

  it('rejects rows with non-numbers, bad times, missing fields and no values, naming the column', async () => {
    const file = csv(
      ['time', 'depth_m', 'lat'],
      [
        ['2026-05-13T18:00:00Z', '1', '36.1'],
        ['2026-05-13T18:00:01Z', 'abc', '36.1'],
        ['2026-05-13T18:00:02Z', '3', '36.1x'],
        ['2026-05-13 18:00:03', '4', '36.1'],
        ['yesterday', '5', '36.1'],
        ['2026-05-13T18:00:05Z', '6'],
        ['2026-05-13T18:00:06Z', '', ''],
        ['2026-05-13T18:00:07Z', '99999', '36.1'],
        ['2026-05-13T18:00:08Z', '9', '36.1'],
      ],
    );
    const report = await imported(file);
    expect(report.rowsTaken).toBe(2);
    expect(report.rowsRejected).toBe(7);
    expect(report.rejected.map((r) => [r.line, r.code, r.channel])).toEqual([
      [3, 'bad-number', 'depth'],
      [4, 'bad-number', 'lat'],
      [5, 'no-zone', 'time'],
      [6, 'bad-time', 'time'],
      [7, 'field-count', null],
      [8, 'no-values', null],
      [9, 'out-of-range', 'depth'],
    ]);
    expect(report.rejected[0]!.reason).toMatch(/depth "abc" is not a number/);
    expect(samples()).toBe(2);
  });

  it('lists at most 200 rejected rows but counts them all', async () => {
    const rows = Array.from({ length: 260 }, (_, k) => [iso(T0 + k * 1000), k % 5 === 0 ? String(k) : 'n/a?']);
    const report = await imported(csv(['time', 'depth_m'], rows));
    expect(report.rowsTaken).toBe(52);
    expect(report.rowsRejected).toBe(208);
    expect(report.rejected).toHaveLength(200);
    expect(report.rejectedListLimit).toBe(200);
  });

  it('refuses an empty file, a header with no rows, and a log none of whose rows can be taken', async () => {
    await imported(linearLog(T0, 10, 7));
    const before = samples();
    const imports = importCount();
    const empty = await upload(Buffer.alloc(0));
    expect(empty.status).toBe(400);
    expect(empty.body.error.code).toBe('empty_file');
    const headerOnly = await upload(Buffer.from('time,depth_m\n'));
    expect(headerOnly.status).toBe(400);
    expect(headerOnly.body.error.code).toBe('no_rows');
    const blank = await upload(Buffer.from('\n\n\n'));
    expect(blank.status).toBe(400);
    const noneTaken = await upload(csv(['time', 'depth_m'], [['2026-05-13T18:00:00Z', 'deep']]));
    expect(noneTaken.status).toBe(400);
    expect(noneTaken.body.error.code).toBe('no_rows_taken');
    expect(noneTaken.body.error.issues[0]).toMatchObject({ path: 'file.line.2', message: expect.stringMatching(/not a number/) });
    expect(samples()).toBe(before);
    expect(importCount()).toBe(imports);
  });

  it('refuses HTML and an image named .csv with 415, by their content', async () => {
    const before = samples();
    const html = await upload(htmlPage, {}, { name: 'log.csv', type: 'text/csv' });
    expect(html.status).toBe(415);
    expect(html.body.error.code).toBe('unsupported_type');
    const png = await upload(pngBytes, {}, { name: 'log.csv', type: 'text/csv' });
    expect(png.status).toBe(415);
    expect(png.body.error.message).toMatch(/PNG/);
    const binary = await upload(Buffer.from([0x74, 0x69, 0x6d, 0x65, 0x00, 0x01, 0x02]), {}, { name: 'log.csv' });
    expect(binary.status).toBe(415);
    expect(samples()).toBe(before);
  });

  it('refuses a file over the size limit with 413', async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'bathynote-big-log-'));
    const file = path.join(dir, 'huge.csv');
    try {
      const out = createWriteStream(file);
      const line = `${'2026-05-13T18:00:00.000Z,600.00,36.1450000,-7.4320000,10.800'.padEnd(99, ' ')}\n`;
      const block = line.repeat(10_000);
      let written = 0;
      out.write('time,depth_m,lat,lon,temperature_c\n');
      while (written <= MAX_LOG_BYTES) {
        if (!out.write(block)) await once(out, 'drain');
        written += block.length;
      }
      out.end();
      await once(out, 'finish');
      const before = samples();
      const res = await upload(file);
      expect(res.status).toBe(413);
      expect(res.body.error.code).toBe('too_large');
      expect(samples()).toBe(before);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }, 120_000);

  it('refuses a request without a file, and a second file', async () => {
    const agent = await t.signIn(emails.pilot);
    const none = await agent.post(`/api/dives/${ids.dive}/telemetry`).field('mode', 'replace');
    expect(none.status).toBe(400);
    expect(none.body.error.issues[0].path).toBe('file');
    const json = await agent.post(`/api/dives/${ids.dive}/telemetry`).send({ file: 'time,depth\n' });
    expect(json.status).toBe(400);
    const two = await agent
      .post(`/api/dives/${ids.dive}/telemetry`)
      .attach('file', linearLog(T0, 1, 2), 'a.csv')
      .attach('file', linearLog(T0, 1, 2), 'b.csv');
    expect(two.status).toBe(400);
  });
});

describe('replace and append', () => {
  it('replaces the log, adds to it, refuses samples already stored, and replaces again', async () => {
    expect((await imported(linearLog(T0, 10, 10))).samplesAfter).toBe(10);
    expect(samples()).toBe(10);

    const later = await imported(linearLog(T0 + 100_000, 10, 5), { mode: 'append' });
    expect(later).toMatchObject({ mode: 'append', rowsTaken: 5, samplesBefore: 10, samplesAfter: 15 });
    expect(samples()).toBe(15);

    const again = await upload(linearLog(T0 + 100_000, 10, 5), { mode: 'append' });
    expect(again.status).toBe(400);
    expect(again.body.error.code).toBe('no_rows_taken');
    expect(again.body.error.issues[0].message).toMatch(/already has a sample/);
    expect(samples()).toBe(15);

    // Rows between stored ones are taken; a time already stored is not.
    const between = await imported(
      csv(
        ['time', 'depth_m'],
        [
          [iso(T0 + 5000), '1'],
          [iso(T0 + 10_000), '2'],
          [iso(T0 + 15_000), '3'],
        ],
      ),
      {
        mode: 'append',
      },
    );
    expect(between).toMatchObject({ rowsTaken: 2, rowsRejected: 1 });
    expect(between.rejected[0]).toMatchObject({ line: 3, code: 'already-stored' });
    expect(
      stored()
        .map((s) => s.t)
        .slice(0, 4),
    ).toEqual([T0, T0 + 5000, T0 + 10_000, T0 + 15_000]);
    expect(samples()).toBe(17);

    expect((await imported(linearLog(T0, 10, 3))).samplesBefore).toBe(17);
    expect(samples()).toBe(3);
  });
});

describe('a log of another time than its dive', () => {
  it('is taken with an outside_dive warning that names both spans', async () => {
    const pilot = await t.signIn(emails.pilot);
    const planned = await pilot.post(`/api/campaigns/${ids.campaign}/dives`).send({ number: 'TI-OUT', objectives: 'Clock check' });
    expect(planned.status).toBe(201);
    const dive = planned.body.id as string;
    for (const [phase, at] of [
      ['launch', '2026-05-20T08:00:00.000Z'],
      ['on-deck', '2026-05-20T14:00:00.000Z'],
    ]) {
      expect((await pilot.post(`/api/dives/${dive}/phases`).send({ phase, at })).status).toBe(200);
    }
    // The log's clock ran a day early: nothing of it falls in the dive.
    const res = await pilot
      .post(`/api/dives/${dive}/telemetry`)
      .attach('file', linearLog(Date.UTC(2026, 4, 19, 8, 0, 0), 1, 600), { filename: 'early.csv', contentType: 'text/csv' });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const report = telemetryImportReportSchema.parse(res.body);
    const warning = report.warnings.find((w) => w.code === 'outside_dive');
    const kept = telemetrySamplesSchema.parse((await (await t.signIn(emails.guest)).get(`/api/dives/${dive}/telemetry`)).body);
    expect(kept.imports[0]!.warnings.map((w) => w.code)).toContain('outside_dive');
    expect(warning?.message).toContain('2026-05-19T08:00:00');
    expect(warning?.message).toContain('2026-05-20T08:00:00');
    expect(report.rowsTaken).toBe(600);

    // A log inside the dive carries no such warning.
    const inside = await pilot
      .post(`/api/dives/${dive}/telemetry`)
      .field('mode', 'replace')
      .attach('file', linearLog(Date.UTC(2026, 4, 20, 9, 0, 0), 1, 600), { filename: 'right.csv', contentType: 'text/csv' });
    expect(inside.status).toBe(201);
    expect(telemetryImportReportSchema.parse(inside.body).warnings.map((w) => w.code)).not.toContain('outside_dive');
  });
});

describe('a long log', () => {
  it('is read in a stream and stamps its entries as the whole log in memory would, across many stretches of it', async () => {
    const pilot = await t.signIn(emails.pilot);
    const planned = await pilot.post(`/api/campaigns/${ids.campaign}/dives`).send({ number: 'TI-LONG', objectives: 'A long log' });
    expect(planned.status).toBe(201);
    const dive = planned.body.id as string;
    const start = Date.UTC(2026, 4, 21, 6, 0, 0);
    // Three hours at 5 Hz: more rows than a staging batch many times over, and entries spread
    // over more log and more of them than one stretch of stamping takes.
    const dir = mkdtempSync(path.join(tmpdir(), 'bathynote-long-log-'));
    const file = path.join(dir, 'long.csv');
    try {
      const rows = await writeVehicleLog(file, start, 3, 5);
      const db = t.ctx.db.$client;
      const insert = db.prepare(
        "insert into observations (id, dive_id, campaign_id, observed_at, kind, title, author_id, created_at, updated_at) values (?, ?, ?, ?, 'biology', 'Long log entry', ?, ?, ?)",
      );
      const author = ids.userId(emails.biologist);
      // 2,400 entries from 10 minutes before the log to 10 minutes after it.
      const entries = 2400;
      db.transaction(() => {
        for (let i = 0; i < entries; i++) {
          const at = start - 600_000 + Math.round((i * (3 * 3600_000 + 1_200_000)) / entries) + 37;
          insert.run(crypto.randomUUID(), dive, ids.campaign, at, author, at, at);
        }
      })();
      const res = await pilot.post(`/api/dives/${dive}/telemetry`).attach('file', file, { filename: 'long.csv', contentType: 'text/csv' });
      expect(res.status, JSON.stringify(res.body)).toBe(201);
      const report = telemetryImportReportSchema.parse(res.body);
      expect(report).toMatchObject({ rowsTaken: rows, rowsRejected: 0, samplesAfter: rows });
      expect(db.prepare('select count(*) from telemetry_samples where dive_id = ?').pluck().get(dive)).toBe(rows);
      // Entries before the log's first sample or after its last get nothing; every other one is stamped.
      const last = start + (rows - 1) * 200;
      const outsideOf = (to: number) =>
        db
          .prepare('select count(*) from observations where dive_id = ? and (observed_at < ? or observed_at > ?)')
          .pluck()
          .get(dive, start, to) as number;
      const outside = outsideOf(last);
      expect(outside).toBeGreaterThan(100);
      expect(report.stamped).toEqual({ updated: entries - outside, noTelemetry: outside });

      // Then a sparse log after it, a sample every 20 s for 10 minutes: an entry's neighbours now lie
      // up to 20 s away, so a stretch of log read around it that is too short shows.
      const sparse = await pilot
        .post(`/api/dives/${dive}/telemetry`)
        .field('mode', 'append')
        .attach('file', linearLog(last + 20_000, 20, 30), { filename: 'sparse.csv', contentType: 'text/csv' });
      expect(sparse.status, JSON.stringify(sparse.body)).toBe(201);
      const appended = telemetryImportReportSchema.parse(sparse.body);
      expect(appended).toMatchObject({ rowsTaken: 30, samplesBefore: rows, samplesAfter: rows + 30 });
      const stillOutside = outsideOf(last + 30 * 20_000);
      expect(stillOutside).toBeLessThan(outside - 50);
      expect(appended.stamped.noTelemetry).toBe(stillOutside);

      // Stamping again from the whole log held in memory changes nothing.
      const again = t.ctx.live.withEvents(() =>
        stampDiveObservations(t.ctx.db, dive, logOf(t.ctx.db, dive).series, diveFacts(t.ctx.db, dive).gapMs),
      );
      expect(again.changed).toEqual([]);
      expect(again.noTelemetry).toBe(stillOutside);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
