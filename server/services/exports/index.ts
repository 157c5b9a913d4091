/**
 * The campaign's exports: Darwin Core Archive of the biology entries, the find register, GeoJSON
 * of every placed entry, and CSV of any filtered list. Each is written to the response as it is
 * read, a batch of entries at a time.
 */
import type { SQL } from 'drizzle-orm';
import type { Response } from 'express';
import { strToU8, Zip, ZipDeflate } from 'fflate';

import type { Db } from '../../../db/client';
import { CSV_BOM } from '../../../lib/csv';
import { emlXml, MEASUREMENT_FILE, measurementHeader, metaXml, occurrenceHeader, positionsSentence } from '../../../lib/darwin-core';
import { collectionHead, collectionTail } from '../../../lib/geojson';
import { naturalCompare } from '../../../lib/natural-sort';
import { exportCampaign, extentOf, type ExportCampaign } from './campaign';
import { BATCH, campaignConditions, entryIds, EntryReader, findIds, type EntryOrder, type ExportEntry } from './entries';
import { dwcDataset, entryCsvHeader, entryCsvText, featureText, findHeader, findText, measurementText, occurrenceText } from './formats';
import { drained, startDownload, streamExport, TextSink } from './sink';

export { exportSummary } from './summary';

export const slug = (name: string) =>
  name
    .toLowerCase()
    .normalize('NFKD')
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-|-$/g, '') || 'campaign';

const today = () => new Date().toISOString().slice(0, 10);

/** Reads `ids` a batch at a time, yielding to the event loop between batches so other requests are served. */
export async function* inBatches(reader: EntryReader, ids: string[], parts: { custody?: boolean } = {}): AsyncGenerator<ExportEntry[]> {
  for (let i = 0; i < ids.length; i += BATCH) {
    yield reader.read(ids.slice(i, i + BATCH), parts);
    await new Promise<void>((resolve) => setImmediate(resolve));
  }
}

/* ---- Darwin Core Archive ---- */

export function emlOf(db: Db, campaign: ExportCampaign): string {
  const extent = extentOf(db, campaignConditions(campaign.id, 'biology'));
  return emlXml({
    campaignId: campaign.id,
    campaignName: campaign.name,
    siteName: campaign.siteName,
    vessel: campaign.vessel,
    vehicle: campaign.vehicle,
    permitRef: campaign.permitRef,
    lead: campaign.lead ? { ...campaign.lead, role: 'lead' } : null,
    people: campaign.people,
    pubDate: today(),
    licence: campaign.exportLicence,
    positions: campaign.publicPositions,
    occurrences: extent.rows,
    dives: extent.dives,
    box: extent.box,
    firstAt: extent.firstAt?.toISOString() ?? null,
    lastAt: extent.lastAt?.toISOString() ?? null,
    minDepth: extent.minDepth,
    maxDepth: extent.maxDepth,
  });
}

export async function writeDarwinCore(db: Db, res: Response, campaignId: string, publicUrl: string): Promise<void> {
  const campaign = exportCampaign(db, campaignId);
  const ids = entryIds(db, campaignConditions(campaignId, 'biology'));
  const dataset = dwcDataset(campaign);
  const eml = emlOf(db, campaign);
  startDownload(res, 'application/zip', `${slug(campaign.name)}-darwin-core.zip`);

  await streamExport(res, async () => {
    let failure: Error | null = null;
    const zip = new Zip((err, chunk, final) => {
      if (err) {
        failure = err;
        return;
      }
      if (!res.destroyed) res.write(chunk);
      if (final) res.end();
    });
    const whole = (name: string, text: string) => {
      const file = new ZipDeflate(name, { level: 6 });
      zip.add(file);
      file.push(strToU8(text), true);
    };
    whole('meta.xml', metaXml());
    whole('eml.xml', eml);
    const occurrences = new ZipDeflate('occurrence.txt', { level: 6 });
    zip.add(occurrences);
    occurrences.push(strToU8(occurrenceHeader()));
    // Sizes are few beside the occurrences: kept until the occurrence file is done, then written whole.
    const measurements: string[] = [measurementHeader()];
    for await (const batch of inBatches(new EntryReader(db), ids)) {
      if (failure) throw failure as Error;
      occurrences.push(strToU8(batch.map((e) => occurrenceText(e, dataset, publicUrl)).join('')));
      for (const e of batch) if (e.sizes.length > 0) measurements.push(measurementText(e));
      await drained(res);
    }
    occurrences.push(new Uint8Array(0), true);
    whole(MEASUREMENT_FILE, measurements.join(''));
    zip.end();
    if (failure) throw failure as Error;
  });
}

/* ---- find register ---- */

/** The campaign's live finds in find-number order (natural: VS26-2 before VS26-10). */
export function orderedFindIds(db: Db, campaignId: string): string[] {
  return findIds(db, campaignId)
    .sort((a, b) => naturalCompare(a.findNumber, b.findNumber))
    .map((f) => f.id);
}

export async function writeFindRegister(db: Db, res: Response, campaignId: string): Promise<void> {
  const campaign = exportCampaign(db, campaignId);
  const ids = orderedFindIds(db, campaignId);
  startDownload(res, 'text/csv; charset=utf-8', `${slug(campaign.name)}-find-register.csv`);
  await streamExport(res, async () => {
    const sink = new TextSink(res);
    await sink.push(CSV_BOM + findHeader());
    for await (const batch of inBatches(new EntryReader(db), ids, { custody: true })) {
      for (const entry of batch) await sink.push(findText(entry, campaign));
    }
    await sink.end();
  });
}

/* ---- GeoJSON ---- */

export async function writeGeoJson(db: Db, res: Response, campaignId: string): Promise<void> {
  const campaign = exportCampaign(db, campaignId);
  const ids = entryIds(db, campaignConditions(campaignId));
  const mode = campaign.publicPositions;
  startDownload(res, 'application/geo+json', `${slug(campaign.name)}-observations.geojson`);
  await streamExport(res, async () => {
    const sink = new TextSink(res);
    await sink.push(collectionHead(`${campaign.name}, ${campaign.siteName}`));
    let first = true;
    const omitted = { withoutPosition: 0, withheld: 0 };
    for await (const batch of inBatches(new EntryReader(db), ids)) {
      for (const entry of batch) {
        const text = featureText(entry, mode);
        if (text === null) {
          if (entry.lat === null || entry.lon === null) omitted.withoutPosition++;
          else omitted.withheld++;
          continue;
        }
        await sink.push(first ? text : `,${text}`);
        first = false;
      }
    }
    await sink.push(collectionTail(omitted, mode, positionsSentence(mode)));
    await sink.end();
  });
}

/* ---- CSV of a list ---- */

export async function writeEntryCsv(
  db: Db,
  res: Response,
  campaignId: string,
  conditions: SQL[],
  order: EntryOrder,
  fileName: string,
): Promise<void> {
  const ids = entryIds(db, conditions, order);
  startDownload(res, 'text/csv; charset=utf-8', fileName);
  await streamExport(res, async () => {
    const sink = new TextSink(res);
    // The byte order mark tells spreadsheet programs the file is UTF-8.
    await sink.push(CSV_BOM + entryCsvHeader());
    for await (const batch of inBatches(new EntryReader(db), ids)) {
      for (const entry of batch) {
        if (entry.campaignId === campaignId) await sink.push(entryCsvText(entry));
      }
    }
    await sink.end();
  });
}
