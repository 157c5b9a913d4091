import { StyleSheet, View } from 'react-native';

import { Text } from '@/components/ui/text';
import { useTheme } from '@/hooks/theme';
import { useWatchPlan } from '@/hooks/watches';
import { formatUtcTime } from '@/lib/format';
import { radius, space } from '@/lib/tokens';

/** One line: the watch on now and who stands it, or nothing when the campaign keeps no watches. */
export function OnWatch({ campaignId }: { campaignId: string }) {
  const { colors } = useTheme();
  const plan = useWatchPlan(campaignId);
  if (!plan.data || plan.data.watches.length === 0) return null;
  const on = plan.data.onWatch;
  const who = on?.members.map((m) => m.name).join(', ') || 'nobody named';
  return (
    <View style={[styles.box, { borderColor: colors.border, backgroundColor: colors.surface }]} testID="on-watch">
      <Text variant="label">{on ? `On watch: ${on.name}` : 'No watch on now'}</Text>
      {on ? (
        <Text muted testID="on-watch-members">
          {`${who} · until ${formatUtcTime(on.end)}`}
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { borderWidth: 1, borderRadius: radius.md, padding: space.sm, gap: 2, flexDirection: 'row', flexWrap: 'wrap', columnGap: space.md },
});
