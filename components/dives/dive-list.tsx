import { useRouter } from 'expo-router';
import { StyleSheet, View } from 'react-native';

import { Card } from '@/components/ui/card';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useCampaignDives } from '@/hooks/campaigns';
import { formatUtc } from '@/lib/format';
import type { Dive } from '@/lib/schemas';
import { space } from '@/lib/tokens';

/** Where a dive stands, from its phases. */
export function diveStatus(d: Dive): string {
  if (d.phases.onDeck) return 'completed';
  if (d.phases.offBottom) return 'ascending';
  if (d.phases.onBottom) return 'on bottom';
  if (d.phases.launch) return 'descending';
  return 'planned';
}

export function DiveList({ campaignId }: { campaignId: string }) {
  const router = useRouter();
  const dives = useCampaignDives(campaignId);
  if (dives.isPending) return <LoadingState label="Loading dives…" />;
  if (dives.isError) return <ErrorState error={dives.error} onRetry={() => void dives.refetch()} />;
  if (dives.data.length === 0) return <EmptyState title="No dives planned yet" body="A lead or pilot plans the campaign's dives." />;
  return (
    <View style={styles.list} testID="dive-list">
      {dives.data.map((d) => (
        <Card key={d.id} testID={`dive-${d.number}`} label={`Dive ${d.number}`} onPress={() => router.push(`/dives/${d.id}`)}>
          <View style={styles.row}>
            <Text variant="title" style={styles.flex}>
              {d.number}
            </Text>
            <Text variant="caption" muted>
              {diveStatus(d)}
            </Text>
          </View>
          {d.objectives ? <Text muted>{d.objectives}</Text> : null}
          <Text variant="monoSmall" muted>
            {[
              d.phases.launch ? `launch ${formatUtc(d.phases.launch)}` : null,
              `${d.observationCount} entries`,
              d.plannedMaxDepth ? `planned ≤ ${d.plannedMaxDepth} m` : null,
            ]
              .filter(Boolean)
              .join(' · ')}
          </Text>
        </Card>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  list: { gap: space.md },
  row: { flexDirection: 'row', alignItems: 'center', gap: space.sm },
  flex: { flex: 1 },
});
