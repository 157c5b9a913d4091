import { StyleSheet, View } from 'react-native';

import { Text } from '@/components/ui/text';
import type { LiveStatus } from '@/hooks/live';
import { useTheme } from '@/hooks/theme';
import { space } from '@/lib/tokens';

const labels: Record<LiveStatus, string> = { live: 'Live', connecting: 'Reconnecting…', offline: 'Not live' };

/** Whether the dive log is following the stream: readers on a thin link need to know. */
export function LiveStatusBadge({ status }: { status: LiveStatus }) {
  const { colors } = useTheme();
  const tint = status === 'live' ? colors.success : status === 'connecting' ? colors.warning : colors.textMuted;
  return (
    <View style={styles.row} testID="live-status" accessibilityLabel={`Live updates: ${labels[status]}`} aria-live="polite">
      <View style={[styles.dot, { backgroundColor: tint }]} />
      <Text variant="caption" color={tint} testID={`live-status-${status}`}>
        {labels[status]}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', alignItems: 'center', gap: space.xs },
  dot: { width: 8, height: 8, borderRadius: 4 },
});
