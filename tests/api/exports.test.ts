/**
 * The exports over real HTTP, read back with independent readers:
 * - the Darwin Core Archive unzipped with fflate; meta.xml validated against tdwg_dwc_text.xsd
 *   (Darwin Core Text Guide, TDWG) by xmllint-wasm; every column a term of the TDWG Occurrence
 *   core list (tests/fixtures/darwin-core-occurrence-terms.txt, source in
 *   darwin-core-sources.md); occurrence.txt read back with csv-parse;
 * - GeoJSON checked with @placemarkio/check-geojson (RFC 7946) and our own order tests;
 * - CSV (RFC 4180) read back with csv-parse, formula cells neutralised (OWASP "CSV Injection").
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';

import { check } from '@placemarkio/check-geojson';
import { parse } from 'csv-parse/sync';
import { and, eq, isNotNull } from 'drizzle-orm';
import { strFromU8, unzipSync } from 'fflate';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { validateXML } from 'xmllint-wasm';

import { campaigns, dives, finds, observations, user } from '@/db/schema';
import { naturalCompare } from '@/lib/natural-sort';
import { exportSummarySchema } from '@/lib/schemas';
import { emails } from '../helpers/demo';
import { buildFixtures, type Fixtures } from '../helpers/fixtures';
import { startTestServer, type TestServer } from '../helpers/test-server';

const fixtures = path.join(__dirname, '..', 'fixtures');
const tdwgTerms = new Set(
  readFileSync(path.join(fixtures, 'darwin-core-occurrence-terms.txt'), 'utf8')
    .split('\n')
    .map((l) => l.trim())
    .filter(Boolean),
);

let t: TestServer;
let ids: Fixtures;
const cookies = new Map<string, string>();

beforeAll(async () => {
  t = await startTestServer({ env: { AUTH_RATE_LIMIT: '200' } });
  // Positions, depths and temperatures come from the fixture dive's vehicle log.
  ids = await buildFixtures(t, { telemetry: true });
  const lead = await t.signIn(emails.lead);
  expect((await lead.patch(`/api/campaigns/${ids.campaign}`).send({ vehicle: 'ROV Test', permitRef: 'P-TEST-1' })).status).toBeLessThan(
    300,
  );
  // Three finds, one recovered with a custody trail of two holders.
  const log = (await lead.get(`/api/dives/${ids.dive}/observations?kind=archaeology&order=asc&limit=200`)).body as {
    items: { id: string; version: number }[];
  };
  const numbered: [string, 'in-situ' | 'recovered'][] = [
    ['T-2', 'in-situ'],
    ['T-1', 'recovered'],
    ['T-3', 'in-situ'],
  ];
  for (const [i, [findNumber, state]] of numbered.entries()) {
    const item = log.items[i]!;
    const res = await lead
      .put(`/api/observations/${item.id}/find`)
      .send({ version: item.version, findNumber, objectType: 'amphora', state });
    expect(res.status).toBeLessThan(300);
    if (state === 'recovered') {
      for (const [holder, location, since] of [
        ['Pilot on watch', 'Vehicle basket', '2026-05-13T20:00:00.000Z'],
        ['Conservator', 'Wet lab', '2026-05-13T23:30:00.000Z'],
      ] as const) {
        const custody = await lead.post(`/api/observations/${item.id}/custody`).send({ holder, location, since, container: 'Tank 1' });
        expect(custody.status).toBe(201);
      }
    }
  }
});
afterAll(() => t.close());

async function download(email: string | null, p: string) {
  let cookie = email ? cookies.get(email) : undefined;
  if (email && !cookie) {
    cookie = await t.sessionCookie(email);
    cookies.set(email, cookie);
  }
  const res = await fetch(`${t.url}${p}`, { headers: cookie ? { cookie } : {} });
  return { status: res.status, headers: res.headers, bytes: new Uint8Array(await res.arrayBuffer()) };
}

const exportPath = (name: string) => `/api/campaigns/${ids.campaign}/export/${name}`;
const text = (bytes: Uint8Array) => new TextDecoder('utf-8', { ignoreBOM: true }).decode(bytes);

async function setPositions(publicPositions: string) {
  const res = await (await t.signIn(emails.lead)).patch(`/api/campaigns/${ids.campaign}`).send({ publicPositions });
  expect(res.status).toBeLessThan(300);
}

function liveEntries(kind?: 'biology') {
  const db = t.ctx.db;
  return db
    .select()
    .from(observations)
    .where(and(eq(observations.campaignId, ids.campaign), eq(observations.retired, false), ...(kind ? [eq(observations.kind, kind)] : [])))
    .all();
}

function readOccurrences(zip: Record<string, Uint8Array>) {
  return parse<Record<string, string>>(strFromU8(zip['occurrence.txt']!), {
    delimiter: '\t',
    quote: false,
    columns: true,
    record_delimiter: '\n',
    relax_column_count: false,
  });
}

async function archive() {
  const res = await download(emails.biologist, exportPath('darwin-core.zip'));
  expect(res.status).toBe(200);
  expect(res.headers.get('content-type')).toBe('application/zip');
  expect(res.headers.get('content-disposition')).toMatch(/^attachment; filename=".+\.zip"$/);
  return unzipSync(res.bytes);
}

describe('Darwin Core Archive', () => {
  it('holds meta.xml valid against tdwg_dwc_text.xsd, eml.xml and occurrence.txt with a row per live biology entry', async () => {
    // An entry retired before the export never appears in it.
    const bio = await t.signIn(emails.biologist);
    const retired = (await bio.post(`/api/dives/${ids.dive}/observations`).send({ kind: 'biology', title: 'Logged by mistake' })).body
      .id as string;
    expect((await bio.delete(`/api/observations/${retired}`)).status).toBeLessThan(300);

    const zip = await archive();
    expect(Object.keys(zip).sort()).toEqual(['eml.xml', 'measurementorfact.txt', 'meta.xml', 'occurrence.txt']);
    const xsd = readFileSync(path.join(fixtures, 'tdwg_dwc_text.xsd'), 'utf8');
    const valid = await validateXML({
      xml: { fileName: 'meta.xml', contents: strFromU8(zip['meta.xml']!) },
      schema: { fileName: 'tdwg_dwc_text.xsd', contents: xsd },
    });
    expect(valid.errors).toEqual([]);
    expect(valid.valid).toBe(true);

    const rows = readOccurrences(zip);
    const expected = liveEntries('biology');
    expect(expected.length).toBeGreaterThan(3);
    expect(rows).toHaveLength(expected.length);
    expect(new Set(rows.map((r) => r.occurrenceID))).toEqual(new Set(expected.map((e) => `urn:uuid:${e.id}`)));
    expect(rows.some((r) => r.occurrenceID === `urn:uuid:${retired}`)).toBe(false);

    const header = strFromU8(zip['occurrence.txt']!).split('\n')[0]!.split('\t');
    expect(header.filter((term) => !tdwgTerms.has(term))).toEqual([]);
    // meta.xml names one field per column after the id, in the same order as the header.
    const coreXml = strFromU8(zip['meta.xml']!).split('</core>')[0]!;
    const terms = [...coreXml.matchAll(/<field index="(\d+)" term="[^"]*\/([^/"]+)"\/>/g)].map((m) => [Number(m[1]), m[2]]);
    expect(terms).toEqual(header.slice(1).map((term, i) => [i + 1, term]));

    for (const r of rows) {
      expect(['HumanObservation', 'MaterialSample']).toContain(r.basisOfRecord);
      expect(r.eventDate).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}\.\d{3}Z$/);
      expect(r.minimumDepthInMeters).toBe(r.maximumDepthInMeters);
      expect(r.parentEventID).toBe(`urn:uuid:${ids.campaign}`);
      expect(r.license).toMatch(/^https:\/\/creativecommons\.org\//);
    }
    // The fixture's push core of the mat carries the sample tag: a material sample.
    expect(rows.some((r) => r.basisOfRecord === 'MaterialSample')).toBe(true);
  });

  it('gives the same occurrenceID to the same entry in the next export', async () => {
    const a = readOccurrences(await archive()).map((r) => r.occurrenceID);
    const b = readOccurrences(await archive()).map((r) => r.occurrenceID);
    expect(b).toEqual(a);
  });

  it('carries EML with the lead as creator and contact, the licence the lead chose, and the vehicle in the methods', async () => {
    const lead = await t.signIn(emails.lead);
    expect((await lead.patch(`/api/campaigns/${ids.campaign}`).send({ exportLicence: 'CC-BY-NC-4.0' })).status).toBeLessThan(300);
    const eml = strFromU8((await archive())['eml.xml']!);
    expect(eml).toContain('<contact>');
    const leadName = t.ctx.db.select({ name: user.name }).from(user).where(eq(user.email, emails.lead)).get()!.name;
    expect(eml).toMatch(new RegExp(`<creator>[\\s\\S]*<surName>${leadName.split(' ').pop()!}</surName>`));
    expect(eml).toContain('url="https://creativecommons.org/licenses/by-nc/4.0/legalcode"');
    expect(eml).toMatch(/<methods>[\s\S]*ROV Test[\s\S]*<\/methods>/);
    expect(readOccurrences(await archive()).every((r) => r.license === 'https://creativecommons.org/licenses/by-nc/4.0/legalcode')).toBe(
      true,
    );
    expect((await lead.patch(`/api/campaigns/${ids.campaign}`).send({ exportLicence: 'MIT' })).status).toBe(400);
  });
});

describe('protected positions', () => {
  /** Every way an exact position could be written: as stored, and to 3–5 decimals. */
  function exactForms(): string[] {
    const campaign = t.ctx.db.select().from(campaigns).where(eq(campaigns.id, ids.campaign)).get()!;
    const values = [campaign.datumLat, campaign.datumLon];
    for (const e of liveEntries()) if (e.lat !== null && e.lon !== null) values.push(e.lat, e.lon);
    const forms = new Set<string>();
    for (const v of values) {
      forms.add(String(v));
      for (const d of [3, 4, 5]) forms.add(v.toFixed(d));
    }
    return [...forms];
  }

  it('withheld: no exact position in any byte of the public archive or the GeoJSON, and both say so', async () => {
    const placed = liveEntries().filter((e) => e.lat !== null);
    expect(placed.length).toBeGreaterThan(0);
    await setPositions('withheld');
    const zip = await archive();
    const forms = exactForms();
    for (const [name, bytes] of Object.entries(zip)) {
      const content = strFromU8(bytes);
      for (const form of forms) expect(content.includes(form), `${form} in ${name}`).toBe(false);
    }
    const rows = readOccurrences(zip);
    expect(rows.every((r) => r.decimalLatitude === '' && r.decimalLongitude === '')).toBe(true);
    const bioPlaced = liveEntries('biology').filter((e) => e.lat !== null).length;
    expect(rows.filter((r) => /withheld/.test(r.informationWithheld ?? ''))).toHaveLength(bioPlaced);
    expect(strFromU8(zip['eml.xml']!)).not.toContain('boundingCoordinates');

    const geo = await download(emails.guest, exportPath('observations.geojson'));
    const body = text(geo.bytes);
    for (const form of forms) expect(body.includes(form), form).toBe(false);
    const parsed = JSON.parse(body) as { features: unknown[]; omitted: { positionWithheld: number } };
    expect(parsed.features).toEqual([]);
    expect(parsed.omitted.positionWithheld).toBe(placed.length);
  });

  it('rounded to 0.01°: every public position on the grid with its uncertainty widened; the find register stays exact', async () => {
    await setPositions('grid-0.01');
    const onGrid = (v: number) => Math.abs(v * 100 - Math.round(v * 100)) < 1e-6;
    const rows = readOccurrences(await archive()).filter((r) => r.decimalLatitude !== '');
    expect(rows.length).toBeGreaterThan(0);
    for (const r of rows) {
      expect(onGrid(Number(r.decimalLatitude)) && onGrid(Number(r.decimalLongitude))).toBe(true);
      expect(Number(r.coordinateUncertaintyInMeters)).toBeGreaterThan(500);
      expect(r.dataGeneralizations).toMatch(/0\.01°/);
    }
    const geo = JSON.parse(text((await download(emails.biologist, exportPath('observations.geojson'))).bytes)) as {
      features: { geometry: { coordinates: [number, number] } }[];
    };
    expect(geo.features.length).toBeGreaterThan(0);
    for (const f of geo.features) expect(f.geometry.coordinates.every(onGrid)).toBe(true);

    const register = parse<Record<string, string>>(text((await download(emails.lead, exportPath('finds.csv'))).bytes), {
      bom: true,
      columns: true,
    });
    const exact = t.ctx.db
      .select({ n: finds.findNumber, lat: observations.lat })
      .from(finds)
      .innerJoin(observations, eq(observations.id, finds.observationId))
      .where(and(eq(finds.campaignId, ids.campaign), isNotNull(observations.lat)))
      .all();
    expect(exact.length).toBeGreaterThan(0);
    for (const f of exact) expect(Number(register.find((r) => r['Find number'] === f.n)!['Latitude (exact, WGS 84)'])).toBe(f.lat);
  });

  it('exact: the public files carry positions as recorded', async () => {
    await setPositions('exact');
    const geo = JSON.parse(text((await download(emails.biologist, exportPath('observations.geojson'))).bytes)) as {
      features: { id: string; geometry: { coordinates: [number, number] } }[];
    };
    const byId = new Map(liveEntries().map((e) => [e.id, e]));
    expect(geo.features.length).toBe(liveEntries().filter((e) => e.lat !== null).length);
    for (const f of geo.features) {
      const e = byId.get(f.id)!;
      // RFC 7946 §3.1.1: longitude first.
      expect(f.geometry.coordinates).toEqual([e.lon, e.lat]);
    }
  });
});

