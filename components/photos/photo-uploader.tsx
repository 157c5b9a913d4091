import { useState } from 'react';
import { Platform, StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Text } from '@/components/ui/text';
import { useLayout } from '@/hooks/layout';
import { usePhotoUploads } from '@/hooks/photo-upload';
import { useTheme } from '@/hooks/theme';
import { photoLimits } from '@/lib/schemas';
import { space } from '@/lib/tokens';
import { DropZone } from './drop-zone';
import { pickPhotos } from './pick-photos';
import { UploadList } from './upload-list';

/** Adding photos to an entry: from the library (several at once), the camera, or dropped in. */
export function PhotoUploader({ observation }: { observation: { id: string; diveId: string } }) {
  const { colors } = useTheme();
  const { breakpoint } = useLayout();
  const uploads = usePhotoUploads(observation);
  const [problem, setProblem] = useState<string | null>(null);

  const pick = async (source: 'library' | 'camera') => {
    setProblem(null);
    try {
      const files = await pickPhotos(source);
      if (files.length > photoLimits.maxFiles) setProblem(`Only the first ${photoLimits.maxFiles} photos were taken.`);
      if (files.length > 0) uploads.add(files.slice(0, photoLimits.maxFiles));
    } catch (err) {
      setProblem(err instanceof Error ? err.message : 'The photos could not be opened.');
    }
  };

  const dropping = Platform.OS === 'web' && breakpoint !== 'phone';
  return (
    <DropZone enabled={dropping} onFiles={(files) => uploads.add(files)}>
      <View style={styles.wrap}>
        <View style={styles.buttons}>
          <Button label="Add photos" icon="+" tone="secondary" compact onPress={() => void pick('library')} testID="add-photos" />
          <Button label="Take photo" tone="secondary" compact onPress={() => void pick('camera')} testID="take-photo" />
        </View>
        <Text variant="caption" muted>
          {dropping ? 'Or drop photos here. ' : ''}JPEG, PNG or WebP, up to {photoLimits.maxBytes / (1024 * 1024)} MB each.
        </Text>
        {problem ? (
          <Text variant="caption" color={colors.danger} role="alert">
            {problem}
          </Text>
        ) : null}
        <UploadList items={uploads.items} onCancel={uploads.cancel} onRetry={uploads.retry} />
      </View>
    </DropZone>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.sm },
  buttons: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
});
