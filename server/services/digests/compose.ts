import { and, asc, count, eq, gt, inArray, lte, max, sql } from 'drizzle-orm';
import { DateTime } from 'luxon';

import type { Executor } from '../../../db/client';
import { dives, observations, photos, telemetrySamples } from '../../../db/schema';
import type { DigestFilters, DigestFrequency, DigestTrigger, ObservationKind } from '../../../lib/schemas';
import { htmlToPlainText, markdownToUnsafeHtml } from '../../../lib/notes';
import { renderMail } from '../mail-templates';
import { observationFilters } from '../observations/filters';
import { tagsOf } from '../observations/hydrate';

/** A digest crosses the ship's satellite link: the whole message stays under 100 KB. */
export const DIGEST_MAX_BYTES = 100 * 1024;
/**
 * What the HTML and text parts may take together. The rest of the 100 KB is for the headers and
 * the quoted-printable encoding of the parts (about 3 % on this HTML, more on long lines).
 */
const PARTS_BUDGET = 80 * 1024;
/**
 * Entries read for one digest at most. An entry takes at least about 1.1 KB of the parts (the
 * template around it, its links), so no more than about 70 ever fit the budget; the rest are counted.
 */
const MAX_ROWS = 100;

const kindLabels: Record<ObservationKind, string> = {
  biology: 'Biology',
  archaeology: 'Archaeology',
  environment: 'Environment',
  operations: 'Operations',
};
const kindOrder: ObservationKind[] = ['biology', 'archaeology', 'environment', 'operations'];

export type DigestCampaign = { id: string; name: string; timeZone: string };
export type DigestRecipient = { userId: string; name: string; frequency: DigestFrequency; filters: DigestFilters };
export type DigestWindow = { since: Date | null; until: Date };
export type DigestLinks = { base: string; unsubscribeApi: string; unsubscribePage: string };

export type ComposedDigest = {
  subject: string;
  text: string;
  html: string;
  headers: Record<string, string>;
  /** Entries that matched (all of them, also those beyond the size bound). */
  observationCount: number;
  shown: number;
};

/** What a digest run reads once and shares between its subscribers: entries' excerpts, tags, thumbnails and dives' summaries. */
export type ComposeCache = {
  entries: Map<string, { excerpt: string; tags: string; thumb: string | null }>;
  dives: Map<string, { number: string; summary: string }>;
};
export const newComposeCache = (): ComposeCache => ({ entries: new Map(), dives: new Map() });

/** The shared observation filters for a subscriber's choices, limited to the campaign (and dive) and the window. */
function conditions(campaignId: string, filters: DigestFilters, window: DigestWindow, diveId?: string) {
  return and(
    ...observationFilters({
      campaignIds: [campaignId],
      ...(diveId ? { diveId } : {}),
      ...(filters.kinds?.length ? { kinds: filters.kinds } : {}),
      ...(filters.tags?.length ? { anyTags: filters.tags } : {}),
      ...(filters.withPhotos ? { hasPhotos: true } : {}),
      ...(filters.verifiedOnly ? { verification: 'verified' as const } : {}),
      retired: false,
    }),
    window.since ? gt(observations.updatedAt, window.since) : undefined,
    lte(observations.updatedAt, window.until),
  );
}

/** Elements whose content is not text to read: dropped with it, closed or not. */
const NOT_TEXT =
  /<(script|style|template|textarea|title|iframe|noscript|noembed|noframes|object|svg|math)\b[^>]*>[\s\S]*?(?:<\/\1\s*>|$)/gi;

/**
 * The start of a note as plain text. Only text comes out of it (tags dropped, entities decoded) and
 * the templates escape it in the HTML part, so no sanitizer is needed here: the server then never
 * loads a DOM (jsdom holds about 100 MB for as long as the process runs) just to write digests.
 */
export const excerptOf = (note: string) => {
  let text: string;
  try {
    text = htmlToPlainText(markdownToUnsafeHtml(note.slice(0, 600)).replace(NOT_TEXT, ' '));
  } catch {
    text = note.slice(0, 600);
  }
  text = text.replace(/\s+/g, ' ').trim();
  return text.length > 240 ? `${text.slice(0, 237).trimEnd()}…` : text;
};

function durationText(ms: number): string {
  const minutes = Math.round(ms / 60_000);
  const h = Math.floor(minutes / 60);
  return h > 0 ? `${h} h ${minutes % 60} min` : `${minutes} min`;
}

