import { useRouter } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';

import { ObservationDetail } from '@/components/observations/observation-detail';
import { Button } from '@/components/ui/button';
import { Icon } from '@/components/ui/icon';
import { Screen, ScreenHeader } from '@/components/ui/screen';
import { EmptyState, ErrorState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useCampaign } from '@/hooks/campaigns';
import { useDive } from '@/hooks/dives';
import { useLayout } from '@/hooks/layout';
import { useTheme } from '@/hooks/theme';
import type { Observation } from '@/lib/schemas';
import { space } from '@/lib/tokens';
import { DiveLog } from './dive-log';
import { diveStatus } from './dive-list';
import { DivePhases } from './dive-phases';

/** A dive: its phases and its log, with the selected entry beside the list on wide screens. */
export function DiveScreen({ diveId, entryId }: { diveId: string; entryId?: string }) {
  const router = useRouter();
  const { colors } = useTheme();
  const { splitView, navPlacement } = useLayout();
  const dive = useDive(diveId);
  const campaign = useCampaign(dive.data?.campaignId);

  const open = (o: Observation) => {
    if (splitView) router.setParams({ entry: o.id });
    else router.push(`/observations/${o.id}`);
  };
  const newEntry = () => router.push(`/dives/${diveId}/new`);

  if (dive.isError) {
    return (
      <Screen>
        <ScreenHeader title="Dive" back="/" />
        <ErrorState error={dive.error} onRetry={() => void dive.refetch()} />
      </Screen>
    );
  }

  const header = dive.data ? (
    <View style={styles.listHeader}>
      <DivePhases dive={dive.data} />
      {dive.data.objectives ? (
        <Text variant="caption" muted>
          {dive.data.objectives}
        </Text>
      ) : null}
    </View>
  ) : undefined;

  const log = <DiveLog diveId={diveId} selectedId={splitView ? entryId : undefined} onSelect={open} header={header} />;

  return (
    <Screen>
      <ScreenHeader
        title={dive.data ? `Dive ${dive.data.number}` : 'Dive'}
        subtitle={[campaign.data?.name, dive.data ? diveStatus(dive.data) : null].filter(Boolean).join(' · ')}
        back={dive.data ? `/campaigns/${dive.data.campaignId}` : '/'}
        right={
          <View style={styles.actions}>
            <Button
              label="Summary"
              tone="secondary"
              compact
              testID="dive-summary"
              onPress={() => router.push(`/dives/${diveId}/summary`)}
            />
            {navPlacement === 'side' ? <Button label="Log entry" icon="+" testID="new-observation" onPress={newEntry} /> : null}
          </View>
        }
      />
      {splitView ? (
        <View style={styles.split}>
          <View style={[styles.listPane, { borderRightColor: colors.border }]}>{log}</View>
          <View style={styles.detailPane} testID="detail-pane">
            {entryId ? (
              <View style={styles.detailInner}>
                <ObservationDetail id={entryId} />
              </View>
            ) : (
              <EmptyState title="Select an entry" body="Its note, position and history show here." />
            )}
          </View>
        </View>
      ) : (
        log
      )}
      {navPlacement === 'bottom' ? (
        <Pressable
          testID="new-observation"
          accessibilityRole="button"
          accessibilityLabel="Log entry"
          onPress={newEntry}
          style={[styles.fab, { backgroundColor: colors.accent }]}
        >
          <Icon name="plus" color={colors.accentText} size={28} />
        </Pressable>
      ) : null}
    </Screen>
  );
}

const styles = StyleSheet.create({
  listHeader: { gap: space.sm, marginBottom: space.md },
  actions: { flexDirection: 'row', gap: space.sm, alignItems: 'center' },
  split: { flex: 1, flexDirection: 'row' },
  listPane: { width: 460, borderRightWidth: StyleSheet.hairlineWidth },
  detailPane: { flex: 1 },
  detailInner: { padding: space.xl, maxWidth: 880 },
  fab: {
    position: 'absolute',
    right: space.lg,
    bottom: space.lg,
    width: 60,
    height: 60,
    borderRadius: 30,
    alignItems: 'center',
    justifyContent: 'center',
    elevation: 4,
    shadowColor: '#000',
    shadowOpacity: 0.3,
    shadowRadius: 6,
    shadowOffset: { width: 0, height: 2 },
  },
});
