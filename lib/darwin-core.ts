/**
 * Darwin Core Archive of a campaign's biology entries: the occurrence rows, the archive
 * descriptor (meta.xml) and the dataset's metadata (eml.xml).
 *
 * Terms and their IRIs: Darwin Core, Biodiversity Information Standards (TDWG), the
 * Occurrence core term list. File layout: the Darwin Core Text Guide (TDWG). Metadata: the
 * Ecological Metadata Language 2.2.0 (EML, Knowledge Network for Biocomplexity).
 */
import { publicBox, publicPosition, positionStatement } from './position-protection';
import type { ExportLicence, PublicPositionMode } from './schemas/exports';

export const DWC_NS = 'http://rs.tdwg.org/dwc/terms/';
export const DCTERMS_NS = 'http://purl.org/dc/terms/';
export const OCCURRENCE_ROW_TYPE = `${DWC_NS}Occurrence`;
/** The measurement-or-fact extension's row type (Darwin Core, MeasurementOrFact class). */
export const MEASUREMENT_ROW_TYPE = `${DWC_NS}MeasurementOrFact`;
export const MEASUREMENT_FILE = 'measurementorfact.txt';

/** The record-level terms Darwin Core borrows from Dublin Core; every other term is Darwin Core's own. */
const dublinCoreTerms = new Set([
  'type',
  'modified',
  'language',
  'license',
  'rightsHolder',
  'accessRights',
  'bibliographicCitation',
  'references',
]);

export const termIri = (term: string) => (dublinCoreTerms.has(term) ? DCTERMS_NS : DWC_NS) + term;

/** The columns of occurrence.txt, in order; the first is the record's identifier. */
export const occurrenceTerms = [
  'occurrenceID',
  'basisOfRecord',
  'occurrenceStatus',
  'individualCount',
  'organismQuantity',
  'organismQuantityType',
  'materialEntityID',
  'preparations',
  'eventID',
  'parentEventID',
  'fieldNumber',
  'eventDate',
  'samplingProtocol',
  'habitat',
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
  'occurrenceRemarks',
  'modified',
  'license',
  'rightsHolder',
  'informationWithheld',
  'dataGeneralizations',
] as const;
export type OccurrenceTerm = (typeof occurrenceTerms)[number];

export const licences: Record<ExportLicence, { title: string; url: string }> = {
  'CC0-1.0': {
    title: 'Creative Commons Zero 1.0 Universal (CC0 1.0) public domain dedication',
    url: 'https://creativecommons.org/publicdomain/zero/1.0/legalcode',
  },
  'CC-BY-4.0': {
    title: 'Creative Commons Attribution 4.0 International (CC BY 4.0)',
    url: 'https://creativecommons.org/licenses/by/4.0/legalcode',
  },
  'CC-BY-NC-4.0': {
    title: 'Creative Commons Attribution-NonCommercial 4.0 International (CC BY-NC 4.0)',
    url: 'https://creativecommons.org/licenses/by-nc/4.0/legalcode',
  },
};

/** A biology entry with what its occurrence row needs. */
export type DwcEntry = {
  id: string;
  diveId: string;
  diveNumber: string;
  campaignId: string;
  observedAt: string;
  updatedAt: string;
  title: string;
  lat: number | null;
  lon: number | null;
  depth: number | null;
  authorName: string;
  /** A sample was taken (the entry carries the sample tag): a material sample rather than a sighting. */
  sampled: boolean;
  identification: {
    scientificName: string;
    taxonRank: string | null;
    qualifier: string | null;
    taxonId: string | null;
    verificationStatus: string;
    identifiedByName: string;
  } | null;
  photoUrls: string[];
  individualCount: number | null;
  organismQuantity: number | null;
  organismQuantityType: string | null;
  /** The substrate class the organism sits on (the campaign's vocabulary, from CMECS). */
  substrate: string | null;
  sample: { sampleNumber: string; preservation: string | null } | null;
  sizes: { dimension: string; valueCm: number; method: string }[];
};

export type DwcDataset = {
  licence: ExportLicence;
  rightsHolder: string;
  positions: PublicPositionMode;
  vehicle: string | null;
};

/** Stable identifiers: the database ids never change, so neither do these across exports. */
export const occurrenceIdOf = (entryId: string) => `urn:uuid:${entryId}`;
export const eventIdOf = (diveId: string) => `urn:uuid:${diveId}`;

/**
 * A cell of a tab-separated file without quoting (fieldsEnclosedBy=""): tabs and line breaks
 * inside a value would split it, so they become spaces.
 */
export function tsvCell(value: string | number | null | undefined): string {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number') return Number.isFinite(value) ? String(value) : '';
  return value.replace(/[\t\r\n\u2028\u2029]+/g, ' ');
}

