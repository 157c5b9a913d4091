/**
 * Each export's rows as text, from entries read by `EntryReader`; shared by the downloads and by
 * the export screen's size estimate.
 */
import { csvRecord, CSV_LINE_END } from '../../../lib/csv';
import { measurementLines, occurrenceLine, type DwcDataset, type DwcEntry } from '../../../lib/darwin-core';
import { entryCsvColumns, findRegisterColumns, toEntryCsvRow, toFindRow } from '../../../lib/export-rows';
import { toFeature } from '../../../lib/geojson';
import type { PublicPositionMode } from '../../../lib/schemas';
import type { ExportCampaign } from './campaign';
import { isSampled, type ExportEntry } from './entries';

export const photoUrl = (publicUrl: string, photoId: string) => `${publicUrl}/api/photos/${photoId}`;

export function dwcDataset(campaign: ExportCampaign): DwcDataset {
  return {
    licence: campaign.exportLicence,
    rightsHolder: campaign.lead?.name ?? campaign.name,
    positions: campaign.publicPositions,
    vehicle: campaign.vehicle,
  };
}

function dwcEntry(entry: ExportEntry, publicUrl: string): DwcEntry {
  return {
    id: entry.id,
    diveId: entry.diveId,
    diveNumber: entry.diveNumber,
    campaignId: entry.campaignId,
    observedAt: entry.observedAt.toISOString(),
    updatedAt: entry.updatedAt.toISOString(),
    title: entry.title,
    lat: entry.lat,
    lon: entry.lon,
    depth: entry.depth,
    authorName: entry.authorName,
    sampled: isSampled(entry),
    identification: entry.identification,
    photoUrls: entry.photoIds.map((id) => photoUrl(publicUrl, id)),
    individualCount: entry.individualCount,
    organismQuantity: entry.organismQuantity,
    organismQuantityType: entry.organismQuantityType,
    substrate: entry.substrate,
    sample: entry.sample,
    sizes: entry.sizes,
  };
}

export function occurrenceText(entry: ExportEntry, dataset: DwcDataset, publicUrl: string): string {
  return occurrenceLine(dwcEntry(entry, publicUrl), dataset);
}

/** The entry's sizes as lines of the measurement-or-fact extension. */
export function measurementText(entry: ExportEntry): string {
  return measurementLines({ id: entry.id, sizes: entry.sizes });
}

/** A feature's JSON, or null when the entry has no position to show. */
export function featureText(entry: ExportEntry, mode: PublicPositionMode): string | null {
  const feature = toFeature(
    {
      id: entry.id,
      diveId: entry.diveId,
      diveNumber: entry.diveNumber,
      observedAt: entry.observedAt.toISOString(),
      kind: entry.kind,
      title: entry.title,
      lat: entry.lat,
      lon: entry.lon,
      depth: entry.depth,
      depthSource: entry.depthSource,
      temperature: entry.temperature,
      tags: entry.tags,
      scientificName: entry.identification?.scientificName ?? null,
      findNumber: entry.find?.findNumber ?? null,
      authorName: entry.authorName,
    },
    mode,
  );
  return feature ? JSON.stringify(feature) : null;
}

export const findHeader = () => csvRecord(findRegisterColumns.map((c) => c.header)) + CSV_LINE_END;

export function findText(entry: ExportEntry, campaign: ExportCampaign): string {
  if (!entry.find) return '';
  const row = toFindRow(
    {
      ...entry.find,
      diveNumber: entry.diveNumber,
      observedAt: entry.observedAt.toISOString(),
      depth: entry.depth,
      lat: entry.lat,
      lon: entry.lon,
      title: entry.title,
      entryId: entry.id,
      custody: entry.custody,
    },
    campaign,
  );
  return csvRecord(findRegisterColumns.map((c) => row[c.key])) + CSV_LINE_END;
}

export const entryCsvHeader = () => csvRecord(entryCsvColumns.map((c) => c.header)) + CSV_LINE_END;

export function entryCsvText(entry: ExportEntry): string {
  const row = toEntryCsvRow({
    id: entry.id,
    diveNumber: entry.diveNumber,
    observedAt: entry.observedAt.toISOString(),
    kind: entry.kind,
    title: entry.title,
    note: entry.note,
    depth: entry.depth,
    depthSource: entry.depthSource,
    lat: entry.lat,
    lon: entry.lon,
    positionSource: entry.positionSource,
    temperature: entry.temperature,
    tags: entry.tags,
    scientificName: entry.identification?.scientificName ?? null,
    qualifier: entry.identification?.qualifier ?? null,
    verificationStatus: entry.identification?.verificationStatus ?? null,
    findNumber: entry.find?.findNumber ?? null,
    authorName: entry.authorName,
    photoCount: entry.photoIds.length,
    createdAt: entry.createdAt.toISOString(),
    updatedAt: entry.updatedAt.toISOString(),
    version: entry.version,
  });
  return csvRecord(entryCsvColumns.map((c) => row[c.key])) + CSV_LINE_END;
}
