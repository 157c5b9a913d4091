/**
 * The app's fonts in a browser: WOFF2 files cut to the characters the app writes
 * (scripts/fonts-woff2.ts), declared as `@font-face` rules. A browser fetches a face only when
 * some text on the page first uses it, so the sign-in screen never waits for the monospace face,
 * and `font-display: swap` draws the text at once in a stand-in font while a face is on its way
 * over a slow link, instead of holding the first screen back for every font.
 */
import { Asset } from 'expo-asset';

import PublicSans_400Regular from '@/assets/fonts/PublicSans_400Regular.woff2';
import PublicSans_600SemiBold from '@/assets/fonts/PublicSans_600SemiBold.woff2';
import PublicSans_700Bold from '@/assets/fonts/PublicSans_700Bold.woff2';
import SpaceMono_400Regular from '@/assets/fonts/SpaceMono_400Regular.woff2';
import type { fonts } from '@/lib/tokens';

const faces: Record<(typeof fonts)[keyof typeof fonts], number> = {
  PublicSans_400Regular,
  PublicSans_600SemiBold,
  PublicSans_700Bold,
  SpaceMono_400Regular,
};

const STYLE_ID = 'bathynote-fonts';

function declareFaces() {
  if (typeof document === 'undefined' || document.getElementById(STYLE_ID)) return;
  const style = document.createElement('style');
  style.id = STYLE_ID;
  style.textContent = Object.entries(faces)
    .map(
      ([family, asset]) =>
        `@font-face{font-family:${JSON.stringify(family)};src:url(${JSON.stringify(Asset.fromModule(asset).uri)}) format("woff2");font-display:swap}`,
    )
    .join('\n');
  document.head.appendChild(style);
}

declareFaces();

/** Always true: nothing waits for a font in a browser. */
export function useAppFonts(): boolean {
  return true;
}
