import { Image, StyleSheet } from 'react-native';

import type { PhotoImageProps } from './photo-image-props';

/** A photo file on a device; the web build uses a lazily loaded image element instead. */
export function PhotoImage({ uri, label, fit = 'cover', testID, onLoad }: PhotoImageProps) {
  return (
    <Image source={{ uri }} accessibilityLabel={label} resizeMode={fit} style={StyleSheet.absoluteFill} testID={testID} onLoad={onLoad} />
  );
}
