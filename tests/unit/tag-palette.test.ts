import { describe, expect, it } from 'vitest';

import { fnv1a, palettes, tagColors, tagPalette } from '@/lib/tokens';

/**
 * Relative luminance and contrast ratio as WCAG 2.1 defines them (W3C Recommendation, 2018:
 * definitions of "relative luminance" and "contrast ratio"; success criterion 1.4.3 asks 4.5:1
 * for normal text).
 */
function luminance(hex: string): number {
  const [r, g, b] = [1, 3, 5].map((i) => {
    const c = parseInt(hex.slice(i, i + 2), 16) / 255;
    return c <= 0.03928 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
  });
  return 0.2126 * r! + 0.7152 * g! + 0.0722 * b!;
}
function contrast(a: string, b: string): number {
  const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x);
  return (hi! + 0.05) / (lo! + 0.05);
}

describe('the contrast check itself', () => {
  it('gives 21:1 for black on white and 1:1 for a colour on itself (WCAG 2.1, definition of contrast ratio)', () => {
    expect(contrast('#000000', '#ffffff')).toBeCloseTo(21, 5);
    expect(contrast('#777777', '#777777')).toBe(1);
  });
});

describe('the tag hash', () => {
  // 32-bit FNV-1a test vectors of the FNV reference test suite (Fowler, Noll and Vo; IETF
  // draft-eastlake-fnv), from memory.
  it.each([
    ['', 0x811c9dc5],
    ['a', 0xe40c292c],
    ['foobar', 0xbf9cf968],
  ])('hashes %j as the reference does', (text, hash) => {
    expect(fnv1a(text)).toBe(hash);
  });
});

describe('tag colours', () => {
  it('are the same for a tag however it is cased or spaced, as the server matches tag names', () => {
    expect(tagColors('Microbial-Mat ', 'light')).toEqual(tagColors('microbial-mat', 'light'));
    expect(tagColors('HULL', 'dark')).toEqual(tagColors('hull', 'dark'));
  });

  it('come from one swatch in both themes', () => {
    for (const name of ['a', 'b', 'sponge', 'Fe-oxide crust']) {
      const swatch = tagPalette.find((s) => s.light.fg === tagColors(name, 'light').fg)!;
      expect(swatch.dark).toEqual(tagColors(name, 'dark'));
    }
  });

  it('spread names over every swatch, none taking more than twice its share', () => {
    const counts = new Map<string, number>();
    for (let i = 0; i < 2000; i++) {
      const { fg } = tagColors(`tag-${i}`, 'light');
      counts.set(fg, (counts.get(fg) ?? 0) + 1);
    }
    expect(counts.size).toBe(tagPalette.length);
    for (const n of counts.values()) expect(n).toBeLessThan((2 * 2000) / tagPalette.length);
  });

  it('has distinct colours within each theme', () => {
    for (const scheme of ['light', 'dark'] as const) {
      expect(new Set(tagPalette.map((s) => s[scheme].fg)).size).toBe(tagPalette.length);
      expect(new Set(tagPalette.map((s) => s[scheme].bg)).size).toBe(tagPalette.length);
    }
  });

  it.each(tagPalette.map((s) => [s.name, s] as const))('keeps the %s name readable at 4.5:1 in both themes (WCAG 2.1, 1.4.3)', (_, s) => {
    for (const scheme of ['light', 'dark'] as const) {
      const { fg, bg } = s[scheme];
      const theme = palettes[scheme];
      expect(contrast(fg, bg)).toBeGreaterThanOrEqual(4.5);
      for (const behind of [theme.surface, theme.surfaceAlt, theme.bg]) expect(contrast(fg, behind)).toBeGreaterThanOrEqual(4.5);
    }
  });
});
