import { StyleSheet, View } from 'react-native';

import { Chip } from '@/components/ui/chip';
import { Text } from '@/components/ui/text';
import { space } from '@/lib/tokens';
import { optionalColumns, type ColumnId } from './log-columns';

/** The table's optional columns, each switched on or off; the choice is the person's own. */
export function ColumnMenu({ chosen, onToggle }: { chosen: readonly ColumnId[]; onToggle: (id: ColumnId) => void }) {
  return (
    <View style={styles.wrap} testID="column-menu" role="group" aria-label="Columns of the table">
      <Text variant="caption" muted>
        Also show
      </Text>
      {optionalColumns.map((c) => (
        <Chip
          key={c.id}
          label={c.name ?? c.label}
          selected={chosen.includes(c.id)}
          onPress={() => onToggle(c.id)}
          testID={`column-toggle-${c.id}`}
        />
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.sm },
});
