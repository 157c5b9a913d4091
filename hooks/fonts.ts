/**
 * The app's fonts on iOS and Android: the TrueType files, loaded before the first screen draws
 * (the web has its own way, in fonts.web.ts).
 */
import { useFonts } from 'expo-font';

import PublicSans_400Regular from '@/assets/fonts/PublicSans_400Regular.ttf';
import PublicSans_600SemiBold from '@/assets/fonts/PublicSans_600SemiBold.ttf';
import PublicSans_700Bold from '@/assets/fonts/PublicSans_700Bold.ttf';
import SpaceMono_400Regular from '@/assets/fonts/SpaceMono_400Regular.ttf';

/** True once the screens may draw: the fonts are loaded, or failed to (then the system font stands in). */
export function useAppFonts(): boolean {
  const [loaded, error] = useFonts({ PublicSans_400Regular, PublicSans_600SemiBold, PublicSans_700Bold, SpaceMono_400Regular });
  return loaded || !!error;
}

/** The TrueType faces are part of the app here, loaded before the first screen (fonts.web.ts waits for sign-in). */
export function useOwnFaces(_signedIn: boolean): void {}
