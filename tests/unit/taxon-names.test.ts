/**
 * Reading scientific names. The expected parts follow the codes' conventions (International Code
 * of Zoological Nomenclature, 4th ed., 1999: Art. 5 binomial, Art. 11.9 lower-case epithets, Art.
 * 45.5 trinomials without a rank marker, Art. 51 authorship and parentheses; International Code of
 * Nomenclature for algae, fungi and plants, Shenzhen 2018: Arts. 23–24 binary names and
 * infraspecific ranks "subsp.", "var.", "f.") and the open-nomenclature qualifiers as Darwin
 * Core's identificationQualifier examples give them ("cf.", "aff.", "sp."). Worked here by hand.
 */
import { describe, expect, it } from 'vitest';

import { isNameProblem, parseScientificName, type ParsedName } from '@/lib/taxon-names';

const ok = (raw: string, authorship: string | null = null): ParsedName => {
  const p = parseScientificName(raw, authorship);
  if (isNameProblem(p)) throw new Error(p.message);
  return p;
};

describe('parseScientificName', () => {
  it('splits a binomial with authorship in parentheses', () => {
    expect(ok('Lophelia pertusa (Linnaeus, 1758)')).toEqual({
      canonical: 'Lophelia pertusa',
      genus: 'Lophelia',
      specificEpithet: 'pertusa',
      infraspecificRank: null,
      infraspecificEpithet: null,
      authorship: '(Linnaeus, 1758)',
      qualifier: null,
      impliedRank: 'species',
    });
  });

  it('reads a botanical infraspecific rank and normalises "ssp." to "subsp."', () => {
    expect(ok('Acesta excavata var. lata')).toMatchObject({
      canonical: 'Acesta excavata var. lata',
      infraspecificRank: 'var.',
      infraspecificEpithet: 'lata',
      impliedRank: 'variety',
    });
    expect(ok('Fucus vesiculosus ssp. evesiculosus')).toMatchObject({
      canonical: 'Fucus vesiculosus subsp. evesiculosus',
      infraspecificRank: 'subsp.',
      impliedRank: 'subspecies',
    });
  });

  it('reads a zoological trinomial, which has no rank marker', () => {
    expect(ok('Gadus morhua callarias Linnaeus, 1758')).toMatchObject({
      canonical: 'Gadus morhua callarias',
      infraspecificRank: null,
      infraspecificEpithet: 'callarias',
      authorship: 'Linnaeus, 1758',
      impliedRank: 'subspecies',
    });
  });

  it('keeps open nomenclature in its own field, out of the name', () => {
    expect(ok('Paragorgia cf. arborea')).toMatchObject({ canonical: 'Paragorgia arborea', qualifier: 'cf.', specificEpithet: 'arborea' });
    expect(ok('Munida sp.')).toMatchObject({ canonical: 'Munida', qualifier: 'sp.', specificEpithet: null, impliedRank: null });
    expect(ok('Munida aff')).toMatchObject({ qualifier: 'aff.' });
  });

  it('drops a subgenus in parentheses from the binomial', () => {
    expect(ok('Buccinum (Buccinum) undatum')).toMatchObject({ canonical: 'Buccinum undatum', specificEpithet: 'undatum' });
  });

  it('takes a uninomial and the authorship column', () => {
    expect(ok('Primnoidae', 'Milne Edwards, 1857')).toMatchObject({
      canonical: 'Primnoidae',
      specificEpithet: null,
      authorship: 'Milne Edwards, 1857',
      impliedRank: null,
    });
    expect(ok('Hydrozoa van Beneden')).toMatchObject({ authorship: 'van Beneden' });
  });

  it.each([
    ['', 'No scientific name'],
    ['lophelia pertusa', 'does not read as a genus'],
    ['Munida sp. rugosa', 'stands for a missing epithet'],
    ['Munida cf. aff. rugosa', 'Two qualifiers'],
    ['Salix alba × fragilis', 'Hybrid formulae'],
    ['Acesta excavata var. Lata', 'is not followed by an epithet in lower case'],
    ['Lophelia pertusa 1758', 'neither an epithet'],
  ])('refuses %j', (raw, why) => {
    const p = parseScientificName(raw);
    expect(isNameProblem(p) && p.message).toContain(why);
  });

  it('refuses authorship given twice and differently', () => {
    const p = parseScientificName('Lophelia pertusa Linnaeus', 'Smith');
    expect(isNameProblem(p)).toBe(true);
  });
});
