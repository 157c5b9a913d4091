import { and, eq, sql } from 'drizzle-orm';

import type { Db, Executor } from '../../db/client';
import { campaigns, custodyEvents, finds, identifications, observationTags, samples, tags } from '../../db/schema';
import type { z } from 'zod';

import {
  SAMPLE_TAG,
  type custodyInputSchema,
  type findInputSchema,
  type identificationInputSchema,
  type ObservationDetail,
  type verificationInputSchema,
} from '../../lib/schemas';
import { conflict, fieldError, notFound } from '../errors';
import type { LiveHub, StageEvent } from './live';
import { assertCurrent, getObservationDetail, getObservationRow, recordChange, type Actor } from './observations';

export type IdentificationInput = z.output<typeof identificationInputSchema>;
export type VerificationInput = z.output<typeof verificationInputSchema>;
export type FindInput = z.output<typeof findInputSchema>;
export type CustodyInput = z.output<typeof custodyInputSchema>;

function loadLive(db: Executor, id: string) {
  const row = getObservationRow(db, id);
  if (!row) throw notFound();
  if (row.retired) throw conflict('retired', 'This entry has been retired. A lead can restore it.');
  return row;
}

/**
 * Runs a change to what hangs off an entry (identification, find, custody) with its
 * `observation.updated` event in one transaction, and answers the entry's detail as it now stands.
 * Who may do it is settled before (the routes check the permission table).
 */
function changeEntry(db: Db, live: LiveHub, id: string, work: (tx: Executor) => void): ObservationDetail {
  return live.withEvents((tx, stage: StageEvent) => {
    work(tx);
    const detail = getObservationDetail(tx, id)!;
    const { photos: _photos, identificationDetail: _identification, find: _find, custody: _custody, ...observation } = detail;
    stage(observation.campaignId, observation.diveId, 'observation.updated', observation);
    return detail;
  });
}

/**
 * Proposes (or replaces) a biology entry's identification. Scientists and leads may propose one
 * on any entry, others on their own; a new name starts unverified again. The body carries the
 * entry's version, so two people naming the same entry at once cannot overwrite each other.
 */
export function setIdentification(db: Db, live: LiveHub, id: string, actor: Actor, input: IdentificationInput): ObservationDetail {
  return changeEntry(db, live, id, (tx) => {
    const row = loadLive(tx, id);
    assertCurrent(row, input.version);
    if (row.kind !== 'biology')
      throw fieldError('kind', 'Change the entry to biology first', 'Only biology entries carry an identification.');
    const previous = tx.select().from(identifications).where(eq(identifications.observationId, id)).get();
    const sameName = previous?.scientificName === input.scientificName && previous.qualifier === (input.qualifier ?? null);
    const values = {
      scientificName: input.scientificName,
      taxonRank: input.taxonRank ?? null,
      qualifier: input.qualifier ?? null,
      confidence: input.confidence ?? null,
      taxonId: input.taxonId ?? null,
      identifiedBy: sameName && previous ? previous.identifiedBy : actor.userId,
      ...(sameName && previous
        ? {}
        : { verificationStatus: 'unverified' as const, verifiedBy: null, verifiedAt: null, verificationNote: null }),
      updatedAt: new Date(),
    };
    tx.insert(identifications)
      .values({ observationId: id, ...values })
      .onConflictDoUpdate({ target: identifications.observationId, set: values })
      .run();
    recordChange(tx, id, actor.userId, 'updated');
  });
}

/**
 * Verifies or disputes an identification: a lead or a scientist, and never the person who
 * proposed the name or wrote the entry, whatever their role (PRODUCT.md: scientists verify
 * "others'" identifications; the issue: "a lead or a scientist other than the author"). The body
 * carries the entry's version, so a name changed since the verifier looked is not verified.
 */
export function verifyIdentification(db: Db, live: LiveHub, id: string, actor: Actor, input: VerificationInput): ObservationDetail {
  return changeEntry(db, live, id, (tx) => {
    const row = loadLive(tx, id);
    const ident = tx.select().from(identifications).where(eq(identifications.observationId, id)).get();
    assertCurrent(row, input.version);
    if (!ident) throw conflict('no_identification', 'There is no identification to verify yet.');
    tx.update(identifications)
      .set({ verificationStatus: input.status, verifiedBy: actor.userId, verifiedAt: new Date(), verificationNote: input.note ?? null })
      .where(eq(identifications.observationId, id))
      .run();
    recordChange(tx, id, actor.userId, 'updated');
  });
}

/** Campaign initials and the two-digit year: "Varn Shoal 2026" → "VS26". */
function campaignCode(name: string): string {
  const year = /\b(\d{2})(\d{2})\b/.exec(name);
  const letters = name
    .replace(/\b\d{4}\b/, '')
    .split(/\s+/)
    .filter(Boolean)
    .map((w) => w[0]!.toUpperCase())
    .join('')
    .slice(0, 4);
  return `${letters || 'F'}${year ? year[2] : ''}`;
}

