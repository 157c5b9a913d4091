/**
 * The taxa a dive or a campaign saw: every name identified on its live entries, with how many
 * entries, the total count where entries give one, first and last seen, the depth range, the share
 * verified and a photo. Names are grouped without regard to case; the open-nomenclature qualifier
 * stays with each identification and does not split a taxon.
 */
import { and, eq, inArray } from 'drizzle-orm';

import type { Executor } from '../../db/client';
import { identifications, observations, photos } from '../../db/schema';
import type { TaxonSeen, taxaSorts } from '../../lib/schemas';
import { checklistNames } from './checklist';

type Sort = (typeof taxaSorts)[number];

export function taxaSeen(db: Executor, scope: { campaignId: string; diveId?: string }, sort: Sort = 'name'): TaxonSeen[] {
  const rows = db
    .select({
      id: observations.id,
      title: observations.title,
      observedAt: observations.observedAt,
      depth: observations.depth,
      individualCount: observations.individualCount,
      organismQuantity: observations.organismQuantity,
      organismQuantityType: observations.organismQuantityType,
      name: identifications.scientificName,
      rank: identifications.taxonRank,
      status: identifications.verificationStatus,
    })
    .from(identifications)
    .innerJoin(observations, eq(observations.id, identifications.observationId))
    .where(
      and(
        eq(observations.campaignId, scope.campaignId),
        scope.diveId ? eq(observations.diveId, scope.diveId) : undefined,
        eq(observations.retired, false),
      ),
    )
    .orderBy(observations.observedAt)
    .all();
  const listed = checklistNames(db, scope.campaignId);
  const withPhoto = new Map<string, string>();
  const ids = rows.map((r) => r.id);
  for (let i = 0; i < ids.length; i += 500) {
    for (const p of db
      .select({ observationId: photos.observationId, id: photos.id })
      .from(photos)
      .where(and(inArray(photos.observationId, ids.slice(i, i + 500)), eq(photos.retired, false)))
      .all()) {
      if (p.observationId && !withPhoto.has(p.observationId)) withPhoto.set(p.observationId, p.id);
    }
  }
  const by = new Map<string, TaxonSeen & { verified: number }>();
  for (const r of rows) {
    const key = r.name.toLowerCase();
    let t = by.get(key);
    if (!t) {
      t = {
        scientificName: r.name,
        taxonRank: r.rank,
        onChecklist: listed.size > 0 ? listed.has(key) : null,
        entries: 0,
        totalCount: null,
        firstSeen: r.observedAt.toISOString(),
        lastSeen: r.observedAt.toISOString(),
        depthMin: null,
        depthMax: null,
        verifiedShare: 0,
        photoId: null,
        observationIds: [],
        sightings: [],
        verified: 0,
      };
      by.set(key, t);
    }
    t.entries++;
    t.observationIds.push(r.id);
    t.sightings.push({ id: r.id, title: r.title, observedAt: r.observedAt.toISOString(), depth: r.depth });
    // Rows come in time order: the last one seen is the latest.
    t.lastSeen = r.observedAt.toISOString();
    const n = r.individualCount ?? (r.organismQuantityType === 'individuals' ? r.organismQuantity : null);
    if (n != null) t.totalCount = (t.totalCount ?? 0) + n;
    if (r.depth != null) {
      t.depthMin = t.depthMin === null ? r.depth : Math.min(t.depthMin, r.depth);
      t.depthMax = t.depthMax === null ? r.depth : Math.max(t.depthMax, r.depth);
    }
    if (r.status === 'verified') t.verified++;
    if (!t.photoId) t.photoId = withPhoto.get(r.id) ?? null;
  }
  const list = [...by.values()].map(({ verified, ...t }) => ({ ...t, verifiedShare: t.entries ? verified / t.entries : 0 }));
  const byName = (a: TaxonSeen, b: TaxonSeen) => a.scientificName.localeCompare(b.scientificName);
  const orders: Record<Sort, (a: TaxonSeen, b: TaxonSeen) => number> = {
    name: byName,
    entries: (a, b) => b.entries - a.entries || byName(a, b),
    count: (a, b) => (b.totalCount ?? -1) - (a.totalCount ?? -1) || byName(a, b),
    first: (a, b) => a.firstSeen.localeCompare(b.firstSeen) || byName(a, b),
    last: (a, b) => b.lastSeen.localeCompare(a.lastSeen) || byName(a, b),
    depth: (a, b) => (b.depthMax ?? -Infinity) - (a.depthMax ?? -Infinity) || byName(a, b),
  };
  return list.sort(orders[sort]);
}
