import { Link } from 'expo-router';
import { StyleSheet, View } from 'react-native';

import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useSampleRegister } from '@/hooks/taxa';
import { useTheme } from '@/hooks/theme';
import { formatUtc } from '@/lib/format';
import { radius, space } from '@/lib/tokens';

/**
 * The samples of a campaign or a dive in order of their numbers, each with where it is now; a
 * sample that came up with the vehicle and that nobody has taken into custody is flagged first.
 */
export function SampleRegister({ scope }: { scope: { campaignId: string } | { diveId: string } }) {
  const { colors } = useTheme();
  const register = useSampleRegister(scope);
  if (register.isPending) return <LoadingState label="Reading the register…" />;
  if (register.isError) return <ErrorState error={register.error} onRetry={() => void register.refetch()} />;
  const items = register.data.items;
  if (items.length === 0) {
    return <EmptyState title="No samples yet" body="A sample appears here once a biology or environment entry records one." />;
  }
  const flagged = items.filter((s) => s.noCustodySinceRecovery).length;
  return (
    <View style={styles.wrap} testID="sample-register">
      <Text variant="caption" muted testID="sample-total">
        {items.length === 1 ? '1 sample' : `${items.length} samples`}
        {flagged > 0 ? ` · ${flagged} with no custody step since recovery` : ''}
      </Text>
      {items.map((s) => (
        <View
          key={s.observationId}
          style={[styles.row, { borderColor: s.noCustodySinceRecovery ? colors.warning : colors.border, backgroundColor: colors.surface }]}
          testID={`sample-${s.sampleNumber}`}
        >
          <View style={styles.line}>
            <Text variant="mono">{s.sampleNumber}</Text>
            <Link href={`/observations/${s.observationId}`}>
              <Text color={colors.accent}>{s.title}</Text>
            </Link>
          </View>
          <Text variant="caption" muted>
            {[
              `dive ${s.diveNumber}`,
              formatUtc(s.observedAt),
              s.sampleType,
              s.gear,
              s.preservation,
              s.parentSampleNumber ? `subsample of ${s.parentSampleNumber}` : null,
            ]
              .filter(Boolean)
              .join(' · ')}
          </Text>
          {s.noCustodySinceRecovery ? (
            <Text variant="caption" color={colors.warning} testID="sample-flag">
              No custody step since the dive came on deck
            </Text>
          ) : (
            <Text variant="caption">{s.heldBy ? `Held by ${s.heldBy}` : 'Still on the vehicle'}</Text>
          )}
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.sm },
  row: { borderWidth: 1, borderRadius: radius.md, padding: space.md, gap: 2 },
  line: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, alignItems: 'baseline' },
});
