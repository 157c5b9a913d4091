import { StyleSheet, View } from 'react-native';

import { Text } from '@/components/ui/text';
import type { LiveStatus } from '@/hooks/live';
import { useTheme } from '@/hooks/theme';
import { space } from '@/lib/tokens';

const labels: Record<LiveStatus, string> = { live: 'Live', connecting: 'Reconnecting…', offline: 'Not live' };
/** After the dive: colleagues may still log from the video, so the stream stays open, but nothing is "live". */
const endedLabels: Record<LiveStatus, string> = { live: 'Updates on', connecting: 'Reconnecting…', offline: 'No updates' };

/** Whether the dive log is following the stream: readers on a thin link need to know. */
export function LiveStatusBadge({ status, ended = false }: { status: LiveStatus; ended?: boolean }) {
  const { colors } = useTheme();
  const tint = ended ? colors.textMuted : status === 'live' ? colors.success : status === 'connecting' ? colors.warning : colors.textMuted;
  const text = (ended ? endedLabels : labels)[status];
  return (
    <View style={styles.row} testID="live-status" accessibilityLabel={`Updates: ${text}`} aria-live="polite">
      {ended ? null : <View style={[styles.dot, { backgroundColor: tint }]} />}
      <Text variant="caption" color={tint} testID={`live-status-${status}`}>
        {text}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', alignItems: 'center', gap: space.xs },
  dot: { width: 8, height: 8, borderRadius: 4 },
});