/** Depth and temperature are kept to a centimetre: more digits than any sensor gives say nothing. */
const round = (value: number, digits: number) => Number(value.toFixed(digits));

/** The values of an occurrence row, term by term. */
export function toOccurrence(entry: DwcEntry, dataset: DwcDataset): Record<OccurrenceTerm, string | number | null> {
  const position = entry.lat !== null && entry.lon !== null ? publicPosition({ lat: entry.lat, lon: entry.lon }, dataset.positions) : null;
  const statement = positionStatement(dataset.positions);
  const ident = entry.identification;
  const depth = entry.depth === null ? null : round(entry.depth, 2);
  return {
    occurrenceID: occurrenceIdOf(entry.id),
    basisOfRecord: entry.sampled ? 'MaterialSample' : 'HumanObservation',
    occurrenceStatus: 'present',
    individualCount: entry.individualCount,
    organismQuantity: entry.organismQuantity,
    organismQuantityType: entry.organismQuantity === null ? null : entry.organismQuantityType,
    // The sample's number in the campaign's register: unique within this dataset, which is one campaign.
    materialEntityID: entry.sample ? entry.sample.sampleNumber : null,
    preparations: entry.sample?.preservation ?? null,
    eventID: eventIdOf(entry.diveId),
    parentEventID: eventIdOf(entry.campaignId),
    fieldNumber: entry.diveNumber,
    eventDate: entry.observedAt,
    samplingProtocol: dataset.vehicle ? `video observation from ${dataset.vehicle}` : 'video observation from a remotely operated vehicle',
    habitat: entry.substrate ? `substrate: ${entry.substrate}` : null,
    decimalLatitude: position?.lat ?? null,
    decimalLongitude: position?.lon ?? null,
    geodeticDatum: position ? 'EPSG:4326' : null,
    coordinateUncertaintyInMeters: position?.uncertaintyM ?? null,
    // A point observation: the shallowest and deepest depth are the same.
    minimumDepthInMeters: depth,
    maximumDepthInMeters: depth,
    // An unidentified organism is recorded at the top of the tree (common practice in marine data portals).
    scientificName: ident?.scientificName ?? 'Biota',
    scientificNameID: ident?.taxonId ?? null,
    taxonRank: ident?.taxonRank ?? null,
    identificationQualifier: ident?.qualifier ?? null,
    identificationVerificationStatus: ident?.verificationStatus ?? null,
    identifiedBy: ident?.identifiedByName ?? null,
    recordedBy: entry.authorName,
    // Darwin Core's recommended separator for lists is " | ".
    associatedMedia: entry.photoUrls.length > 0 ? entry.photoUrls.join(' | ') : null,
    occurrenceRemarks: entry.title,
    modified: entry.updatedAt,
    license: licences[dataset.licence].url,
    rightsHolder: dataset.rightsHolder,
    informationWithheld: position || entry.lat === null ? null : statement.informationWithheld || null,
    dataGeneralizations: position && statement.dataGeneralizations ? statement.dataGeneralizations : null,
  };
}

export const occurrenceHeader = () => occurrenceTerms.join('\t') + '\n';

/** The columns of measurementorfact.txt; the first is the occurrence it belongs to. */
export const measurementTerms = ['occurrenceID', 'measurementType', 'measurementValue', 'measurementUnit', 'measurementMethod'] as const;

export const measurementHeader = () => measurementTerms.join('\t') + '\n';

/** An entry's sizes as measurement-or-fact lines: each dimension in centimetres, measured or estimated. */
export function measurementLines(entry: Pick<DwcEntry, 'id' | 'sizes'>): string {
  return entry.sizes
    .map(
      (s) =>
        [occurrenceIdOf(entry.id), s.dimension, tsvCell(s.valueCm), 'cm', s.method === 'measured' ? 'measured' : 'estimated by eye']
          .map((v) => tsvCell(v))
          .join('\t') + '\n',
    )
    .join('');
}

/** One line of occurrence.txt. */
export function occurrenceLine(entry: DwcEntry, dataset: DwcDataset): string {
  const values = toOccurrence(entry, dataset);
  return occurrenceTerms.map((term) => tsvCell(values[term])).join('\t') + '\n';
}

