import { useEffect, useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Text } from '@/components/ui/text';
import type { UploadItem } from '@/hooks/photo-upload';
import { useTheme } from '@/hooks/theme';
import { radius, space } from '@/lib/tokens';
import { PhotoImage } from './photo-image';

type Props = { items: UploadItem[]; onCancel: (id: string) => void; onRetry: (id: string) => void };

/** Files on their way up: a preview, a progress bar, and cancel or retry for each. */
export function UploadList({ items, onCancel, onRetry }: Props) {
  if (items.length === 0) return null;
  return (
    <View style={styles.list} testID="upload-list">
      {items.map((item) => (
        <UploadRow key={item.id} item={item} onCancel={() => onCancel(item.id)} onRetry={() => onRetry(item.id)} />
      ))}
    </View>
  );
}

function useSecondsUntil(at: number | undefined): number | null {
  const [now, setNow] = useState(() => Date.now());
  useEffect(() => {
    if (at === undefined) return;
    const timer = setInterval(() => setNow(Date.now()), 500);
    return () => clearInterval(timer);
  }, [at]);
  return at === undefined ? null : Math.max(0, Math.ceil((at - now) / 1000));
}

function UploadRow({ item, onCancel, onRetry }: { item: UploadItem; onCancel: () => void; onRetry: () => void }) {
  const { colors } = useTheme();
  const seconds = useSecondsUntil(item.status === 'waiting' ? item.retryAt : undefined);
  const percent = Math.round(item.progress * 100);
  const status = {
    queued: 'Waiting to send…',
    uploading: `Sending… ${percent} %`,
    waiting: `Link dropped; trying again in ${seconds ?? 0} s`,
    failed: item.error ?? 'Not sent.',
    done: 'Uploaded',
  }[item.status];
  const barColour = item.status === 'failed' ? colors.danger : item.status === 'done' ? colors.success : colors.accent;

  return (
    <View style={[styles.row, { borderColor: colors.border, backgroundColor: colors.surface }]} testID="upload-item">
      <View style={[styles.preview, { backgroundColor: colors.surfaceAlt }]}>
        <PhotoImage uri={item.previewUri} label={`Preview of ${item.name}`} />
      </View>
      <View style={styles.body}>
        <Text variant="label" numberOfLines={1}>
          {item.name}
        </Text>
        <View
          style={[styles.track, { backgroundColor: colors.surfaceAlt }]}
          role="progressbar"
          aria-label={`Upload of ${item.name}`}
          aria-valuemin={0}
          aria-valuemax={100}
          aria-valuenow={percent}
          testID="upload-progress"
        >
          <View style={[styles.fill, { width: `${percent}%`, backgroundColor: barColour }]} />
        </View>
        <Text
          variant="caption"
          color={item.status === 'failed' ? colors.danger : undefined}
          muted={item.status !== 'failed'}
          testID={item.status === 'done' ? 'upload-done' : 'upload-status'}
          role={item.status === 'failed' ? 'alert' : undefined}
        >
          {status}
        </Text>
      </View>
      <View style={styles.actions}>
        {item.status === 'failed' || item.status === 'waiting' ? (
          <Button label="Retry" tone="secondary" compact onPress={onRetry} testID="upload-retry" />
        ) : null}
        {item.status !== 'done' ? (
          <Button label={item.status === 'failed' ? 'Remove' : 'Cancel'} tone="ghost" compact onPress={onCancel} testID="upload-cancel" />
        ) : null}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  list: { gap: space.sm },
  row: { flexDirection: 'row', alignItems: 'center', gap: space.md, borderWidth: 1, borderRadius: radius.md, padding: space.sm },
  preview: { width: 56, height: 56, borderRadius: radius.sm, overflow: 'hidden', position: 'relative' },
  body: { flex: 1, gap: 4 },
  track: { height: 6, borderRadius: 3, overflow: 'hidden' },
  fill: { height: 6, borderRadius: 3 },
  actions: { flexDirection: 'row', gap: space.xs },
});
