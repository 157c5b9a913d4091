/**
 * The sample register: the sample a biology or environment entry carries, numbered uniquely in
 * its campaign, with subsamples naming their parent's number.
 */
import { and, asc, eq, inArray, sql } from 'drizzle-orm';
import type { z } from 'zod';

import type { Db, Executor } from '../../db/client';
import { custodyEvents, dives, observations, samples } from '../../db/schema';
import { compareSampleNumbers } from '../../lib/sample-numbers';
import type { ObservationDetail, SampleRow, sampleInputSchema } from '../../lib/schemas';
import { conflict, fieldError, notFound } from '../errors';
import type { LiveHub } from './live';
import { assertCurrent, getObservationDetail, getObservationRow, recordChange, type Actor } from './observations';

export type SampleInput = z.output<typeof sampleInputSchema>;

/**
 * The next free sample number: one more than the last whole sample's number (subsamples are
 * numbered under their parent), keeping its prefix and width ("S-009" → "S-010"); "S-001" for an
 * empty register.
 */
export function nextSampleNumber(db: Executor, campaignId: string): string {
  const rows = db
    .select({ n: samples.sampleNumber, parent: samples.parentSampleNumber })
    .from(samples)
    .where(eq(samples.campaignId, campaignId))
    .all();
  const taken = new Set(rows.map(({ n }) => n.toLowerCase()));
  const last = rows
    .filter((r) => r.parent === null)
    .map((r) => r.n)
    .sort(compareSampleNumbers)
    .map((n) => /^(.*?)(\d+)$/.exec(n))
    .findLast((m): m is RegExpExecArray => !!m);
  const prefix = last ? last[1]! : 'S-';
  const width = last ? last[2]!.length : 3;
  let next = last ? Number(last[2]) + 1 : 1;
  while (taken.has(`${prefix}${String(next).padStart(width, '0')}`.toLowerCase())) next++;
  return `${prefix}${String(next).padStart(width, '0')}`;
}

const sameNumber = (campaignId: string, n: string) =>
  and(eq(samples.campaignId, campaignId), sql`lower(${samples.sampleNumber}) = lower(${n})`);

/**
 * Records or corrects an entry's sample. A number already used in the campaign is a 409 naming the
 * next free one; a subsample's parent must be a sample of the same campaign, and not itself.
 */
export function setSample(db: Db, live: LiveHub, id: string, actor: Actor, input: SampleInput): ObservationDetail {
  return live.withEvents((tx, stage) => {
    const row = getObservationRow(tx, id);
    if (!row) throw notFound();
    assertCurrent(row, input.version ?? row.version);
    if (row.kind !== 'biology' && row.kind !== 'environment') {
      throw fieldError('kind', 'Change the entry to biology or environment first', 'Only biology and environment entries carry a sample.');
    }
    const clash = tx.select({ id: samples.observationId }).from(samples).where(sameNumber(row.campaignId, input.sampleNumber)).get();
    if (clash && clash.id !== id) {
      throw conflict(
        'duplicate_sample_number',
        `Sample number ${input.sampleNumber} is already used in this campaign; the next free one is ${nextSampleNumber(tx, row.campaignId)}.`,
      );
    }
    const parent = input.parentSampleNumber ?? null;
    if (parent !== null) {
      if (parent.toLowerCase() === input.sampleNumber.toLowerCase()) {
        throw fieldError('parentSampleNumber', 'A sample cannot be its own parent', 'A sample cannot be its own parent.');
      }
      const found = tx.select({ n: samples.sampleNumber }).from(samples).where(sameNumber(row.campaignId, parent)).get();
      if (!found) {
        throw fieldError('parentSampleNumber', `No sample ${parent} in this campaign`, `No sample ${parent} in this campaign.`);
      }
    }
    const values = {
      campaignId: row.campaignId,
      sampleNumber: input.sampleNumber,
      sampleType: input.sampleType,
      gear: input.gear ?? null,
      container: input.container ?? null,
      preservation: input.preservation ?? null,
      parentSampleNumber: parent,
      lab: input.lab ?? null,
      updatedAt: new Date(),
    };
    tx.insert(samples)
      .values({ observationId: id, ...values })
      .onConflictDoUpdate({ target: samples.observationId, set: values })
      .run();
    recordChange(tx, id, actor.userId, 'updated');
    const detail = getObservationDetail(tx, id)!;
    const { photos: _photos, identificationDetail: _identification, find: _find, custody: _custody, ...observation } = detail;
    stage(observation.campaignId, observation.diveId, 'observation.updated', observation);
    return detail;
  });
}

/**
 * The register of a campaign or a dive, in natural order of sample number, with each sample's
 * custody: a sample whose dive is on deck with no custody step since is flagged, since it has come
 * up with the vehicle and nobody has said who took it.
 */
export function listSamples(db: Executor, scope: { campaignId: string; diveId?: string }): SampleRow[] {
  const rows = db
    .select({
      sample: samples,
      title: observations.title,
      kind: observations.kind,
      diveId: observations.diveId,
      observedAt: observations.observedAt,
      diveNumber: dives.number,
      onDeck: dives.onDeckAt,
    })
    .from(samples)
    .innerJoin(observations, eq(observations.id, samples.observationId))
    .innerJoin(dives, eq(dives.id, observations.diveId))
    .where(
      and(
        eq(samples.campaignId, scope.campaignId),
        scope.diveId ? eq(observations.diveId, scope.diveId) : undefined,
        eq(observations.retired, false),
      ),
    )
    .all();
  const ids = rows.map((r) => r.sample.observationId);
  const steps = new Map<string, { since: Date; holder: string }[]>();
  for (let i = 0; i < ids.length; i += 500) {
    for (const c of db
      .select({ id: custodyEvents.observationId, since: custodyEvents.since, holder: custodyEvents.holder })
      .from(custodyEvents)
      .where(inArray(custodyEvents.observationId, ids.slice(i, i + 500)))
      .orderBy(asc(custodyEvents.since), asc(custodyEvents.createdAt))
      .all()) {
      const list = steps.get(c.id) ?? [];
      list.push({ since: c.since, holder: c.holder });
      steps.set(c.id, list);
    }
  }
  return rows
    .map(({ sample: s, onDeck, ...r }): SampleRow => {
      const trail = steps.get(s.observationId) ?? [];
      return {
        observationId: s.observationId,
        sampleNumber: s.sampleNumber,
        sampleType: s.sampleType,
        gear: s.gear,
        container: s.container,
        preservation: s.preservation,
        parentSampleNumber: s.parentSampleNumber,
        lab: s.lab,
        title: r.title,
        kind: r.kind,
        diveId: r.diveId,
        diveNumber: r.diveNumber,
        observedAt: r.observedAt.toISOString(),
        custodySteps: trail.length,
        heldBy: trail.at(-1)?.holder ?? null,
        noCustodySinceRecovery: onDeck !== null && !trail.some((t) => t.since.getTime() >= onDeck.getTime()),
      };
    })
    .sort((a, b) => compareSampleNumbers(a.sampleNumber, b.sampleNumber));
}
