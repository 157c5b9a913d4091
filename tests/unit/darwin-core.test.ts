/**
 * The Darwin Core Archive's parts against the published standards:
 * - terms: Darwin Core, Biodiversity Information Standards (TDWG), Occurrence core term list
 *   (tests/fixtures/darwin-core-occurrence-terms.txt, source in darwin-core-sources.md);
 * - meta.xml: the Darwin Core Text Guide (TDWG) and its XML schema tdwg_dwc_text.xsd, checked
 *   by xmllint (libxml2, compiled to WebAssembly by the xmllint-wasm package);
 * - eml.xml: Ecological Metadata Language 2.2.0 (Knowledge Network for Biocomplexity), the
 *   elements a data portal needs, parsed by jsdom's XML parser.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';

import { JSDOM } from 'jsdom';
import { describe, expect, it } from 'vitest';
import { validateXML } from 'xmllint-wasm';

import {
  emlXml,
  measurementLines,
  measurementTerms,
  metaXml,
  occurrenceHeader,
  occurrenceLine,
  occurrenceTerms,
  termIri,
  toOccurrence,
  tsvCell,
  type DwcDataset,
  type DwcEntry,
  type EmlDataset,
} from '@/lib/darwin-core';

const fixtures = path.join(__dirname, '..', 'fixtures');
const tdwgTerms = new Set(
  readFileSync(path.join(fixtures, 'darwin-core-occurrence-terms.txt'), 'utf8')
    .split('\n')
    .map((l) => l.trim())
    .filter(Boolean),
);
const xsd = readFileSync(path.join(fixtures, 'tdwg_dwc_text.xsd'), 'utf8');

async function validMeta(xml: string) {
  return validateXML({ xml: { fileName: 'meta.xml', contents: xml }, schema: { fileName: 'tdwg_dwc_text.xsd', contents: xsd } });
}

const entry: DwcEntry = {
  id: '0b6f2a8e-3c1d-4d1e-9a57-2f1c6d2b9e11',
  diveId: '5d0c1e2f-0000-4000-8000-000000000002',
  diveNumber: 'T-02',
  campaignId: '7a1b2c3d-0000-4000-8000-000000000001',
  observedAt: '2026-05-13T21:14:07.250Z',
  updatedAt: '2026-05-14T08:00:00.000Z',
  title: 'Coral\tcolony on\nthe stern',
  lat: 36.14512,
  lon: -7.43207,
  depth: 512.347,
  authorName: 'Test Biologist',
  sampled: false,
  identification: {
    scientificName: 'Desmophyllum pertusum',
    taxonRank: 'species',
    qualifier: 'cf.',
    taxonId: 'urn:lsid:example.org:taxname:1',
    verificationStatus: 'verified',
    identifiedByName: 'Test Identifier',
  },
  photoUrls: ['https://notebook.test/api/photos/a', 'https://notebook.test/api/photos/b'],
  individualCount: null,
  organismQuantity: null,
  organismQuantityType: null,
  substrate: null,
  sample: null,
  sizes: [],
};
const dataset: DwcDataset = { licence: 'CC-BY-4.0', rightsHolder: 'Test Lead', positions: 'exact', vehicle: 'Test ROV' };

describe('occurrence columns', () => {
  it('are all terms of the TDWG Occurrence core list', () => {
    expect(occurrenceTerms.filter((t) => !tdwgTerms.has(t))).toEqual([]);
    expect(new Set(occurrenceTerms).size).toBe(occurrenceTerms.length);
  });

  it('take Dublin Core IRIs for the record-level terms Darwin Core borrows, Darwin Core IRIs for the rest', () => {
    expect(termIri('license')).toBe('http://purl.org/dc/terms/license');
    expect(termIri('modified')).toBe('http://purl.org/dc/terms/modified');
    expect(termIri('eventDate')).toBe('http://rs.tdwg.org/dwc/terms/eventDate');
  });

  it('hold at least the terms a data portal expects of an occurrence', () => {
    for (const t of [
      'occurrenceID',
      'eventID',
      'parentEventID',
      'eventDate',
      'basisOfRecord',
      'decimalLatitude',
      'decimalLongitude',
      'geodeticDatum',
      'coordinateUncertaintyInMeters',
      'minimumDepthInMeters',
      'maximumDepthInMeters',
      'scientificName',
      'scientificNameID',
      'taxonRank',
      'identificationQualifier',
      'identificationVerificationStatus',
      'identifiedBy',
      'recordedBy',
      'associatedMedia',
      'occurrenceStatus',
      'license',
      'rightsHolder',
      'informationWithheld',
      'dataGeneralizations',
    ]) {
      expect(occurrenceTerms).toContain(t);
    }
    expect(occurrenceTerms[0]).toBe('occurrenceID');
  });
});

describe('an occurrence row', () => {
  const row = toOccurrence(entry, dataset);

  it('carries a count, a cover, the substrate and the sample (Darwin Core individualCount, organismQuantity with organismQuantityType, habitat, materialEntityID, preparations)', () => {
    const counted = toOccurrence(
      {
        ...entry,
        individualCount: 4,
        organismQuantity: 35,
        organismQuantityType: '% cover',
        substrate: 'Metal',
        sample: { sampleNumber: 'S-014', preservation: '96 % ethanol' },
        sampled: true,
      },
      dataset,
    );
    expect(counted).toMatchObject({
      individualCount: 4,
      organismQuantity: 35,
      organismQuantityType: '% cover',
      habitat: 'substrate: Metal',
      materialEntityID: 'S-014',
      preparations: '96 % ethanol',
      basisOfRecord: 'MaterialSample',
    });
    expect(row).toMatchObject({
      individualCount: null,
      organismQuantity: null,
      organismQuantityType: null,
      habitat: null,
      materialEntityID: null,
    });
  });

  it('gives sizes as measurement-or-fact lines tied to the occurrence', () => {
    const lines = measurementLines({
      id: entry.id,
      sizes: [
        { dimension: 'length', valueCm: 12.5, method: 'measured' },
        { dimension: 'height', valueCm: 4, method: 'estimated' },
      ],
    });
    expect(lines).toBe(`urn:uuid:${entry.id}\tlength\t12.5\tcm\tmeasured\n` + `urn:uuid:${entry.id}\theight\t4\tcm\testimated by eye\n`);
    expect(measurementTerms.slice(1).map(termIri)).toEqual([
      'http://rs.tdwg.org/dwc/terms/measurementType',
      'http://rs.tdwg.org/dwc/terms/measurementValue',
      'http://rs.tdwg.org/dwc/terms/measurementUnit',
      'http://rs.tdwg.org/dwc/terms/measurementMethod',
    ]);
  });

  it('is a human observation, or a material sample when a sample was taken (basisOfRecord is a Darwin Core class name)', () => {
    expect(row.basisOfRecord).toBe('HumanObservation');
    expect(toOccurrence({ ...entry, sampled: true }, dataset).basisOfRecord).toBe('MaterialSample');
  });

  it('gives eventDate in ISO 8601 UTC', () => {
    expect(row.eventDate).toBe('2026-05-13T21:14:07.250Z');
    expect(String(row.eventDate)).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}(\.\d+)?Z$/);
  });

  it('gives one depth as both minimum and maximum for a point', () => {
    expect(row.minimumDepthInMeters).toBe(512.35);
    expect(row.maximumDepthInMeters).toBe(row.minimumDepthInMeters);
  });

  it('keeps identifiers stable and tied to the entry, the dive and the campaign', () => {
    expect(row.occurrenceID).toBe(`urn:uuid:${entry.id}`);
    expect(toOccurrence({ ...entry, title: 'changed' }, dataset).occurrenceID).toBe(row.occurrenceID);
    expect(row.eventID).toBe(`urn:uuid:${entry.diveId}`);
    expect(row.parentEventID).toBe(`urn:uuid:${entry.campaignId}`);
  });

  it('carries the identification, the licence link and the photos', () => {
    expect(row).toMatchObject({
      scientificName: 'Desmophyllum pertusum',
      scientificNameID: 'urn:lsid:example.org:taxname:1',
      taxonRank: 'species',
      identificationQualifier: 'cf.',
      identificationVerificationStatus: 'verified',
      identifiedBy: 'Test Identifier',
      recordedBy: 'Test Biologist',
      occurrenceStatus: 'present',
      geodeticDatum: 'EPSG:4326',
      license: 'https://creativecommons.org/licenses/by/4.0/legalcode',
      rightsHolder: 'Test Lead',
      associatedMedia: 'https://notebook.test/api/photos/a | https://notebook.test/api/photos/b',
    });
    expect(toOccurrence({ ...entry, identification: null }, dataset).scientificName).toBe('Biota');
  });

  it('replaces tabs and line breaks inside values, so each row stays one line of as many cells as terms', () => {
    const line = occurrenceLine(entry, dataset);
    expect(line.endsWith('\n')).toBe(true);
    expect(line.slice(0, -1)).not.toMatch(/[\r\n]/);
    expect(line.slice(0, -1).split('\t')).toHaveLength(occurrenceTerms.length);
    expect(occurrenceHeader().trimEnd().split('\t')).toEqual([...occurrenceTerms]);
    expect(tsvCell('a\tb\r\nc')).toBe('a b c');
  });
});

describe('meta.xml', () => {
  it('is valid against tdwg_dwc_text.xsd', async () => {
    const result = await validMeta(metaXml());
    expect(result.errors).toEqual([]);
    expect(result.valid).toBe(true);
  });

  it('the validator refuses a descriptor that breaks the schema (no <files>), so the check above can fail', async () => {
    const broken = metaXml().replace(/ *<files>[\s\S]*<\/files>\n/, '');
    expect((await validMeta(broken)).valid).toBe(false);
  });

  it('declares an Occurrence core, its file, the id column and one field per other column, with explicit delimiters', () => {
    const doc = new JSDOM(metaXml(), { contentType: 'application/xml' }).window.document;
    const core = doc.querySelector('core')!;
    expect(core.getAttribute('rowType')).toBe('http://rs.tdwg.org/dwc/terms/Occurrence');
    expect(core.getAttribute('fieldsTerminatedBy')).toBe('\\t');
    expect(core.getAttribute('linesTerminatedBy')).toBe('\\n');
    expect(core.getAttribute('fieldsEnclosedBy')).toBe('');
    expect(core.getAttribute('encoding')).toBe('UTF-8');
    expect(core.getAttribute('ignoreHeaderLines')).toBe('1');
    expect(doc.querySelector('files > location')?.textContent).toBe('occurrence.txt');
    expect(doc.querySelector('id')?.getAttribute('index')).toBe('0');
    const fields = [...core.querySelectorAll('field')].map((f) => [Number(f.getAttribute('index')), f.getAttribute('term')]);
    expect(fields).toEqual(occurrenceTerms.slice(1).map((t, i) => [i + 1, termIri(t)]));
  });

  it('declares the sizes as a measurement-or-fact extension tied to the core by its first column', () => {
    const doc = new JSDOM(metaXml(), { contentType: 'application/xml' }).window.document;
    const extension = doc.querySelector('extension')!;
    expect(extension.getAttribute('rowType')).toBe('http://rs.tdwg.org/dwc/terms/MeasurementOrFact');
    expect(extension.querySelector('files > location')?.textContent).toBe('measurementorfact.txt');
    expect(extension.querySelector('coreid')?.getAttribute('index')).toBe('0');
    const fields = [...extension.querySelectorAll('field')].map((f) => [Number(f.getAttribute('index')), f.getAttribute('term')]);
    expect(fields).toEqual(measurementTerms.slice(1).map((t, i) => [i + 1, termIri(t)]));
  });
});

const eml: EmlDataset = {
  campaignId: '7a1b2c3d-0000-4000-8000-000000000001',
  campaignName: 'Test Campaign <2026>',
  siteName: 'Test Site & Slope',
  vessel: 'RV Test',
  vehicle: 'Test ROV',
  permitRef: 'P-1',
  lead: { name: 'Test Lead Person', email: 'lead@example.test', role: 'lead' },
  people: [
    { name: 'Test Lead Person', role: 'lead' },
    { name: 'Test Biologist', role: 'scientist' },
  ],
  pubDate: '2026-06-01',
  licence: 'CC0-1.0',
  positions: 'exact',
  occurrences: 3,
  dives: 2,
  box: { south: 36.14, north: 36.15, west: -7.44, east: -7.43 },
  firstAt: '2026-05-12T10:00:00.000Z',
  lastAt: '2026-05-13T22:00:00.000Z',
  minDepth: 480,
  maxDepth: 620.4,
};

function parseEml(xml: string) {
  const doc = new JSDOM(xml, { contentType: 'application/xml' }).window.document;
  expect(doc.getElementsByTagName('parsererror')).toHaveLength(0);
  return doc;
}

describe('eml.xml (EML 2.2.0)', () => {
  it('is well-formed XML with the elements a data portal requires', () => {
    const doc = parseEml(emlXml(eml));
    const root = doc.documentElement;
    expect(root.namespaceURI).toBe('https://eml.ecoinformatics.org/eml-2.2.0');
    expect(root.localName).toBe('eml');
    expect(root.getAttribute('packageId')).toBe(`urn:uuid:${eml.campaignId}`);
    expect(root.getAttribute('system')).toBe('bathynote');
    expect(root.getAttribute('scope')).toBe('system');
    const dataset = doc.querySelector('dataset')!;
    expect(dataset.querySelector(':scope > title')?.textContent).toBe(
      'Biological observations of Test Campaign <2026> at Test Site & Slope',
    );
    expect(dataset.querySelector(':scope > creator > individualName > surName')?.textContent).toBe('Person');
    expect(dataset.querySelector(':scope > creator > individualName > givenName')?.textContent).toBe('Test Lead');
    expect(dataset.querySelector(':scope > pubDate')?.textContent).toBe('2026-06-01');
    expect(dataset.querySelector(':scope > abstract > para')?.textContent).toContain('3 occurrences');
    expect(dataset.querySelector(':scope > contact > electronicMailAddress')?.textContent).toBe('lead@example.test');
    expect(dataset.querySelector(':scope > intellectualRights ulink')?.getAttribute('url')).toBe(
      'https://creativecommons.org/publicdomain/zero/1.0/legalcode',
    );
    expect([...dataset.querySelectorAll(':scope > associatedParty > role')].map((r) => r.textContent)).toEqual(['lead', 'scientist']);
    expect(dataset.querySelector(':scope > methods')?.textContent).toContain('Test ROV');
  });

  it('carries the bounding box, the time span and the depth range (as altitudes below the surface)', () => {
    const doc = parseEml(emlXml(eml));
    const text = (sel: string) => doc.querySelector(sel)?.textContent;
    expect(text('westBoundingCoordinate')).toBe('-7.44');
    expect(text('northBoundingCoordinate')).toBe('36.15');
    expect(text('altitudeMinimum')).toBe('-620.4');
    expect(text('altitudeMaximum')).toBe('-480');
    expect(text('beginDate calendarDate')).toBe('2026-05-12');
    expect(text('endDate calendarDate')).toBe('2026-05-13');
  });

  it('keeps EML 2.2.0 element order in the dataset (title, creator, …, pubDate, abstract, …, intellectualRights, …, coverage, contact, methods)', () => {
    const doc = parseEml(emlXml(eml));
    const names = [...doc.querySelector('dataset')!.children].map((c) => c.localName);
    const order = [
      'alternateIdentifier',
      'title',
      'creator',
      'associatedParty',
      'pubDate',
      'language',
      'abstract',
      'additionalInfo',
      'intellectualRights',
      'licensed',
      'coverage',
      'contact',
      'methods',
    ];
    expect(names.filter((n, i) => n !== names[i - 1])).toEqual(order);
  });

  it('gives no bounding box when positions are withheld, and a box on whole grid cells when they are rounded', () => {
    const withheld = parseEml(emlXml({ ...eml, positions: 'withheld' }));
    expect(withheld.querySelector('geographicCoverage')).toBeNull();
    expect(withheld.querySelector('additionalInfo para')?.textContent).toContain('withheld');
    const rounded = parseEml(
      emlXml({ ...eml, positions: 'grid-0.1', box: { south: 36.1451, north: 36.1452, west: -7.4321, east: -7.432 } }),
    );
    expect(rounded.querySelector('southBoundingCoordinate')?.textContent).toBe('36.05');
    expect(rounded.querySelector('northBoundingCoordinate')?.textContent).toBe('36.15');
    expect(rounded.querySelector('westBoundingCoordinate')?.textContent).toBe('-7.45');
    expect(rounded.querySelector('eastBoundingCoordinate')?.textContent).toBe('-7.35');
  });
});
