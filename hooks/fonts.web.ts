/**
 * The app's fonts in a browser: WOFF2 files cut to the characters the app writes
 * (scripts/fonts-woff2.ts), declared as `@font-face` rules. A browser fetches a face only when
 * some text on the page first uses it, and `font-display: swap` draws the text at once in a
 * stand-in font while a face is on its way over a slow link.
 * Before anyone signs in, the faces are the device's own sans-serif fonts under the app's family
 * names: the three Public Sans faces are a sixth of what a cold sign-in screen moves over a
 * satellite link, so they are declared only once someone is signed in.
 */
import { useEffect } from 'react';

import PublicSans_400Regular from '@/assets/fonts/PublicSans_400Regular.woff2';
import PublicSans_600SemiBold from '@/assets/fonts/PublicSans_600SemiBold.woff2';
import PublicSans_700Bold from '@/assets/fonts/PublicSans_700Bold.woff2';
import SpaceMono_400Regular from '@/assets/fonts/SpaceMono_400Regular.woff2';
import type { fonts } from '@/lib/tokens';

type Family = (typeof fonts)[keyof typeof fonts];

/**
 * Each face's address. In a web build a font file's module is its address (Metro's web asset
 * transform), so no asset code has to load before the sign-in screen to resolve it.
 */
const address = (file: unknown): string => (typeof file === 'string' ? file : String((file as { uri?: unknown }).uri));
const faceUrls: Record<Family, string> = {
  PublicSans_400Regular: address(PublicSans_400Regular),
  PublicSans_600SemiBold: address(PublicSans_600SemiBold),
  PublicSans_700Bold: address(PublicSans_700Bold),
  SpaceMono_400Regular: address(SpaceMono_400Regular),
};

/** The device's fonts that stand in before sign-in, by weight (local() names as fonts publish them). */
const standIns: Record<Family, string[]> = {
  PublicSans_400Regular: ['Arial', 'ArialMT', 'Helvetica', 'Roboto', 'Liberation Sans', 'DejaVu Sans'],
  PublicSans_600SemiBold: ['Arial Bold', 'Arial-BoldMT', 'Helvetica Bold', 'Roboto Medium', 'Liberation Sans Bold', 'DejaVu Sans Bold'],
  PublicSans_700Bold: ['Arial Bold', 'Arial-BoldMT', 'Helvetica Bold', 'Roboto Bold', 'Liberation Sans Bold', 'DejaVu Sans Bold'],
  SpaceMono_400Regular: ['Courier New', 'Menlo', 'Roboto Mono', 'Liberation Mono', 'DejaVu Sans Mono'],
};

const STYLE_ID = 'bathynote-fonts';

/** `@font-face` rules for the four families: each one's file when `urls` is given, else the stand-ins. */
function declareFaces(urls?: Record<Family, string>) {
  const own = !!urls;
  if (typeof document === 'undefined') return;
  let style = document.getElementById(STYLE_ID);
  if (style?.dataset.own === 'true' || (style && !own)) return;
  if (!style) {
    style = document.createElement('style');
    style.id = STYLE_ID;
    document.head.appendChild(style);
  }
  style.dataset.own = String(own);
  style.textContent = (Object.keys(standIns) as Family[])
    .map((family) => {
      const src = urls
        ? `url(${JSON.stringify(urls[family])}) format("woff2")`
        : standIns[family].map((name) => `local(${JSON.stringify(name)})`).join(',');
      return `@font-face{font-family:${JSON.stringify(family)};src:${src};font-display:swap}`;
    })
    .join('\n');
}

declareFaces();

/** Always true: nothing waits for a font in a browser. */
export function useAppFonts(): boolean {
  return true;
}

/** The app's own faces from the first time someone is signed in on this page (stand-ins until then). */
export function useOwnFaces(signedIn: boolean): void {
  useEffect(() => {
    if (signedIn) declareFaces(faceUrls);
  }, [signedIn]);
}
