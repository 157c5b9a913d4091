import { useRouter } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useCampaign, useCampaignDives } from '@/hooks/campaigns';
import { formatUtc } from '@/lib/format';
import { can } from '@/lib/permissions';
import type { Dive } from '@/lib/schemas';
import { space } from '@/lib/tokens';
import { nextDiveNumber, orderDives } from './dive-order';
import { DivePlanForm } from './dive-plan-form';

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
  const role = useCampaign(campaignId).data?.myRole;
  const [planning, setPlanning] = useState(false);
  const mayPlan = can(role, 'dive.plan');
  if (dives.isPending) return <LoadingState label="Loading dives…" />;
  if (dives.isError) return <ErrorState error={dives.error} onRetry={() => void dives.refetch()} />;
  const ordered = orderDives(dives.data);
  const current = ordered[0];
  const plan = planning ? (
    <DivePlanForm
      campaignId={campaignId}
      proposedNumber={nextDiveNumber(dives.data)}
      onDone={() => setPlanning(false)}
      onCancel={() => setPlanning(false)}
    />
  ) : mayPlan ? (
    <View style={styles.row}>
      <Button label="Plan a dive" tone="secondary" compact onPress={() => setPlanning(true)} testID="plan-dive" />
    </View>
  ) : null;
  if (dives.data.length === 0) {
    return (
      <View style={styles.list}>
        {plan}
        {planning ? null : (
          <EmptyState
            title="No dives planned yet"
            body={mayPlan ? 'Plan the first dive of the campaign.' : "A lead or pilot plans the campaign's dives."}
          />
        )}
      </View>
    );
  }
  return (
    <View style={styles.list} testID="dive-list">
      {plan}
      {ordered.map((d) => (
        <Card key={d.id} testID={`dive-${d.number}`} label={`Dive ${d.number}`} onPress={() => router.push(`/dives/${d.id}`)}>
          <View style={styles.row}>
            <Text variant="title" style={styles.flex}>
              {d.number}
            </Text>
            {d === current ? (
              <Text variant="label" testID="dive-current">
                {d.phases.launch && !d.phases.onDeck ? 'Under way' : d.phases.launch ? 'Latest' : 'Next'}
              </Text>
            ) : null}
            <Text variant="caption" muted>
              {diveStatus(d)}
            </Text>
          </View>
          {d.objectives ? <Text muted>{d.objectives}</Text> : null}
          <Text variant="monoSmall" muted>
            {[
              d.phases.launch
                ? `launch ${formatUtc(d.phases.launch)}`
                : d.plannedStartAt
                  ? `planned start ${formatUtc(d.plannedStartAt)}`
                  : null,
              `${d.observationCount} entries`,
              d.plannedMaxDepth != null ? `planned ≤ ${d.plannedMaxDepth} m` : null,
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