describe('find register', () => {
  it('has a row per live find in natural find-number order, with custody, dive and permit, as UTF-8 with a BOM', async () => {
    const lead = await t.signIn(emails.lead);
    // Two finds whose numbers sort differently as text and as numbers.
    for (const n of ['T-10', 'T-9']) {
      const id = (await lead.post(`/api/dives/${ids.dive}/observations`).send({ kind: 'archaeology', title: `Sherd ${n}` })).body
        .id as string;
      expect((await lead.put(`/api/observations/${id}/find`).send({ version: 1, findNumber: n, objectType: 'sherd' })).status).toBeLessThan(
        300,
      );
    }
    const res = await download(emails.archaeologist, exportPath('finds.csv'));
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toMatch(/^text\/csv/);
    const body = text(res.bytes);
    expect(body.charCodeAt(0)).toBe(0xfeff);
    const rows = parse<Record<string, string>>(body, { bom: true, columns: true });
    const numbers = rows.map((r) => r['Find number']!);
    const live = t.ctx.db
      .select({ n: finds.findNumber })
      .from(finds)
      .innerJoin(observations, eq(observations.id, finds.observationId))
      .where(and(eq(finds.campaignId, ids.campaign), eq(observations.retired, false)))
      .all();
    expect(numbers).toHaveLength(live.length);
    expect(numbers).toEqual([...numbers].sort(naturalCompare));
    expect(numbers.indexOf('T-9')).toBeLessThan(numbers.indexOf('T-10'));
    expect(numbers.slice(0, 3)).toEqual(['T-1', 'T-2', 'T-3']);
    const campaign = t.ctx.db.select().from(campaigns).where(eq(campaigns.id, ids.campaign)).get()!;
    expect(rows.every((r) => r['Permit reference'] === (campaign.permitRef ?? ''))).toBe(true);
    const recovered = rows.find((r) => r['In situ or recovered'] === 'recovered');
    expect(recovered).toMatchObject({
      'Find number': 'T-1',
      'Current holder': 'Conservator',
      'Kept at': 'Wet lab',
      Container: 'Tank 1',
      'Hand-overs': '1',
    });
    expect(rows.find((r) => r['Find number'] === 'T-2')).toMatchObject({
      'In situ or recovered': 'in situ',
      'Current holder': '',
      'Hand-overs': '0',
    });
    expect(rows.every((r) => /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}\.\d{3}Z$/.test(r['Time (UTC)']!))).toBe(true);
  });
});

