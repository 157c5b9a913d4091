/**
 * From what a person typed to an FTS5 query. Nothing typed reaches FTS5's query syntax: the text
 * is cut into words exactly as the index cuts it (so quotes, `*`, `-`, `NEAR(`, `OR`, brackets and
 * column names are separators or plain words), and every word is written as a quoted string. Each
 * word becomes a group of alternatives (itself and the index's words a typo away) and the groups
 * must all match; the last word also stands for the most used index words it begins, for the
 * word still being typed.
 */
import { foldTerm, termsOf } from '../../../lib/search-terms';
import { allowedDistance, type Vocabulary } from './vocabulary';

const MAX_WORDS = 8;
const MAX_WORD_LENGTH = 64;

export type QueryPlan = {
  /** The FTS5 MATCH expression over the text columns, or null when nothing searchable was typed. */
  match: string | null;
  /** Each typed word's alternatives (itself, its typo neighbours and completions), as index terms. */
  groups: string[][];
  /** Folded words to mark as matches in titles and snippets. */
  terms: Set<string>;
  /** Whether widening the known words too could find something (a typo that is itself a word). */
  relaxable: boolean;
  /** The whole query folded, to recognise an exact find number or scientific name. */
  whole: string;
  /** The phrase of all words in the find number and scientific name columns. */
  exactMatch: string | null;
  /**
   * Two or more words to find side by side in a title, in this order (each as typed, or its
   * likeliest correction or completion); empty for one word.
   */
  phrase: string[];
};

export const quoted = (term: string) => `"${term.replaceAll('"', '""')}"`;

/** The columns a typed word may match (not the index's own `scope` column). */
const TEXT_COLUMNS = '{title tags scientific_name find_number note}';

/** An FTS5 expression: every group must match one of its alternatives in the text columns. */
export function groupsMatch(groups: readonly (readonly string[])[]): string {
  const parts = groups.map((g) => (g.length === 1 ? quoted(g[0]!) : `(${g.map(quoted).join(' OR ')})`));
  return `${TEXT_COLUMNS} : (${parts.join(' AND ')})`;
}

/**
 * `relaxed` widens every word, known or not; otherwise only the words the index does not know.
 */
export function planQuery(typed: string, vocabulary: Vocabulary, options: { relaxed?: boolean } = {}): QueryPlan {
  const words = termsOf(typed)
    .filter((w) => w.length <= MAX_WORD_LENGTH)
    .slice(0, MAX_WORDS);
  const terms = new Set<string>();
  const whole = foldTerm(typed.trim().replace(/\s+/g, ' '));
  if (words.length === 0) return { match: null, groups: [], terms, relaxable: false, whole, exactMatch: null, phrase: [] };
  const typing = !/\s$/.test(typed);
  let relaxable = false;
  const likeliest: string[] = [];
  const groups = words.map((word, i) => {
    const alternatives = [word];
    const known = vocabulary.has(word);
    const similar = !known || options.relaxed ? vocabulary.similar(word) : [];
    alternatives.push(...similar);
    if (known && !options.relaxed && allowedDistance(word) > 0) relaxable = true;
    const completions = i === words.length - 1 && typing && word.length >= 2 ? vocabulary.completions(word) : [];
    alternatives.push(...completions);
    likeliest.push(known ? word : (similar[0] ?? completions[0] ?? word));
    const unique = [...new Set(alternatives)];
    for (const a of unique) terms.add(a);
    return unique;
  });
  return {
    match: groupsMatch(groups),
    groups,
    terms,
    relaxable,
    whole,
    exactMatch: words.length <= 6 ? `{scientific_name find_number} : ${quoted(words.join(' '))}` : null,
    phrase: words.length >= 2 ? likeliest : [],
  };
}

/** Whether a title holds the plan's phrase: its words one after another, as the index cuts them. */
export function holdsPhrase(plan: QueryPlan, title: string): boolean {
  const { phrase } = plan;
  if (phrase.length === 0) return false;
  const terms = termsOf(title);
  for (let i = 0; i + phrase.length <= terms.length; i++) {
    if (phrase.every((w, j) => terms[i + j] === w)) return true;
  }
  return false;
}

/** A test for folded terms: one of the words the plan searches for. */
export function matcherOf(plan: QueryPlan): (term: string) => boolean {
  return (term) => plan.terms.has(term);
}
