/**
 * What each export holds before it is downloaded: rows, dives, time span, and a size estimated
 * by writing the first rows for real and scaling up (compressed, for the archive).
 */
import { sql, type SQL } from 'drizzle-orm';
import { deflateSync, strToU8 } from 'fflate';

import type { Db } from '../../../db/client';
import { finds, observations } from '../../../db/schema';
import { CSV_BOM } from '../../../lib/csv';
import { emlXml, metaXml, occurrenceHeader } from '../../../lib/darwin-core';
import { collectionHead, collectionTail } from '../../../lib/geojson';
import type { ExportCard, ExportSummary } from '../../../lib/schemas';
import { exportCampaign, extentOf, type Extent } from './campaign';
import { campaignConditions, entryIds, EntryReader, type ExportEntry } from './entries';
import { dwcDataset, entryCsvHeader, entryCsvText, featureText, findHeader, findText, occurrenceText } from './formats';

const SAMPLE = 200;
const utf8Bytes = (text: string) => Buffer.byteLength(text, 'utf8');

/** Fixed part plus the sample's bytes per row times the rows. */
function scale(fixed: number, sampleBytes: number, sampleRows: number, rows: number): number {
  return Math.round(fixed + (sampleRows > 0 ? (sampleBytes / sampleRows) * rows : 0));
}

function card(
  kind: ExportCard['kind'],
  extent: Extent,
  rows: number,
  estimatedBytes: number,
  withoutPosition: number,
  isPublic: boolean,
): ExportCard {
  return {
    kind,
    rows,
    dives: extent.dives,
    firstAt: extent.firstAt?.toISOString() ?? null,
    lastAt: extent.lastAt?.toISOString() ?? null,
    estimatedBytes,
    withoutPosition,
    public: isPublic,
  };
}

export function exportSummary(db: Db, campaignId: string, publicUrl: string): ExportSummary {
  const campaign = exportCampaign(db, campaignId);
  const reader = new EntryReader(db);
  const head = (conditions: SQL[]): ExportEntry[] => reader.read(entryIds(db, conditions, undefined, SAMPLE), { custody: true });
  const mode = campaign.publicPositions;

  // Darwin Core: the occurrence rows compressed as the archive compresses them.
  const biology = campaignConditions(campaignId, 'biology');
  const bioExtent = extentOf(db, biology);
  const dataset = dwcDataset(campaign);
  const bioSample = head(biology);
  const occurrenceSample = bioSample.map((e) => occurrenceText(e, dataset, publicUrl)).join('');
  const zipFixed =
    deflateSync(strToU8(metaXml())).length +
    deflateSync(
      strToU8(
        emlXml({
          campaignId,
          campaignName: campaign.name,
          siteName: campaign.siteName,
          vessel: campaign.vessel,
          vehicle: campaign.vehicle,
          permitRef: campaign.permitRef,
          lead: campaign.lead,
          people: campaign.people,
          pubDate: '2000-01-01',
          licence: campaign.exportLicence,
          positions: mode,
          occurrences: bioExtent.rows,
          dives: bioExtent.dives,
          box: bioExtent.box,
          firstAt: null,
          lastAt: null,
          minDepth: bioExtent.minDepth,
          maxDepth: bioExtent.maxDepth,
        }),
      ),
    ).length +
    // Zip headers and the central directory: about 100 bytes per file plus its name twice.
    3 * 130;
  const dwcBytes = scale(
    zipFixed + deflateSync(strToU8(occurrenceHeader())).length,
    deflateSync(strToU8(occurrenceSample)).length,
    bioSample.length,
    bioExtent.rows,
  );
  const bioPlaced = mode === 'withheld' ? 0 : bioExtent.withPosition;

  // Find register: entries carrying a find.
  const findConditions = [
    ...campaignConditions(campaignId),
    sql`exists (select 1 from ${finds} f where f.observation_id = ${observations.id})`,
  ];
  const findExtent = extentOf(db, findConditions);
  const findSample = head(findConditions);
  const findBytes = scale(
    utf8Bytes(CSV_BOM + findHeader()),
    utf8Bytes(findSample.map((e) => findText(e, campaign)).join('')),
    findSample.length,
    findExtent.rows,
  );

  // GeoJSON and CSV: every live entry.
  const all = campaignConditions(campaignId);
  const allExtent = extentOf(db, all);
  const allSample = head(all);
  const features = allSample.map((e) => featureText(e, mode)).filter((t): t is string => t !== null);
  const placed = mode === 'withheld' ? 0 : allExtent.withPosition;
  const geoFixed = utf8Bytes(collectionHead(campaign.name) + collectionTail({ withoutPosition: 0, withheld: 0 }, mode, ''));
  const geoBytes = scale(geoFixed, utf8Bytes(features.join(',')), features.length, placed);
  const csvBytes = scale(
    utf8Bytes(CSV_BOM + entryCsvHeader()),
    utf8Bytes(allSample.map(entryCsvText).join('')),
    allSample.length,
    allExtent.rows,
  );

  return {
    licence: campaign.exportLicence,
    publicPositions: mode,
    cards: [
      card('darwin-core', bioExtent, bioExtent.rows, dwcBytes, bioExtent.rows - bioPlaced, true),
      card('finds', findExtent, findExtent.rows, findBytes, findExtent.rows - findExtent.withPosition, false),
      card('geojson', allExtent, placed, geoBytes, allExtent.rows - placed, true),
      card('csv', allExtent, allExtent.rows, csvBytes, allExtent.rows - allExtent.withPosition, false),
    ],
  };
}
