/**
 * Bathynote's design tokens: one place for colours (light and dark), spacing, type and radii.
 * The palette is our own: "abyss" blues for the dark control room, a paper white for daylight,
 * and a cyan signal colour for the one thing to press.
 */
import type { ObservationKind } from './schemas';

export type Palette = {
  bg: string;
  surface: string;
  surfaceAlt: string;
  border: string;
  text: string;
  textMuted: string;
  accent: string;
  accentText: string;
  danger: string;
  dangerBg: string;
  warning: string;
  success: string;
  focus: string;
  kind: Record<ObservationKind, string>;
};

export const palettes: Record<'light' | 'dark', Palette> = {
  light: {
    bg: '#f4f1ea',
    surface: '#fffdf8',
    surfaceAlt: '#ebe6db',
    border: '#d3ccbd',
    text: '#13212b',
    textMuted: '#53626b',
    accent: '#006d77',
    accentText: '#ffffff',
    danger: '#a3262a',
    dangerBg: '#fbe4e2',
    warning: '#8a5a00',
    success: '#2c6e3f',
    focus: '#0096a6',
    kind: { biology: '#2e7d4f', archaeology: '#a0611c', environment: '#2f62a8', operations: '#6b4fa0' },
  },
  dark: {
    bg: '#07141d',
    surface: '#0d2130',
    surfaceAlt: '#13303f',
    border: '#21465a',
    text: '#e3edf0',
    textMuted: '#93aab4',
    accent: '#3fd0d4',
    accentText: '#03262a',
    danger: '#ff8a80',
    dangerBg: '#3b1618',
    warning: '#f2c14e',
    success: '#7bd88f',
    focus: '#7ae7ea',
    kind: { biology: '#6ddc9a', archaeology: '#f0a860', environment: '#7fb2ff', operations: '#c3a6ff' },
  },
};

export const space = { xs: 4, sm: 8, md: 12, lg: 16, xl: 24, xxl: 32 } as const;
export const radius = { sm: 6, md: 10, lg: 16, pill: 999 } as const;

export const fonts = {
  regular: 'PublicSans_400Regular',
  semibold: 'PublicSans_600SemiBold',
  bold: 'PublicSans_700Bold',
  mono: 'SpaceMono_400Regular',
} as const;

export const type = {
  caption: { fontSize: 12, lineHeight: 16 },
  body: { fontSize: 15, lineHeight: 22 },
  label: { fontSize: 13, lineHeight: 18 },
  title: { fontSize: 18, lineHeight: 24 },
  heading: { fontSize: 24, lineHeight: 30 },
} as const;

/** Width limits of the three layouts, in CSS pixels. */
export const breakpoints = { tablet: 700, wide: 1100 } as const;

/* ---- tag colours ---- */

/** One tag colour: `fg` for the name and the outline, `bg` for the fill behind it. */
export type TagSwatch = { name: string; light: { fg: string; bg: string }; dark: { fg: string; bg: string } };

/**
 * Our own eight tag colours, named after things on a wreck site. Every `fg` reads at 4.5:1 or
 * better on its own `bg` and on the theme's surfaces, so a tag's name stays legible in either
 * theme; the colour only helps the eye group tags, the name always says which tag it is.
 */
export const tagPalette: readonly TagSwatch[] = [
  { name: 'kelp', light: { fg: '#1f5e3a', bg: '#dcefe2' }, dark: { fg: '#8fe0ae', bg: '#143526' } },
  { name: 'brine', light: { fg: '#0f5872', bg: '#d8ecf3' }, dark: { fg: '#86d3ee', bg: '#0f3442' } },
  { name: 'rust', light: { fg: '#8a3b12', bg: '#f8e1d3' }, dark: { fg: '#f5ab83', bg: '#3f2014' } },
  { name: 'anemone', light: { fg: '#8a2160', bg: '#f6dcea' }, dark: { fg: '#f2a0cf', bg: '#3c1630' } },
  { name: 'lantern', light: { fg: '#6b5200', bg: '#f4eac4' }, dark: { fg: '#e8cd6e', bg: '#362c0c' } },
  { name: 'slate', light: { fg: '#3d3f8f', bg: '#e2e2f6' }, dark: { fg: '#b0b4f5', bg: '#23254a' } },
  { name: 'ember', light: { fg: '#9a2a33', bg: '#f9dfe0' }, dark: { fg: '#ff9ea5', bg: '#411a1e' } },
  { name: 'lichen', light: { fg: '#4a5a12', bg: '#e8eecb' }, dark: { fg: '#c6db79', bg: '#2b3210' } },
];

/** 32-bit FNV-1a over the UTF-16 code units: small, fast and the same on every device. */
export function fnv1a(text: string): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < text.length; i++) {
    h ^= text.charCodeAt(i);
    h = Math.imul(h, 0x01000193) >>> 0;
  }
  return h >>> 0;
}

/**
 * A tag's colour in a theme. It depends on the name alone (trimmed, any case), as the server
 * matches tags, so a tag looks the same on every screen and for everyone in the campaign.
 */
export function tagColors(tag: string, scheme: 'light' | 'dark'): { fg: string; bg: string } {
  const swatch = tagPalette[fnv1a(tag.trim().toLowerCase()) % tagPalette.length]!;
  return swatch[scheme];
}
