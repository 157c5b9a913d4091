/**
 * Where the app's WOFF2 faces are served (hooks/fonts.web.ts declares them once someone is signed
 * in). Apart from it so that the sign-in screen does not load the asset code that resolves them.
 */
import { Asset } from 'expo-asset';

import PublicSans_400Regular from '@/assets/fonts/PublicSans_400Regular.woff2';
import PublicSans_600SemiBold from '@/assets/fonts/PublicSans_600SemiBold.woff2';
import PublicSans_700Bold from '@/assets/fonts/PublicSans_700Bold.woff2';
import SpaceMono_400Regular from '@/assets/fonts/SpaceMono_400Regular.woff2';
import type { fonts } from '@/lib/tokens';

export type Family = (typeof fonts)[keyof typeof fonts];

const faces: Record<Family, number> = {
  PublicSans_400Regular,
  PublicSans_600SemiBold,
  PublicSans_700Bold,
  SpaceMono_400Regular,
};

export function faceUrls(): Record<Family, string> {
  return {
    PublicSans_400Regular: Asset.fromModule(faces.PublicSans_400Regular).uri,
    PublicSans_600SemiBold: Asset.fromModule(faces.PublicSans_600SemiBold).uri,
    PublicSans_700Bold: Asset.fromModule(faces.PublicSans_700Bold).uri,
    SpaceMono_400Regular: Asset.fromModule(faces.SpaceMono_400Regular).uri,
  };
}