describe('GeoJSON', () => {
  it('is a valid FeatureCollection with [longitude, latitude], depth as a property, and the unplaced entries counted', async () => {
    await setPositions('exact');
    const bio = await t.signIn(emails.biologist);
    // lat 36.1, lon −7.4 must come out as [-7.4, 36.1]; an entry with no position is counted, not drawn.
    const placed = (
      await bio.post(`/api/dives/${ids.dive}/observations`).send({ kind: 'biology', title: 'Placed', lat: 36.1, lon: -7.4, depth: 530 })
    ).body.id as string;
    const res = await download(emails.guest, exportPath('observations.geojson'));
    expect(res.headers.get('content-type')).toMatch(/^application\/geo\+json/);
    const parsed = check(text(res.bytes)) as unknown as {
      features: { id: string; geometry: { coordinates: number[] }; properties: { depthM: number } }[];
      omitted: { withoutPosition: number };
    };
    const f = parsed.features.find((x) => x.id === placed)!;
    expect(f.geometry.coordinates).toEqual([-7.4, 36.1]);
    expect(f.properties.depthM).toBe(530);
    for (const x of parsed.features) {
      expect(x.geometry.coordinates).toHaveLength(2);
      expect(Math.abs(x.geometry.coordinates[0]!)).toBeLessThanOrEqual(180);
      expect(Math.abs(x.geometry.coordinates[1]!)).toBeLessThanOrEqual(90);
    }
    expect(parsed.omitted.withoutPosition).toBe(liveEntries().filter((e) => e.lat === null).length);
  });
});

