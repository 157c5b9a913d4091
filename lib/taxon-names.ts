/**
 * Reading a scientific name as written in a species list or typed in the identification form:
 * genus, specific epithet, infraspecific rank and epithet, authorship, and open-nomenclature
 * qualifiers (cf., aff., sp., …) each in a field of their own, never glued into the name. The
 * conventions followed: a genus (or any uninomial) is capitalised, epithets are lower case, an
 * infraspecific epithet follows its rank marker, authorship starts with a capital, a parenthesis
 * or a nobiliary particle and runs to the end (the International Code of Zoological
 * Nomenclature, 4th ed., Arts. 5, 11.9, 51; the International Code of Nomenclature for algae,
 * fungi and plants, Arts. 23, 24, 46). Hybrid formulae and names of cultivated plants are not
 * taken apart; they are refused with a reason.
 */

export type ParsedName = {
  /** The name without authorship or qualifiers: "Lophelia pertusa", "Acesta excavata var. lata". */
  canonical: string;
  genus: string;
  specificEpithet: string | null;
  infraspecificRank: string | null;
  infraspecificEpithet: string | null;
  authorship: string | null;
  /** Open nomenclature: cf., aff., sp., spp., indet., nr. */
  qualifier: string | null;
  /** The rank the name's form shows: a binomial is a species, a trinomial below it. */
  impliedRank: 'species' | 'subspecies' | 'variety' | 'form' | null;
};

export type NameProblem = { code: 'bad_name'; message: string };

const qualifiers = new Map([
  ['cf.', 'cf.'],
  ['cf', 'cf.'],
  ['aff.', 'aff.'],
  ['aff', 'aff.'],
  ['sp.', 'sp.'],
  ['sp', 'sp.'],
  ['spp.', 'spp.'],
  ['spp', 'spp.'],
  ['indet.', 'indet.'],
  ['indet', 'indet.'],
  ['nr.', 'nr.'],
  ['nr', 'nr.'],
]);

/** Rank markers before an infraspecific epithet, written the usual way. */
const infraMarkers = new Map<string, { marker: string; rank: ParsedName['impliedRank'] }>([
  ['subsp.', { marker: 'subsp.', rank: 'subspecies' }],
  ['ssp.', { marker: 'subsp.', rank: 'subspecies' }],
  ['var.', { marker: 'var.', rank: 'variety' }],
  ['f.', { marker: 'f.', rank: 'form' }],
  ['forma', { marker: 'f.', rank: 'form' }],
]);

const uninomial = /^[A-Z][a-zë-]+$/;
const epithet = /^[a-zë][a-zë-]*$/;
/** Where authorship starts: a capital, "(Author", or a particle such as d', de, van, von. */
const authorStart = /^(\(|[A-ZÀ-Þ]|d'|(de|van|von|da|del|la|le)(\s|$))/;

export function parseScientificName(raw: string, givenAuthorship: string | null = null): ParsedName | NameProblem {
  const text = raw.replace(/\s+/g, ' ').trim();
  if (!text) return { code: 'bad_name', message: 'No scientific name' };
  if (/[×]| x /.test(text)) return { code: 'bad_name', message: 'Hybrid formulae are not taken apart; enter the parents separately' };
  const tokens = text.split(' ');
  const genus = tokens.shift()!;
  if (!uninomial.test(genus)) {
    return { code: 'bad_name', message: `"${genus}" does not read as a genus or other uninomial (a capital, then lower-case letters)` };
  }
  let qualifier: string | null = null;
  let specificEpithet: string | null = null;
  let infraspecificRank: string | null = null;
  let infraspecificEpithet: string | null = null;
  let impliedRank: ParsedName['impliedRank'] = null;
  // A subgenus in parentheses right after the genus is not part of the binomial.
  if (tokens[0] && /^\([A-Z][a-z]+\)$/.test(tokens[0])) tokens.shift();
  const take = () => tokens.shift();
  while (tokens.length > 0) {
    const t = tokens[0]!;
    const q = qualifiers.get(t);
    if (q) {
      if (qualifier) return { code: 'bad_name', message: `Two qualifiers (${qualifier} and ${q}); keep one` };
      qualifier = q;
      take();
      continue;
    }
    const infra = infraMarkers.get(t);
    if (infra && specificEpithet) {
      take();
      const e = take();
      if (!e || !epithet.test(e)) return { code: 'bad_name', message: `"${infra.marker}" is not followed by an epithet in lower case` };
      infraspecificRank = infra.marker;
      infraspecificEpithet = e;
      impliedRank = infra.rank;
      continue;
    }
    if (epithet.test(t) && !authorStart.test(t)) {
      if (!specificEpithet) {
        specificEpithet = t;
        impliedRank = 'species';
      } else if (!infraspecificEpithet) {
        // A zoological trinomial carries no rank marker.
        infraspecificEpithet = t;
        impliedRank = 'subspecies';
      } else {
        return { code: 'bad_name', message: `"${t}" follows a complete name; authorship starts with a capital letter` };
      }
      take();
      continue;
    }
    break;
  }
  let authorship = tokens.join(' ').trim() || null;
  if (authorship && !authorStart.test(authorship)) {
    return { code: 'bad_name', message: `"${authorship}" is neither an epithet (lower case) nor authorship (a capital or a parenthesis)` };
  }
  if (givenAuthorship?.trim()) {
    if (authorship && authorship !== givenAuthorship.trim()) {
      return {
        code: 'bad_name',
        message: `The name carries authorship "${authorship}" and the authorship column says "${givenAuthorship.trim()}"`,
      };
    }
    authorship = givenAuthorship.trim();
  }
  if (qualifier === 'sp.' || qualifier === 'spp.' || qualifier === 'indet.') {
    if (specificEpithet) return { code: 'bad_name', message: `"${qualifier}" stands for a missing epithet, yet one follows` };
    impliedRank = null;
  }
  const canonical = [genus, specificEpithet, infraspecificRank, infraspecificEpithet].filter(Boolean).join(' ');
  return {
    canonical,
    genus,
    specificEpithet,
    infraspecificRank,
    infraspecificEpithet,
    authorship,
    qualifier,
    impliedRank,
  };
}

export const isNameProblem = (p: ParsedName | NameProblem): p is NameProblem => 'code' in p;
