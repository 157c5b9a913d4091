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
  medium: 'PublicSans_500Medium',
  semibold: 'PublicSans_600SemiBold',
  bold: 'PublicSans_700Bold',
  mono: 'SpaceMono_400Regular',
  monoBold: 'SpaceMono_700Bold',
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
