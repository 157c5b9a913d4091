/**
 * The rows of the two CSV exports: the find register (for the heritage authority, with exact
 * positions) and a list of entries (for the team's spreadsheets).
 */
import type { CsvColumn } from './csv';
import { toLocalEN } from './geodesy';

export type FindRegisterEntry = {
  findNumber: string;
  objectType: string | null;
  material: string | null;
  condition: string | null;
  state: 'in-situ' | 'recovered';
  diveNumber: string;
  observedAt: string;
  depth: number | null;
  lat: number | null;
  lon: number | null;
  title: string;
  entryId: string;
  /** The custody trail, oldest first. */
  custody: { holder: string; location: string; container: string | null }[];
};

export const findRegisterColumns: CsvColumn[] = [
  { key: 'findNumber', header: 'Find number' },
  { key: 'objectType', header: 'Object type' },
  { key: 'material', header: 'Material' },
  { key: 'condition', header: 'Condition' },
  { key: 'state', header: 'In situ or recovered' },
  { key: 'dive', header: 'Dive' },
  { key: 'observedAt', header: 'Time (UTC)' },
  { key: 'depth', header: 'Depth (m)' },
  { key: 'lat', header: 'Latitude (exact, WGS 84)' },
  { key: 'lon', header: 'Longitude (exact, WGS 84)' },
  { key: 'east', header: 'East of site datum (m)' },
  { key: 'north', header: 'North of site datum (m)' },
  { key: 'holder', header: 'Current holder' },
  { key: 'place', header: 'Kept at' },
  { key: 'container', header: 'Container' },
  { key: 'handOvers', header: 'Hand-overs' },
  { key: 'permitRef', header: 'Permit reference' },
  { key: 'title', header: 'Entry title' },
  { key: 'entryId', header: 'Entry id' },
];

const round = (value: number | null, digits: number) => (value === null ? null : Number(value.toFixed(digits)));

/** One row of the find register; east and north are metres on the site plan of the campaign's datum. */
export function toFindRow(
  find: FindRegisterEntry,
  campaign: { datumLat: number; datumLon: number; permitRef: string | null },
): Record<string, unknown> {
  const plan =
    find.lat !== null && find.lon !== null
      ? toLocalEN({ lat: campaign.datumLat, lon: campaign.datumLon }, { lat: find.lat, lon: find.lon })
      : null;
  const current = find.custody[find.custody.length - 1];
  return {
    findNumber: find.findNumber,
    objectType: find.objectType,
    material: find.material,
    condition: find.condition,
    state: find.state === 'in-situ' ? 'in situ' : 'recovered',
    dive: find.diveNumber,
    observedAt: find.observedAt,
    depth: round(find.depth, 2),
    lat: find.lat,
    lon: find.lon,
    east: plan ? round(plan.eastM, 2) : null,
    north: plan ? round(plan.northM, 2) : null,
    holder: current?.holder ?? null,
    place: current?.location ?? null,
    container: current?.container ?? null,
    // The first record is the taking into custody; each later one is a hand-over.
    handOvers: Math.max(0, find.custody.length - 1),
    permitRef: campaign.permitRef,
    title: find.title,
    entryId: find.entryId,
  };
}

export type EntryCsvEntry = {
  id: string;
  diveNumber: string;
  observedAt: string;
  kind: string;
  title: string;
  note: string;
  depth: number | null;
  depthSource: string | null;
  lat: number | null;
  lon: number | null;
  positionSource: string | null;
  temperature: number | null;
  tags: string[];
  scientificName: string | null;
  qualifier: string | null;
  verificationStatus: string | null;
  findNumber: string | null;
  authorName: string;
  photoCount: number;
  createdAt: string;
  updatedAt: string;
  version: number;
};

export const entryCsvColumns: CsvColumn[] = [
  { key: 'id', header: 'id' },
  { key: 'dive', header: 'dive' },
  { key: 'observedAt', header: 'observedAt' },
  { key: 'kind', header: 'kind' },
  { key: 'title', header: 'title' },
  { key: 'note', header: 'note' },
  { key: 'depth', header: 'depth' },
  { key: 'depthSource', header: 'depthSource' },
  { key: 'lat', header: 'lat' },
  { key: 'lon', header: 'lon' },
  { key: 'positionSource', header: 'positionSource' },
  { key: 'temperature', header: 'temperature' },
  { key: 'tags', header: 'tags' },
  { key: 'scientificName', header: 'scientificName' },
  { key: 'qualifier', header: 'qualifier' },
  { key: 'verificationStatus', header: 'verificationStatus' },
  { key: 'findNumber', header: 'findNumber' },
  { key: 'author', header: 'author' },
  { key: 'photoCount', header: 'photoCount' },
  { key: 'createdAt', header: 'createdAt' },
  { key: 'updatedAt', header: 'updatedAt' },
  { key: 'version', header: 'version' },
];

export function toEntryCsvRow(e: EntryCsvEntry): Record<string, unknown> {
  return {
    id: e.id,
    dive: e.diveNumber,
    observedAt: e.observedAt,
    kind: e.kind,
    title: e.title,
    note: e.note,
    depth: e.depth,
    depthSource: e.depthSource,
    lat: e.lat,
    lon: e.lon,
    positionSource: e.positionSource,
    temperature: e.temperature,
    tags: e.tags.join('; '),
    scientificName: e.scientificName,
    qualifier: e.qualifier,
    verificationStatus: e.verificationStatus,
    findNumber: e.findNumber,
    author: e.authorName,
    photoCount: e.photoCount,
    createdAt: e.createdAt,
    updatedAt: e.updatedAt,
    version: e.version,
  };
}