describe('CSV of a list', () => {
  it('round-trips every live entry, with formula cells neutralised and a BOM', async () => {
    const bio = await t.signIn(emails.biologist);
    const hostile = (
      await bio
        .post(`/api/dives/${ids.dive}/observations`)
        .send({ kind: 'biology', title: '=cmd|" /C calc"!A0', note: '@SUM(1+1)\nsecond line, "quoted"' })
    ).body.id as string;
    const res = await download(emails.pilot, exportPath('observations.csv'));
    expect(res.status).toBe(200);
    const body = text(res.bytes);
    expect(body.charCodeAt(0)).toBe(0xfeff);
    const rows = parse<Record<string, string>>(body, { bom: true, columns: true });
    expect(rows).toHaveLength(liveEntries().length);
    const row = rows.find((r) => r.id === hostile)!;
    expect(row.title).toBe(`'=cmd|" /C calc"!A0`);
    expect(row.note).toBe(`'@SUM(1+1)\nsecond line, "quoted"`);
    for (const r of rows) for (const v of Object.values(r)) expect(v).not.toMatch(/^[=+@\t\r]/);
  });

  it('takes the dive log filters and a dive, and lists exactly what the log lists, in its order', async () => {
    const q = `diveId=${ids.dive}&kind=biology&sort=time&order=asc`;
    const rows = parse<Record<string, string>>(text((await download(emails.biologist, exportPath(`observations.csv?${q}`))).bytes), {
      bom: true,
      columns: true,
    });
    const log = (await (await t.signIn(emails.biologist)).get(`/api/dives/${ids.dive}/observations?kind=biology&order=asc&limit=200`))
      .body as {
      items: { id: string }[];
    };
    expect(rows.map((r) => r.id)).toEqual(log.items.map((i) => i.id));
    expect(rows.every((r) => r.kind === 'biology')).toBe(true);
  });

  it('refuses a bad filter with 400 and a dive of another campaign with 404', async () => {
    expect((await download(emails.lead, exportPath('observations.csv?kind=geology'))).status).toBe(400);
    expect((await download(emails.lead, exportPath('observations.csv?limit=5'))).status).toBe(400);
    expect((await download(emails.lead, exportPath(`observations.csv?diveId=${ids.otherDive}`))).status).toBe(404);
  });
});

