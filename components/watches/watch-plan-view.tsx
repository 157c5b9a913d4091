import { StyleSheet, View } from 'react-native';

import { EmptyState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import type { WatchPlan } from '@/lib/schemas';
import { space } from '@/lib/tokens';

/** The watch plan as members read it. */
export function WatchPlanView({ plan }: { plan: WatchPlan }) {
  if (plan.watches.length === 0) return <EmptyState title="No watches are kept" body="A campaign lead sets the watch plan." />;
  return (
    <View style={styles.box} testID="watch-plan">
      <Text muted>{`Times in ${plan.timeZone}, daily.`}</Text>
      {plan.watches.map((w) => (
        <View key={w.id} style={styles.row} testID="watch-plan-row">
          <Text variant="label">{`${w.name} ${w.start}–${w.end}`}</Text>
          <Text muted>{w.members.map((m) => m.name).join(', ') || 'Nobody named'}</Text>
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: space.sm },
  row: { flexDirection: 'row', flexWrap: 'wrap', columnGap: space.md },
});