/** The dive's summary line: how long it lasted, how deep it went, and its entries per kind. */
function diveSummary(db: Executor, diveId: string, cache: ComposeCache) {
  const known = cache.dives.get(diveId);
  if (known) return known;
  const dive = db.select().from(dives).where(eq(dives.id, diveId)).get()!;
  const parts: string[] = [];
  if (dive.launchAt && dive.onDeckAt) parts.push(`${durationText(dive.onDeckAt.getTime() - dive.launchAt.getTime())} launch to on deck`);
  else if (dive.launchAt) parts.push('under way');
  const deepest =
    db
      .select({ d: max(telemetrySamples.depth) })
      .from(telemetrySamples)
      .where(eq(telemetrySamples.diveId, diveId))
      .get()?.d ??
    db
      .select({ d: max(observations.depth) })
      .from(observations)
      .where(and(eq(observations.diveId, diveId), eq(observations.retired, false)))
      .get()?.d;
  if (deepest !== null && deepest !== undefined) parts.push(`max depth ${Math.round(deepest)} m`);
  const perKind = db
    .select({ kind: observations.kind, n: count() })
    .from(observations)
    .where(and(eq(observations.diveId, diveId), eq(observations.retired, false)))
    .groupBy(observations.kind)
    .all();
  const total = perKind.reduce((a, k) => a + k.n, 0);
  parts.push(
    `${total} ${total === 1 ? 'entry' : 'entries'}${
      total
        ? `: ${kindOrder
            .filter((k) => perKind.some((p) => p.kind === k))
            .map((k) => `${perKind.find((p) => p.kind === k)!.n} ${k}`)
            .join(', ')}`
        : ''
    }`,
  );
  const out = { number: dive.number, summary: parts.join(' · ') };
  cache.dives.set(diveId, out);
  return out;
}

export function describeFilters(f: DigestFilters): string {
  const kinds = f.kinds?.length ? `${f.kinds.join(' and ')} entries` : 'all entries';
  const parts = [kinds];
  if (f.tags?.length) parts.push(`tagged ${f.tags.join(' or ')}`);
  if (f.verifiedOnly) parts.push('verified identifications only');
  if (f.withPhotos) parts.push('with photos only');
  return parts.join(', ');
}

const frequencyText: Record<DigestFrequency, string> = {
  off: 'when a lead sends one',
  'after-each-dive': 'after each dive',
  daily: 'every day at 07:00 campaign time',
};

type EntryView = {
  url: string;
  thumb: string | null;
  title: string;
  changed: boolean;
  utc: string;
  local: string;
  depth: string | null;
  excerpt: string;
  tags: string;
};

/**
 * One subscriber's digest: the entries of the campaign (or of one dive) created or changed in the
 * window that match their filters, grouped by dive and kind, retired ones left out. Null when
 * nothing matches: no digest is sent then. Entries past the size bound are counted, not shown.
 */