describe('who may export', () => {
  const names = ['darwin-core.zip', 'finds.csv', 'observations.geojson', 'observations.csv', 'summary'];

  it('a non-member gets 404 for every export, and no bytes of it', async () => {
    for (const name of names) {
      const res = await download(emails.outsider, exportPath(name));
      expect(res.status, name).toBe(404);
      expect(JSON.parse(text(res.bytes))).toMatchObject({ error: { code: 'not_found' } });
    }
  });

  it('anyone signed out gets 401', async () => {
    for (const name of names) expect((await download(null, exportPath(name))).status, name).toBe(401);
  });
});

describe('summary', () => {
  it('counts what each file will hold and estimates its size', async () => {
    const res = await (await t.signIn(emails.guest)).get(exportPath('summary'));
    expect(res.status).toBe(200);
    const summary = exportSummarySchema.parse(res.body);
    const byKind = Object.fromEntries(summary.cards.map((c) => [c.kind, c]));
    expect(byKind['darwin-core']!.rows).toBe(liveEntries('biology').length);
    expect(byKind.csv!.rows).toBe(liveEntries().length);
    const diveCount = t.ctx.db.select().from(dives).where(eq(dives.campaignId, ids.campaign)).all().length;
    expect(byKind.csv!.dives).toBeLessThanOrEqual(diveCount);
    // The estimate is within a factor of two of the real download.
    const real = (await download(emails.guest, exportPath('observations.csv'))).bytes.length;
    expect(byKind.csv!.estimatedBytes).toBeGreaterThan(real / 2);
    expect(byKind.csv!.estimatedBytes).toBeLessThan(real * 2);
    const zip = (await download(emails.guest, exportPath('darwin-core.zip'))).bytes.length;
    expect(byKind['darwin-core']!.estimatedBytes).toBeGreaterThan(zip / 2);
    expect(byKind['darwin-core']!.estimatedBytes).toBeLessThan(zip * 2);
    expect(byKind.finds!.public).toBe(false);
    expect(byKind.geojson!.public).toBe(true);
  });
});

