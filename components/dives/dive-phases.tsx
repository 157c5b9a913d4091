import { StyleSheet, View } from 'react-native';

import { Text } from '@/components/ui/text';
import { useTheme } from '@/hooks/theme';
import { formatUtcTime } from '@/lib/format';
import type { Dive } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';
import { phaseLabels } from '@/lib/dive-phases';

/** The dive's four phases in a row, the ones not reached yet left blank. */
export function DivePhases({ dive }: { dive: Dive }) {
  const { colors } = useTheme();
  return (
    <View style={[styles.row, { borderColor: colors.border, backgroundColor: colors.surface }]} testID="dive-phases">
      {phaseLabels.map(([key, label]) => {
        const at = dive.phases[key];
        return (
          <View key={key} style={styles.cell}>
            <Text variant="caption" muted>
              {label}
            </Text>
            <Text variant="monoSmall" color={at ? colors.text : colors.textMuted}>
              {at ? formatUtcTime(at) : '—'}
            </Text>
          </View>
        );
      })}
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', borderWidth: 1, borderRadius: radius.md, paddingVertical: space.sm },
  cell: { flex: 1, alignItems: 'center', gap: 2 },
});