export function composeDigest(
  db: Executor,
  campaign: DigestCampaign,
  recipient: DigestRecipient,
  window: DigestWindow,
  context: { trigger: DigestTrigger; diveId?: string; links: DigestLinks; cache: ComposeCache },
): ComposedDigest | null {
  const where = conditions(campaign.id, recipient.filters, window, context.diveId);
  // Counting apart lets the page below keep only its first rows while sorting, not every match;
  // and notes are read only for entries not yet excerpted by an earlier subscriber's digest.
  const total = db.select({ n: count() }).from(observations).where(where).get()?.n ?? 0;
  if (total === 0) return null;
  const rows = db
    .select({
      id: observations.id,
      diveId: observations.diveId,
      kind: observations.kind,
      title: observations.title,
      depth: observations.depth,
      observedAt: observations.observedAt,
      createdAt: observations.createdAt,
    })
    .from(observations)
    .innerJoin(dives, eq(dives.id, observations.diveId))
    .where(where)
    .orderBy(
      asc(sql`coalesce(${dives.launchAt}, ${dives.plannedStartAt}, ${dives.createdAt})`),
      asc(dives.number),
      sql`case ${observations.kind} when 'biology' then 0 when 'archaeology' then 1 when 'environment' then 2 else 3 end`,
      asc(observations.observedAt),
    )
    .limit(MAX_ROWS)
    .all();

  const { cache, links } = context;
  const missing = rows.filter((r) => !cache.entries.has(r.id)).map((r) => r.id);
  if (missing.length > 0) {
    const tags = tagsOf(db, missing);
    const notes = new Map(
      db
        .select({ id: observations.id, note: sql<string>`substr(${observations.note}, 1, 600)` })
        .from(observations)
        .where(inArray(observations.id, missing))
        .all()
        .map((n) => [n.id, n.note]),
    );
    const thumbs = new Map<string, string>();
    for (const p of db
      .select({ id: photos.id, observationId: photos.observationId })
      .from(photos)
      .where(and(inArray(photos.observationId, missing), eq(photos.retired, false)))
      .orderBy(asc(photos.position))
      .all()) {
      if (!thumbs.has(p.observationId)) thumbs.set(p.observationId, p.id);
    }
    for (const r of rows) {
      if (cache.entries.has(r.id)) continue;
      const thumb = thumbs.get(r.id);
      cache.entries.set(r.id, {
        excerpt: notes.get(r.id) ? excerptOf(notes.get(r.id)!) : '',
        tags: (tags.get(r.id) ?? []).join(', '),
        thumb: thumb ? `${links.base}/api/photos/${thumb}?size=thumb` : null,
      });
    }
  }

  // One formatter per digest: zone lookups per entry were a good part of composing.
  const inZone = new Intl.DateTimeFormat('en-GB', {
    timeZone: campaign.timeZone,
    hour: '2-digit',
    minute: '2-digit',
    hourCycle: 'h23',
    timeZoneName: 'short',
  });
  const view = (r: (typeof rows)[number]): EntryView => {
    const cached = cache.entries.get(r.id)!;
    return {
      url: `${links.base}/observations/${r.id}`,
      thumb: cached.thumb,
      title: r.title,
      changed: window.since !== null && r.createdAt <= window.since,
      utc: r.observedAt.toISOString().slice(0, 19).replace('T', ' '),
      local: inZone.format(r.observedAt).replace(',', ''),
      depth: r.depth === null ? null : `${r.depth.toFixed(1)} m`,
      excerpt: cached.excerpt,
      tags: cached.tags,
    };
  };
  // Rough size of an entry in both parts, to stop adding entries before the bound.
  const estimate = (e: EntryView) => 900 + 2 * (e.title.length + e.excerpt.length + e.tags.length) + 3 * e.url.length + (e.thumb ? 260 : 0);

  const shownRows: { row: (typeof rows)[number]; view: EntryView }[] = [];
  let budget = PARTS_BUDGET - 6000;
  for (const row of rows) {
    const v = view(row);
    budget -= estimate(v);
    if (budget < 0) break;
    shownRows.push({ row, view: v });
  }

  const render = (shown: typeof shownRows) => {
    const diveIds = [...new Set(shown.map((s) => s.row.diveId))];
    const divesView = diveIds.map((diveId) => {
      const summary = diveSummary(db, diveId, cache);
      const inDive = shown.filter((s) => s.row.diveId === diveId);
      return {
        number: summary.number,
        summary: summary.summary,
        url: `${links.base}/dives/${diveId}`,
        kinds: kindOrder
          .map((k) => ({ label: kindLabels[k], entries: inDive.filter((s) => s.row.kind === k).map((s) => s.view) }))
          .filter((k) => k.entries.length > 0)
          .map((k) => ({ ...k, count: k.entries.length })),
      };
    });
    const more = total - shown.length;
    const oneDive = context.diveId ?? (diveIds.length === 1 ? diveIds[0] : undefined);
    const diveNumber = oneDive ? diveSummary(db, oneDive, cache).number : null;
    const subject =
      context.trigger === 'after-dive' && diveNumber
        ? `${campaign.name}: dive ${diveNumber} is on deck — ${total} ${total === 1 ? 'entry' : 'entries'} for you`
        : `${campaign.name}: ${total} new or changed ${total === 1 ? 'entry' : 'entries'}`;
    const sinceText = window.since ? DateTime.fromJSDate(window.since).setZone(campaign.timeZone).toFormat('yyyy-LL-dd HH:mm ZZZZ') : null;
    const intro =
      context.trigger === 'after-dive' && diveNumber
        ? `Dive ${diveNumber} of ${campaign.name} is back on deck. Here is what was logged on it${sinceText ? ` since your last digest (${sinceText})` : ''} that matches your digest settings.`
        : `Here is what was logged or changed in ${campaign.name}${sinceText ? ` since ${sinceText}` : ''} that matches your digest settings.`;
    return renderMail('digest', subject, {
      recipient: recipient.name,
      intro,
      dives: divesView,
      more: more > 0 ? more : null,
      moreNoun: more === 1 ? 'entry' : 'entries',
      logUrl: oneDive ? `${links.base}/dives/${oneDive}` : `${links.base}/campaigns/${campaign.id}`,
      frequency: frequencyText[recipient.frequency],
      filters: describeFilters(recipient.filters),
      settingsUrl: `${links.base}/campaigns/${campaign.id}/digest`,
      unsubscribeUrl: links.unsubscribePage,
    });
  };

  let shown = shownRows;
  let mail = render(shown);
  // The estimate is generous; should it ever fall short, drop entries until the parts fit.
  while (shown.length > 0 && Buffer.byteLength(mail.html) + Buffer.byteLength(mail.text) > PARTS_BUDGET) {
    shown = shown.slice(0, Math.floor(shown.length * 0.8));
    mail = render(shown);
  }
  return {
    ...mail,
    headers: {
      'List-Unsubscribe': `<${links.unsubscribeApi}>`,
      'List-Unsubscribe-Post': 'List-Unsubscribe=One-Click',
    },
    observationCount: total,
    shown: shown.length,
  };
}