describe('Darwin Core Archive: the deeper record', () => {
  it('carries counts, substrate and the sample on the occurrence, and sizes in measurementorfact.txt', async () => {
    const bio = await t.signIn(emails.biologist);
    const made = await bio.post(`/api/dives/${ids.dive}/observations`).send({
      kind: 'biology',
      title: 'Crinoids on the davit',
      individualCount: 9,
      substrate: 'Metal',
      sizes: [{ dimension: 'height', valueCm: 22, method: 'estimated' }],
    });
    expect(made.status).toBe(201);
    const sampled = await bio
      .put(`/api/observations/${made.body.id}/sample`)
      .send({ sampleNumber: 'DWC-7', sampleType: 'biological', preservation: '96 % ethanol' });
    expect(sampled.status).toBe(200);
    const zip = await archive();
    const row = readOccurrences(zip).find((r) => r.occurrenceID === `urn:uuid:${made.body.id}`)!;
    expect(row).toMatchObject({
      basisOfRecord: 'MaterialSample',
      individualCount: '9',
      habitat: 'substrate: Metal',
      materialEntityID: 'DWC-7',
      preparations: '96 % ethanol',
    });
    const mof = parse<Record<string, string>>(strFromU8(zip['measurementorfact.txt']!), {
      delimiter: '\t',
      quote: false,
      columns: true,
      record_delimiter: '\n',
    });
    expect(mof.filter((m) => m.occurrenceID === `urn:uuid:${made.body.id}`)).toEqual([
      {
        occurrenceID: `urn:uuid:${made.body.id}`,
        measurementType: 'height',
        measurementValue: '22',
        measurementUnit: 'cm',
        measurementMethod: 'estimated by eye',
      },
    ]);
  });
});
