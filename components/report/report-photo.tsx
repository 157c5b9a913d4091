import { Image, StyleSheet } from 'react-native';

import { apiUrl } from '@/hooks/api';
import type { Photo } from '@/lib/schemas';

/** An entry's photo in the report, at display size. */
export function ReportPhoto({ photo, label }: { photo: Photo; label: string }) {
  return (
    <Image
      source={{ uri: apiUrl(photo.urls.display) }}
      accessibilityLabel={label}
      style={[styles.photo, { aspectRatio: photo.width / photo.height }]}
      testID="report-photo"
    />
  );
}

const styles = StyleSheet.create({ photo: { width: 240, maxWidth: '100%' } });
