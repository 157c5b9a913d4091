/**
 * The campaign's species list: imported by the lead from a CSV (scientific name, authorship, rank,
 * scientific name identifier, vernacular name), each row read with care (lib/taxon-names.ts) and
 * bad rows reported by line, as the telemetry import does. A name already on the list is updated,
 * never doubled; nothing already stored is lost by a bad file.
 */
import { parse } from 'csv-parse/sync';
import { and, asc, count, eq, sql } from 'drizzle-orm';

import type { Db, Executor } from '../../db/client';
import { checklistTaxa, identifications, observations } from '../../db/schema';
import type { ChecklistEntry, ChecklistReport, NameSuggestion } from '../../lib/schemas';
import { isNameProblem, parseScientificName } from '../../lib/taxon-names';
import { ApiError } from '../errors';

/** Header names taken for each column: Darwin Core's terms and plain ones, any case or spacing. */
const columns = {
  scientificName: ['scientificname', 'scientific name', 'name', 'taxon'],
  authorship: ['scientificnameauthorship', 'authorship', 'author', 'authority'],
  taxonRank: ['taxonrank', 'rank'],
  identifier: ['scientificnameid', 'identifier', 'lsid', 'taxonid', 'id'],
  vernacularName: ['vernacularname', 'vernacular name', 'common name', 'vernacular'],
} as const;

const knownRanks = new Set([
  'kingdom',
  'phylum',
  'subphylum',
  'class',
  'subclass',
  'order',
  'suborder',
  'superfamily',
  'family',
  'subfamily',
  'tribe',
  'genus',
  'subgenus',
  'species',
  'subspecies',
  'variety',
  'form',
]);

const identifierPattern = /^(urn:lsid:[\w.-]+:[\w.-]+:[\w.-]+(:[\w.-]+)?|https?:\/\/\S+)$/i;

/** Largest species list taken; a regional checklist of every phylum stays far below it. */
export const MAX_CHECKLIST_BYTES = 5 * 1024 * 1024;
const MAX_ROWS = 50_000;

type Row = Record<keyof typeof columns, string | null>;

function headerMap(header: string[]): Partial<Record<keyof typeof columns, number>> {
  const norm = header.map((h) =>
    h
      .replace(/^\uFEFF/, '')
      .trim()
      .toLowerCase()
      .replace(/[_-]+/g, ' ')
      .replace(/\s+/g, ' '),
  );
  const out: Partial<Record<keyof typeof columns, number>> = {};
  for (const [key, names] of Object.entries(columns) as [keyof typeof columns, readonly string[]][]) {
    const i = norm.findIndex((h) => names.includes(h) || names.includes(h.replace(/ /g, '')));
    if (i >= 0) out[key] = i;
  }
  return out;
}

export function importChecklist(db: Db, campaignId: string, actorId: string, file: Buffer, now = new Date()): ChecklistReport {
  let records: string[][];
  try {
    const rows: unknown = parse(file.toString('utf8'), {
      delimiter: [',', ';', '\t'],
      relax_column_count: true,
      skip_empty_lines: true,
      bom: true,
      trim: true,
    });
    // Without `columns`, csv-parse gives each record as an array of its cells.
    records = rows as string[][];
  } catch (e) {
    throw new ApiError(400, 'bad_request', `The species list is not readable CSV: ${(e as Error).message}`, [
      { path: 'file', message: 'Send the species list as CSV (comma, semicolon or tab separated) with a header row' },
    ]);
  }
  if (records.length === 0) throw new ApiError(400, 'empty_file', 'The species list is empty.');
  const map = headerMap(records[0]!);
  if (map.scientificName === undefined) {
    throw new ApiError(400, 'bad_request', 'The species list has no scientific name column (a header such as "scientificName").', [
      {
        path: 'file',
        message: 'The first row names the columns: scientificName, scientificNameAuthorship, taxonRank, scientificNameID, vernacularName',
      },
    ]);
  }
  if (records.length - 1 > MAX_ROWS) {
    throw new ApiError(413, 'too_large', `The species list has ${records.length - 1} rows; at most ${MAX_ROWS} are taken at once.`);
  }
  const rejected: ChecklistReport['rejected'] = [];
  const seen = new Set<string>();
  const good: (typeof checklistTaxa.$inferInsert)[] = [];
  records.slice(1).forEach((cells, i) => {
    const line = i + 2;
    const cell = (k: keyof typeof columns) => {
      const at = map[k];
      const v = at === undefined ? '' : (cells[at] ?? '').trim();
      return v === '' ? null : v;
    };
    const row: Row = {
      scientificName: cell('scientificName'),
      authorship: cell('authorship'),
      taxonRank: cell('taxonRank'),
      identifier: cell('identifier'),
      vernacularName: cell('vernacularName'),
    };
    if (!row.scientificName) {
      rejected.push({ line, code: 'missing_name', message: `Line ${line}: no scientific name` });
      return;
    }
    const parsed = parseScientificName(row.scientificName, row.authorship);
    if (isNameProblem(parsed)) {
      rejected.push({ line, code: parsed.code, message: `Line ${line}: ${parsed.message}` });
      return;
    }
    if (parsed.qualifier) {
      rejected.push({
        line,
        code: 'bad_name',
        message: `Line ${line}: "${parsed.qualifier}" is open nomenclature, which belongs to an identification, not to a species list`,
      });
      return;
    }
    const rank = row.taxonRank?.toLowerCase() ?? parsed.impliedRank;
    if (rank && !knownRanks.has(rank)) {
      rejected.push({ line, code: 'bad_rank', message: `Line ${line}: "${row.taxonRank}" is not a rank this list knows` });
      return;
    }
    if (row.identifier && !identifierPattern.test(row.identifier)) {
      rejected.push({
        line,
        code: 'bad_identifier',
        message: `Line ${line}: the identifier is neither an LSID (urn:lsid:…) nor an http(s) link`,
      });
      return;
    }
    const key = parsed.canonical.toLowerCase();
    if (seen.has(key)) {
      rejected.push({ line, code: 'duplicate_in_file', message: `Line ${line}: ${parsed.canonical} is already on an earlier line` });
      return;
    }
    seen.add(key);
    good.push({
      campaignId,
      scientificName: parsed.canonical,
      authorship: parsed.authorship,
      taxonRank: rank ?? null,
      identifier: row.identifier,
      vernacularName: row.vernacularName?.slice(0, 200) ?? null,
      genus: parsed.genus,
      specificEpithet: parsed.specificEpithet,
      infraspecificRank: parsed.infraspecificRank,
      infraspecificEpithet: parsed.infraspecificEpithet,
      importedAt: now,
      importedBy: actorId,
    });
  });
  let added = 0;
  let updated = 0;
  db.transaction((tx) => {
    for (const g of good) {
      const existing = tx
        .select({ id: checklistTaxa.id })
        .from(checklistTaxa)
        .where(and(eq(checklistTaxa.campaignId, campaignId), sql`lower(${checklistTaxa.scientificName}) = lower(${g.scientificName})`))
        .get();
      if (existing) {
        const { campaignId: _c, ...set } = g;
        tx.update(checklistTaxa).set(set).where(eq(checklistTaxa.id, existing.id)).run();
        updated++;
      } else {
        tx.insert(checklistTaxa).values(g).run();
        added++;
      }
    }
  });
  return { taken: good.length, added, updated, rejected, total: records.length - 1 };
}