/** Text for XML content and attribute values. */
export function xmlEscape(text: string): string {
  return (
    text
      .replace(/&/g, '&amp;')
      .replace(/</g, '&lt;')
      .replace(/>/g, '&gt;')
      .replace(/"/g, '&quot;')
      .replace(/'/g, '&apos;')
      // XML 1.0 forbids these characters even when escaped, so they are dropped.
      // eslint-disable-next-line no-control-regex
      .replace(/[\u0000-\u0008\u000b\u000c\u000e-\u001f\ufffe\uffff]/g, '')
  );
}

/**
 * The archive descriptor: one Occurrence core, tab-separated, no quoting, a header line, and a
 * field per column after the identifier (the Darwin Core Text Guide's layout).
 */
export function metaXml(fileName = 'occurrence.txt'): string {
  const fields = occurrenceTerms
    .map((term, index) => (index === 0 ? null : `    <field index="${index}" term="${termIri(term)}"/>`))
    .filter((line): line is string => line !== null);
  return [
    '<?xml version="1.0" encoding="UTF-8"?>',
    '<archive xmlns="http://rs.tdwg.org/dwc/text/" metadata="eml.xml">',
    `  <core encoding="UTF-8" fieldsTerminatedBy="\\t" linesTerminatedBy="\\n" fieldsEnclosedBy="" ignoreHeaderLines="1" rowType="${OCCURRENCE_ROW_TYPE}">`,
    '    <files>',
    `      <location>${xmlEscape(fileName)}</location>`,
    '    </files>',
    '    <id index="0"/>',
    ...fields,
    '  </core>',
    `  <extension encoding="UTF-8" fieldsTerminatedBy="\\t" linesTerminatedBy="\\n" fieldsEnclosedBy="" ignoreHeaderLines="1" rowType="${MEASUREMENT_ROW_TYPE}">`,
    '    <files>',
    `      <location>${MEASUREMENT_FILE}</location>`,
    '    </files>',
    '    <coreid index="0"/>',
    ...measurementTerms.slice(1).map((term, i) => `    <field index="${i + 1}" term="${termIri(term)}"/>`),
    '  </extension>',
    '</archive>',
    '',
  ].join('\n');
}

export type EmlPerson = { name: string; email?: string | null; role?: string };

export type EmlDataset = {
  campaignId: string;
  campaignName: string;
  siteName: string;
  vessel: string | null;
  vehicle: string | null;
  permitRef: string | null;
  lead: EmlPerson | null;
  people: EmlPerson[];
  /** The day of publication, YYYY-MM-DD. */
  pubDate: string;
  licence: ExportLicence;
  positions: PublicPositionMode;
  occurrences: number;
  dives: number;
  /** Exact extent of the positions; made public here according to `positions`. */
  box: { south: number; north: number; west: number; east: number } | null;
  firstAt: string | null;
  lastAt: string | null;
  minDepth: number | null;
  maxDepth: number | null;
};

/** EML's individualName wants a surname: the last word of a display name. */
function individualName(name: string, pad: string): string {
  const words = name.trim().split(/\s+/);
  const surName = words.pop() ?? name;
  const given = words.join(' ');
  return [
    `${pad}<individualName>`,
    ...(given ? [`${pad}  <givenName>${xmlEscape(given)}</givenName>`] : []),
    `${pad}  <surName>${xmlEscape(surName || name)}</surName>`,
    `${pad}</individualName>`,
  ].join('\n');
}

function party(tag: string, person: EmlPerson, pad: string): string {
  return [
    `${pad}<${tag}>`,
    individualName(person.name, `${pad}  `),
    ...(person.email ? [`${pad}  <electronicMailAddress>${xmlEscape(person.email)}</electronicMailAddress>`] : []),
    ...(person.role ? [`${pad}  <role>${xmlEscape(person.role)}</role>`] : []),
    `${pad}</${tag}>`,
  ].join('\n');
}

const dayOf = (iso: string) => iso.slice(0, 10);
const metres = (v: number) => String(round(v, 1));

/** The words a public file uses for its positions. */
export function positionsSentence(mode: PublicPositionMode): string {
  const statement = positionStatement(mode);
  return statement.dataGeneralizations || statement.informationWithheld || 'Positions are given as recorded (WGS 84).';
}

/** The dataset's metadata in EML 2.2.0, in the element order of its schema. */
export function emlXml(d: EmlDataset): string {
  const licence = licences[d.licence];
  const creator: EmlPerson = d.lead ?? { name: d.campaignName };
  const depthText =
    d.minDepth !== null && d.maxDepth !== null
      ? `between ${metres(d.minDepth)} m and ${metres(d.maxDepth)} m deep`
      : 'at depths not recorded';
  const span = d.firstAt && d.lastAt ? `from ${dayOf(d.firstAt)} to ${dayOf(d.lastAt)}` : '';
  const vehicle = d.vehicle ?? 'a remotely operated vehicle';
  const abstract = `${d.occurrences} occurrences of organisms seen on the video of ${vehicle} during ${d.dives} dives of the campaign ${d.campaignName} at ${d.siteName}, ${depthText}${span ? `, ${span}` : ''}.`;
  const box = d.box ? publicBox(d.box, d.positions) : null;
  const coverage: string[] = [];
  if (box) {
    coverage.push(
      '      <geographicCoverage>',
      `        <geographicDescription>${xmlEscape(`${d.siteName}. ${positionsSentence(d.positions)}`)}</geographicDescription>`,
      '        <boundingCoordinates>',
      `          <westBoundingCoordinate>${box.west}</westBoundingCoordinate>`,
      `          <eastBoundingCoordinate>${box.east}</eastBoundingCoordinate>`,
      `          <northBoundingCoordinate>${box.north}</northBoundingCoordinate>`,
      `          <southBoundingCoordinate>${box.south}</southBoundingCoordinate>`,
      ...(d.minDepth !== null && d.maxDepth !== null
        ? [
            '          <boundingAltitudes>',
            `            <altitudeMinimum>${metres(-d.maxDepth)}</altitudeMinimum>`,
            `            <altitudeMaximum>${metres(-d.minDepth)}</altitudeMaximum>`,
            '            <altitudeUnits>meter</altitudeUnits>',
            '          </boundingAltitudes>',
          ]
        : []),
      '        </boundingCoordinates>',
      '      </geographicCoverage>',
    );
  }
  if (d.firstAt && d.lastAt) {
    coverage.push(
      '      <temporalCoverage>',
      '        <rangeOfDates>',
      `          <beginDate><calendarDate>${dayOf(d.firstAt)}</calendarDate></beginDate>`,
      `          <endDate><calendarDate>${dayOf(d.lastAt)}</calendarDate></endDate>`,
      '        </rangeOfDates>',
      '      </temporalCoverage>',
    );
  }
  const methods = `Entries were logged by the science party while watching the live video of ${vehicle}${
    d.vessel ? `, launched from ${d.vessel}` : ''
  }, each with its UTC time, dive and depth; depth and position come from the vehicle's telemetry log where it covers the entry. Identifications are by the scientist named in identifiedBy and may be verified by another.`;
  return [
    '<?xml version="1.0" encoding="UTF-8"?>',
    `<eml:eml xmlns:eml="https://eml.ecoinformatics.org/eml-2.2.0" xmlns:xsi="http://www.w3.org/2001/XMLSchema-instance" xsi:schemaLocation="https://eml.ecoinformatics.org/eml-2.2.0 https://eml.ecoinformatics.org/eml-2.2.0/eml.xsd" packageId="${xmlEscape(`urn:uuid:${d.campaignId}`)}" system="bathynote" scope="system" xml:lang="en">`,
    '  <dataset>',
    `    <alternateIdentifier>${xmlEscape(`urn:uuid:${d.campaignId}`)}</alternateIdentifier>`,
    `    <title xml:lang="en">${xmlEscape(`Biological observations of ${d.campaignName} at ${d.siteName}`)}</title>`,
    party('creator', creator, '    '),
    ...d.people.map((p) => party('associatedParty', p, '    ')),
    `    <pubDate>${d.pubDate}</pubDate>`,
    '    <language>en</language>',
    '    <abstract>',
    `      <para>${xmlEscape(abstract)}</para>`,
    '    </abstract>',
    '    <additionalInfo>',
    `      <para>${xmlEscape(positionsSentence(d.positions))}</para>`,
    ...(d.permitRef ? [`      <para>${xmlEscape(`Permit: ${d.permitRef}.`)}</para>`] : []),
    '    </additionalInfo>',
    '    <intellectualRights>',
    `      <para>This dataset is published under the <ulink url="${licence.url}"><citetitle>${xmlEscape(licence.title)}</citetitle></ulink>.</para>`,
    '    </intellectualRights>',
    '    <licensed>',
    `      <licenseName>${xmlEscape(licence.title)}</licenseName>`,
    `      <url>${licence.url}</url>`,
    `      <identifier>${d.licence}</identifier>`,
    '    </licensed>',
    ...(coverage.length > 0 ? ['    <coverage>', ...coverage, '    </coverage>'] : []),
    party('contact', creator, '    '),
    '    <methods>',
    '      <methodStep>',
    '        <description>',
    `          <para>${xmlEscape(methods)}</para>`,
    '        </description>',
    '      </methodStep>',
    '      <sampling>',
    '        <studyExtent>',
    '          <description>',
    `            <para>${xmlEscape(`${d.dives} dives at ${d.siteName}, ${depthText}.`)}</para>`,
    '          </description>',
    '        </studyExtent>',
    '        <samplingDescription>',
    `          <para>${xmlEscape(`Visual observation from ${vehicle}; entries tagged as sampled are material samples taken by the vehicle.`)}</para>`,
    '        </samplingDescription>',
    '      </sampling>',
    '    </methods>',
    '  </dataset>',
    '</eml:eml>',
    '',
  ].join('\n');
}
