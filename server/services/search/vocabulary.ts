/**
 * The index's own words, held in memory, for typo tolerance: a query word the index does not
 * know is widened to the known words within a small edit distance (Levenshtein, through
 * `fastest-levenshtein`). Read once from the index's `fts5vocab` table, then kept up to date from
 * the entries changed since (the index's revision mark), so it is never read whole again.
 */
import { distance } from 'fastest-levenshtein';

import type { Db } from '../../../db/client';
import { termsOf } from '../../../lib/search-terms';
import { changedSince, indexMark } from './store';

/** Edit distance allowed for a word: 1 up to five letters, 2 beyond (shorter words are not widened). */
export const allowedDistance = (word: string): number => (word.length < 3 ? 0 : word.length <= 5 ? 1 : 2);

/** Words with a letter in them are widened; numbers (find numbers, dates) must be typed as they are. */
const widenable = (term: string) => term.length >= 3 && term.length <= 40 && /\p{L}/u.test(term);

/** One bit per letter a–z, one for digits, one for anything else: a cheap bound on the distance. */
function letterMask(term: string): number {
  let mask = 0;
  for (let i = 0; i < term.length; i++) {
    const c = term.charCodeAt(i);
    if (c >= 97 && c <= 122) mask |= 1 << (c - 97);
    else if (c >= 48 && c <= 57) mask |= 1 << 26;
    else mask |= 1 << 27;
  }
  return mask;
}

function bitCount(n: number): number {
  let v = n - ((n >>> 1) & 0x55555555);
  v = (v & 0x33333333) + ((v >>> 2) & 0x33333333);
  return (((v + (v >>> 4)) & 0x0f0f0f0f) * 0x01010101) >>> 24;
}

type Bucket = { terms: string[]; masks: number[] };

export class Vocabulary {
  /** Every known term with the number of entries that hold it (approximate after changes). */
  private readonly docs = new Map<string, number>();
  /** Widenable terms by length, for the distance scan. */
  private readonly byLength = new Map<number, Bucket>();
  /** Every term in order, for completing a word being typed. */
  private sorted: string[] = [];
  /** How many entries the index holds (approximate after changes). */
  documents = 0;
  private revision = 0;
  private audit = 0;
  private loaded = false;

  constructor(private readonly db: Db) {}

  get size(): number {
    return this.docs.size;
  }

  private add(term: string, docs: number) {
    const had = this.docs.get(term);
    this.docs.set(term, (had ?? 0) + docs);
    if (had !== undefined) return;
    if (this.loaded) this.sorted.splice(this.lowerBound(term), 0, term);
    if (!widenable(term)) return;
    let bucket = this.byLength.get(term.length);
    if (!bucket) {
      bucket = { terms: [], masks: [] };
      this.byLength.set(term.length, bucket);
    }
    bucket.terms.push(term);
    bucket.masks.push(letterMask(term));
  }

  private loadAll() {
    this.docs.clear();
    this.byLength.clear();
    const mark = indexMark(this.db);
    // Per column, without the scope tokens (campaigns and dives are not words anyone types); a
    // term in two columns of one entry is counted twice, which the uses below can bear.
    const rows = this.db.$client.prepare(`select term, doc from search.search_terms where col <> 'scope'`).raw().iterate();
    for (const row of rows as Iterable<[string, number]>) this.add(row[0], row[1]);
    this.documents = this.db.$client.prepare('select count(*) from search.search_entries_docsize').pluck().get() as number;
    this.sorted = [...this.docs.keys()].sort();
    this.revision = mark.revision;
    this.audit = mark.audit;
    this.loaded = true;
  }

  /** Brings the words up to date with the index: cheap when nothing changed. */
  refresh() {
    if (!this.loaded) return this.loadAll();
    const mark = indexMark(this.db);
    if (mark.revision !== this.revision) {
      const changed = changedSince(this.db, this.revision);
      // After a very large change (an import), reading the index's word list is quicker.
      if (changed.rowids.length > 20_000) return this.loadAll();
      const text = this.db.$client
        .prepare(
          `
        select o.title || ' ' || o.note || ' ' ||
          coalesce((select i.scientific_name from identifications i where i.observation_id = o.id), '') || ' ' ||
          coalesce((select f.find_number from finds f where f.observation_id = o.id), '') || ' ' ||
          coalesce((select group_concat(t.name, ' ') from observation_tags ot join tags t on t.id = ot.tag_id
            where ot.observation_id = o.id), '')
        from observations o where o.rowid = ?`,
        )
        .pluck();
      this.documents += changed.rowids.length;
      for (const rowid of changed.rowids) {
        const value = text.get(rowid) as string | undefined;
        if (value) for (const term of new Set(termsOf(value))) this.add(term, 1);
      }
      this.revision = changed.revision;
    }
    if (mark.audit !== this.audit) {
      // A renamed tag: its new name's words. The tag list of all campaigns is short.
      for (const name of this.db.$client.prepare('select name from tags').pluck().all() as string[]) {
        for (const term of termsOf(name)) if (!this.docs.has(term)) this.add(term, 1);
      }
      this.audit = mark.audit;
    }
  }

  private lowerBound(term: string): number {
    let lo = 0;
    let hi = this.sorted.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (this.sorted[mid]! < term) lo = mid + 1;
      else hi = mid;
    }
    return lo;
  }

  /**
   * The most used known terms that begin with a prefix (the prefix itself excluded). Listing them
   * lets FTS5 look each up directly, which is far quicker than its own prefix scan.
   */
  completions(prefix: string, limit = 12): string[] {
    const found: string[] = [];
    for (let i = this.lowerBound(prefix); i < this.sorted.length; i++) {
      const term = this.sorted[i]!;
      if (!term.startsWith(prefix)) break;
      if (term !== prefix) found.push(term);
    }
    if (found.length <= limit) return found;
    return found.sort((a, b) => (this.docs.get(b) ?? 0) - (this.docs.get(a) ?? 0)).slice(0, limit);
  }

  has(term: string): boolean {
    return this.docs.has(term);
  }

  /** About how many entries hold one of these terms (an upper bound: they may overlap). */
  docsOf(terms: readonly string[]): number {
    let n = 0;
    for (const t of terms) n += this.docs.get(t) ?? 0;
    return n;
  }

  /**
   * The known terms nearest to a word within the allowed edit distance (all at the same, smallest
   * distance), the most used first; at most `limit` of them.
   */
  similar(word: string, limit = 10): string[] {
    const max = allowedDistance(word);
    if (max === 0) return [];
    const mask = letterMask(word);
    const found: { term: string; d: number; docs: number }[] = [];
    for (let len = word.length - max; len <= word.length + max; len++) {
      const bucket = this.byLength.get(len);
      if (!bucket) continue;
      const { terms, masks } = bucket;
      for (let i = 0; i < terms.length; i++) {
        // Every letter one word has and the other lacks costs at least one edit.
        const m = masks[i]!;
        if (bitCount(mask & ~m) > max || bitCount(m & ~mask) > max) continue;
        const term = terms[i]!;
        if (term === word) continue;
        const d = distance(word, term);
        if (d <= max) found.push({ term, d, docs: this.docs.get(term) ?? 0 });
      }
    }
    // Only the nearest: a slip of one letter is far likelier than two, and every extra word
    // widens the matches (and the ranking's work) for nothing.
    const nearest = Math.min(...found.map((f) => f.d));
    return found
      .filter((f) => f.d === nearest)
      .sort((a, b) => b.docs - a.docs)
      .slice(0, limit)
      .map((f) => f.term);
  }
}