const toEntry = (r: typeof checklistTaxa.$inferSelect): ChecklistEntry => ({
  id: r.id,
  scientificName: r.scientificName,
  authorship: r.authorship,
  taxonRank: r.taxonRank,
  identifier: r.identifier,
  vernacularName: r.vernacularName,
  genus: r.genus,
  specificEpithet: r.specificEpithet,
  infraspecificRank: r.infraspecificRank,
  infraspecificEpithet: r.infraspecificEpithet,
});

export function listChecklist(db: Executor, campaignId: string): ChecklistEntry[] {
  return db
    .select()
    .from(checklistTaxa)
    .where(eq(checklistTaxa.campaignId, campaignId))
    .orderBy(asc(checklistTaxa.scientificName))
    .all()
    .map(toEntry);
}

export function hasChecklist(db: Executor, campaignId: string): boolean {
  return !!db.select({ id: checklistTaxa.id }).from(checklistTaxa).where(eq(checklistTaxa.campaignId, campaignId)).limit(1).get();
}

/** The lower-cased names on the campaign's list. */
export function checklistNames(db: Executor, campaignId: string): Set<string> {
  return new Set(
    db
      .select({ n: checklistTaxa.scientificName })
      .from(checklistTaxa)
      .where(eq(checklistTaxa.campaignId, campaignId))
      .all()
      .map((r) => r.n.toLowerCase()),
  );
}

const escapeLike = (s: string) => s.replace(/[\\%_]/g, (c) => `\\${c}`);

/**
 * Names to offer as someone types: from the species list (by name or vernacular name, names
 * starting with what was typed first) and from names already used in the campaign.
 */
export function suggestNames(
  db: Executor,
  campaignId: string,
  q: string,
  limit: number,
): { items: NameSuggestion[]; hasChecklist: boolean } {
  const typed = q.trim();
  const pattern = `%${escapeLike(typed)}%`;
  const uses = new Map(
    db
      .select({ name: identifications.scientificName, n: count() })
      .from(identifications)
      .innerJoin(observations, eq(observations.id, identifications.observationId))
      .where(and(eq(observations.campaignId, campaignId), eq(observations.retired, false)))
      .groupBy(sql`lower(${identifications.scientificName})`)
      .all()
      .map((r) => [r.name.toLowerCase(), { name: r.name, n: r.n }]),
  );
  const listed = db
    .select()
    .from(checklistTaxa)
    .where(
      and(
        eq(checklistTaxa.campaignId, campaignId),
        typed
          ? sql`(${checklistTaxa.scientificName} like ${pattern} escape '\\' or ${checklistTaxa.vernacularName} like ${pattern} escape '\\')`
          : undefined,
      ),
    )
    .orderBy(asc(checklistTaxa.scientificName))
    .limit(500)
    .all();
  const items: NameSuggestion[] = listed.map((r) => ({
    scientificName: r.scientificName,
    authorship: r.authorship,
    taxonRank: r.taxonRank,
    vernacularName: r.vernacularName,
    identifier: r.identifier,
    onChecklist: true,
    uses: uses.get(r.scientificName.toLowerCase())?.n ?? 0,
  }));
  const onList = new Set(listed.map((r) => r.scientificName.toLowerCase()));
  const all = checklistNames(db, campaignId);
  for (const [key, u] of uses) {
    if (onList.has(key) || all.has(key)) continue;
    if (typed && !key.includes(typed.toLowerCase())) continue;
    items.push({
      scientificName: u.name,
      authorship: null,
      taxonRank: null,
      vernacularName: null,
      identifier: null,
      onChecklist: false,
      uses: u.n,
    });
  }
  const t = typed.toLowerCase();
  const starts = (s: NameSuggestion) => (t && s.scientificName.toLowerCase().startsWith(t) ? 0 : 1);
  items.sort((a, b) => starts(a) - starts(b) || b.uses - a.uses || a.scientificName.localeCompare(b.scientificName));
  return { items: items.slice(0, limit), hasChecklist: all.size > 0 };
}
