import { StyleSheet, View } from 'react-native';

import { Text } from '@/components/ui/text';
import { useTheme } from '@/hooks/theme';
import type { ObservationKind } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';

export const kindLabels: Record<ObservationKind, string> = {
  biology: 'Biology',
  archaeology: 'Archaeology',
  environment: 'Environment',
  operations: 'Operations',
};

export function KindBadge({ kind }: { kind: ObservationKind }) {
  const { colors } = useTheme();
  const tint = colors.kind[kind];
  return (
    <View style={[styles.badge, { borderColor: tint }]} testID={`kind-${kind}`}>
      <View style={[styles.dot, { backgroundColor: tint }]} />
      <Text variant="caption" color={tint}>
        {kindLabels[kind]}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  badge: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: space.xs,
    borderWidth: 1,
    borderRadius: radius.pill,
    paddingHorizontal: space.sm,
    paddingVertical: 1,
  },
  dot: { width: 8, height: 8, borderRadius: 4 },
});
