/**
 * GeoJSON of a campaign's entries for a GIS, per RFC 7946 "The GeoJSON Format" (Butler et al.,
 * IETF, 2016): a FeatureCollection of Points in WGS 84 with [longitude, latitude] (§3.1.1) and
 * no third coordinate: depth is a property, since a position's third value would be a height
 * above the ellipsoid.
 */
import { publicPosition } from './position-protection';
import type { PublicPositionMode } from './schemas/exports';

export type GeoEntry = {
  id: string;
  diveId: string;
  diveNumber: string;
  observedAt: string;
  kind: string;
  title: string;
  lat: number | null;
  lon: number | null;
  depth: number | null;
  depthSource: string | null;
  temperature: number | null;
  tags: string[];
  scientificName: string | null;
  findNumber: string | null;
  authorName: string;
};

export type GeoFeature = {
  type: 'Feature';
  id: string;
  geometry: { type: 'Point'; coordinates: [number, number] };
  properties: Record<string, string | number | string[] | null>;
};

/** The feature of an entry, or null when it has no position to show (none, or withheld). */
export function toFeature(entry: GeoEntry, mode: PublicPositionMode): GeoFeature | null {
  if (entry.lat === null || entry.lon === null) return null;
  const position = publicPosition({ lat: entry.lat, lon: entry.lon }, mode);
  if (!position) return null;
  return {
    type: 'Feature',
    id: entry.id,
    geometry: { type: 'Point', coordinates: [position.lon, position.lat] },
    properties: {
      dive: entry.diveNumber,
      diveId: entry.diveId,
      observedAt: entry.observedAt,
      kind: entry.kind,
      title: entry.title,
      depthM: entry.depth,
      depthSource: entry.depthSource,
      temperatureC: entry.temperature,
      tags: entry.tags,
      scientificName: entry.scientificName,
      findNumber: entry.findNumber,
      recordedBy: entry.authorName,
      positionUncertaintyM: position.uncertaintyM,
    },
  };
}

/** The members written after the features: how many entries were left out and why, and how positions were treated. */
export function collectionTail(counts: { withoutPosition: number; withheld: number }, mode: PublicPositionMode, statement: string): string {
  return `],"positions":${JSON.stringify(mode)},"positionNote":${JSON.stringify(statement)},"omitted":${JSON.stringify({
    withoutPosition: counts.withoutPosition,
    positionWithheld: counts.withheld,
  })}}\n`;
}

/** The opening of the collection; the features follow, comma-separated, then {@link collectionTail}. */
export function collectionHead(name: string): string {
  return `{"type":"FeatureCollection","name":${JSON.stringify(name)},"features":[`;
}