/** The next free find number: one more than the highest of the campaign's numbers that share the usual pattern. */
export function nextFindNumber(db: Executor, campaignId: string): string {
  const numbers = db.select({ n: finds.findNumber }).from(finds).where(eq(finds.campaignId, campaignId)).all();
  const parsed = numbers
    .map(({ n }) => /^(.*?)(\d+)$/.exec(n))
    .filter((m): m is RegExpExecArray => !!m)
    .map((m) => ({ prefix: m[1]!, digits: m[2]! }));
  if (parsed.length === 0) {
    const campaign = db.select({ name: campaigns.name }).from(campaigns).where(eq(campaigns.id, campaignId)).get();
    return `${campaignCode(campaign?.name ?? '')}-001`;
  }
  const byPrefix = new Map<string, { count: number; max: number; width: number }>();
  for (const p of parsed) {
    const entry = byPrefix.get(p.prefix) ?? { count: 0, max: 0, width: p.digits.length };
    byPrefix.set(p.prefix, {
      count: entry.count + 1,
      max: Math.max(entry.max, Number(p.digits)),
      width: Math.max(entry.width, p.digits.length),
    });
  }
  const [prefix, best] = [...byPrefix].sort((a, b) => b[1].count - a[1].count)[0]!;
  const taken = new Set(numbers.map(({ n }) => n.toLowerCase()));
  let next = best.max + 1;
  while (taken.has(`${prefix}${String(next).padStart(best.width, '0')}`.toLowerCase())) next++;
  return `${prefix}${String(next).padStart(best.width, '0')}`;
}

/**
 * Records or corrects an archaeology entry's find; a number already used in the campaign is a
 * 409, and so is a stale version (the body carries the entry's version, as an edit does).
 */
export function setFind(db: Db, live: LiveHub, id: string, actor: Actor, input: FindInput): ObservationDetail {
  return changeEntry(db, live, id, (tx) => {
    const row = loadLive(tx, id);
    assertCurrent(row, input.version);
    if (row.kind !== 'archaeology')
      throw fieldError('kind', 'Change the entry to archaeology first', 'Only archaeology entries carry a find.');
    const clash = tx
      .select({ id: finds.observationId })
      .from(finds)
      .where(and(eq(finds.campaignId, row.campaignId), sql`lower(${finds.findNumber}) = lower(${input.findNumber})`))
      .get();
    if (clash && clash.id !== id) {
      throw conflict(
        'duplicate_find_number',
        `Find number ${input.findNumber} is already used in this campaign; the next free one is ${nextFindNumber(tx, row.campaignId)}.`,
      );
    }
    const values = {
      campaignId: row.campaignId,
      findNumber: input.findNumber,
      objectType: input.objectType ?? null,
      material: input.material ?? null,
      condition: input.condition ?? null,
      state: input.state,
      updatedAt: new Date(),
    };
    tx.insert(finds)
      .values({ observationId: id, ...values })
      .onConflictDoUpdate({ target: finds.observationId, set: values })
      .run();
    recordChange(tx, id, actor.userId, 'updated');
  });
}

/**
 * Adds a step to the custody trail of a recovered find or a sample (an entry with a sample in the
 * register, or tagged "sample").
 * The trail is append-only: a correction is a new step. It takes no version: a step overwrites
 * nothing and leaves the entry's version alone, so two hand-overs recorded at once both stay.
 */
export function addCustody(db: Db, live: LiveHub, id: string, actor: Actor, input: CustodyInput): ObservationDetail {
  return changeEntry(db, live, id, (tx) => {
    loadLive(tx, id);
    const find = tx.select({ state: finds.state }).from(finds).where(eq(finds.observationId, id)).get();
    const isSample = tx
      .select({ n: sql<number>`count(*)` })
      .from(observationTags)
      .innerJoin(tags, eq(tags.id, observationTags.tagId))
      .where(and(eq(observationTags.observationId, id), sql`lower(${tags.name}) = ${SAMPLE_TAG}`))
      .get();
    const registered = tx.select({ n: samples.sampleNumber }).from(samples).where(eq(samples.observationId, id)).get();
    // A trail once begun goes on, even if the entry has since lost its tag.
    const hasTrail = tx.select({ id: custodyEvents.id }).from(custodyEvents).where(eq(custodyEvents.observationId, id)).get();
    if (find?.state !== 'recovered' && !registered && !isSample?.n && !hasTrail) {
      throw conflict('not_in_custody', 'A custody trail is kept for recovered finds and for samples.');
    }
    tx.insert(custodyEvents)
      .values({
        observationId: id,
        holder: input.holder,
        since: new Date(input.since),
        location: input.location,
        container: input.container ?? null,
        note: input.note ?? null,
        recordedBy: actor.userId,
      })
      .run();
  });
}
