/**
 * Words as the search index sees them: the same cut and folding as SQLite FTS5's `unicode61`
 * tokenizer with `remove_diacritics 2` (letters, digits and private-use characters make up a
 * word; everything else separates words; case and accents are folded away). The server uses it to
 * turn a typed query into index terms and to mark what matched; the app uses it to narrow a list
 * it already holds in the same way the server would.
 */

export type Token = { term: string; start: number; end: number };

const word = /[\p{L}\p{N}\p{Co}][\p{L}\p{N}\p{Co}\p{M}]*/gu;

/** "Ferrous" → "ferrous", "Stérn" → "stern". */
export function foldTerm(text: string): string {
  return text.normalize('NFD').replace(/\p{M}/gu, '').toLowerCase();
}

/** Every word of a text with its place in the text (UTF-16 offsets), folded. */
export function tokenize(text: string): Token[] {
  const out: Token[] = [];
  for (const m of text.matchAll(word)) {
    const term = foldTerm(m[0]);
    if (term) out.push({ term, start: m.index, end: m.index + m[0].length });
  }
  return out;
}

/** The folded words of a text, in order. */
export const termsOf = (text: string): string[] => tokenize(text).map((t) => t.term);

/** A stretch of shown text, marked when it matched the query. */
export type Segment = { text: string; match: boolean };

/**
 * Cuts a text into plain and matched stretches, given a test for a folded term. Adjacent stretches
 * of the same kind are merged, so the result alternates.
 */
export function markMatches(text: string, matches: (term: string) => boolean): Segment[] {
  const out: Segment[] = [];
  const push = (s: string, match: boolean) => {
    if (!s) return;
    const last = out[out.length - 1];
    if (last && last.match === match) last.text += s;
    else out.push({ text: s, match });
  };
  let at = 0;
  for (const t of tokenize(text)) {
    if (!matches(t.term)) continue;
    push(text.slice(at, t.start), false);
    push(text.slice(t.start, t.end), true);
    at = t.end;
  }
  push(text.slice(at), false);
  return out;
}
