import type { ReactNode } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';

import { kindLabels } from '@/components/observations/kind-badge';
import { Text } from '@/components/ui/text';
import { useTheme } from '@/hooks/theme';
import type { ObservationKind } from '@/lib/schemas';
import { space } from '@/lib/tokens';

/** Touch target of a marker: big enough for a thumb where the entries are not crowded. */
export const MARKER_TARGET = 28;

type MarkerProps = {
  x: number;
  y: number;
  kind: ObservationKind;
  label: string;
  onPress: () => void;
  testID: string;
  /** Drawn as a ring: the entry has no value to place it by on this axis. */
  hollow?: boolean;
  size?: number;
  /** Side of the touch target; smaller where markers crowd (see `targetSizes`). */
  target?: number;
};

/** An entry on a plot: a dot in the colour of its kind, that opens the entry. */
export function PlotMarker({ x, y, kind, label, onPress, testID, hollow, size = 12, target = MARKER_TARGET }: MarkerProps) {
  const { colors } = useTheme();
  const tint = colors.kind[kind];
  return (
    <Pressable
      testID={testID}
      accessibilityRole="button"
      accessibilityLabel={label}
      onPress={onPress}
      style={({ pressed, hovered }: { pressed: boolean; hovered?: boolean }) => [
        styles.target,
        { left: x - target / 2, top: y - target / 2, width: target, height: target, transform: [{ scale: pressed || hovered ? 1.35 : 1 }] },
      ]}
    >
      <View
        style={{
          width: size,
          height: size,
          borderRadius: size / 2,
          backgroundColor: hollow ? colors.surface : tint,
          borderColor: hollow ? tint : colors.surface,
          borderWidth: hollow ? 2 : 1.5,
        }}
      />
    </Pressable>
  );
}

/** A label placed on a plot, centred on (x, y) or, with `align`, starting or ending there. */
export function PlotLabel({
  x,
  y,
  children,
  align = 'center',
  muted = true,
  width = 72,
  testID,
}: {
  x: number;
  y: number;
  children: ReactNode;
  align?: 'left' | 'center' | 'right';
  muted?: boolean;
  width?: number;
  testID?: string;
}) {
  const left = align === 'center' ? x - width / 2 : align === 'right' ? x - width : x;
  return (
    <View pointerEvents="none" testID={testID} style={[styles.label, { left, top: y - 8, width }]}>
      <Text variant="caption" muted={muted} numberOfLines={1} style={{ textAlign: align }}>
        {children}
      </Text>
    </View>
  );
}

/** Which colour is which kind, for the kinds a plot shows. */
export function KindLegend({ kinds }: { kinds: ObservationKind[] }) {
  const { colors } = useTheme();
  if (kinds.length === 0) return null;
  return (
    <View style={styles.legend}>
      {kinds.map((k) => (
        <View key={k} style={styles.legendItem}>
          <View style={[styles.dot, { backgroundColor: colors.kind[k] }]} />
          <Text variant="caption" muted>
            {kindLabels[k]}
          </Text>
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  target: { position: 'absolute', alignItems: 'center', justifyContent: 'center' },
  label: { position: 'absolute', height: 16 },
  legend: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  legendItem: { flexDirection: 'row', alignItems: 'center', gap: space.xs },
  dot: { width: 10, height: 10, borderRadius: 5 },
});
