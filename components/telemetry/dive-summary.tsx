import { useRouter } from 'expo-router';
import { StyleSheet, View } from 'react-native';

import { PhaseTimes } from '@/components/dives/phase-times';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useCampaign } from '@/hooks/campaigns';
import { useDive } from '@/hooks/dives';
import { useLayout } from '@/hooks/layout';
import { useFollowDive } from '@/hooks/live';
import { useDiveSummary, useTelemetry } from '@/hooks/telemetry';
import { useTheme } from '@/hooks/theme';
import { can } from '@/lib/permissions';
import { radius, space } from '@/lib/tokens';
import { DepthProfile } from './depth-profile';
import { DiveStatsGrid } from './dive-stats';
import { ImportHistory } from './import-history';
import { OutsideEntries } from './outside-entries';
import { RecordingSettings } from './recording-settings';
import { SitePlan } from './site-plan';

/**
 * A dive after the fact, read-only for everyone: its depth profile and site plan (side by side on
 * wide screens), its statistics, its phases and video clock, and the log's imports. The lead and
 * the pilot change these on the dive's settings screen.
 */
export function DiveSummaryView({ diveId }: { diveId: string }) {
  const { colors } = useTheme();
  const { splitView } = useLayout();
  const router = useRouter();
  const dive = useDive(diveId);
  useFollowDive(diveId);
  const campaign = useCampaign(dive.data?.campaignId);
  const samples = useTelemetry(diveId);
  const summary = useDiveSummary(diveId);

  const failed = dive.error ?? samples.error ?? summary.error;
  if (failed) {
    return (
      <ErrorState
        error={failed}
        onRetry={() => {
          void dive.refetch();
          void samples.refetch();
          void summary.refetch();
        }}
      />
    );
  }
  if (!dive.data || !samples.data || !summary.data) return <LoadingState label="Loading the dive’s log…" />;

  const role = campaign.data?.myRole;
  const maySet = can(role, 'dive.run');
  const hasLog = samples.data.sampleCount > 0;
  const plotHeight = splitView ? 320 : 260;

  return (
    <View style={styles.wrap} testID="dive-summary-view">
      <Text variant="caption" muted testID="navigation-caution">
        Bathynote is not a navigation or vehicle-control system: never steer the vehicle or judge a dive’s safety from these plots.
      </Text>
      {hasLog ? (
        <View style={[styles.plots, splitView && styles.plotsSide]}>
          <Card style={splitView ? styles.half : undefined} testID="profile-card">
            <Text variant="label">Depth profile</Text>
            <DepthProfile dive={dive.data} samples={samples.data} summary={summary.data} height={plotHeight} />
          </Card>
          <Card style={splitView ? styles.half : undefined} testID="plan-card">
            <Text variant="label">Site plan</Text>
            <SitePlan dive={dive.data} samples={samples.data} summary={summary.data} height={splitView ? plotHeight : 300} />
          </Card>
        </View>
      ) : (
        <View style={[styles.empty, { borderColor: colors.border, backgroundColor: colors.surface }]} testID="telemetry-empty">
          <Text variant="title">No telemetry yet — the pilot uploads the vehicle’s log after the dive.</Text>
          <Text muted>Until then, entries keep the depth and position typed into them, and the plots stay empty.</Text>
        </View>
      )}
      <Card testID="stats-card">
        <Text variant="label">Statistics</Text>
        <DiveStatsGrid stats={summary.data.stats} maxDepth={summary.data.maxDepth} />
        {summary.data.maxDepthSource === 'observations' ? (
          <Text variant="caption" muted>
            Maximum depth from the entries’ depths: the dive has no depth in its log.
          </Text>
        ) : null}
      </Card>
      {summary.data.observations.some((o) => o.outsideDive) ? (
        <Card testID="outside-card">
          <OutsideEntries dive={dive.data} entries={summary.data.observations} />
        </Card>
      ) : null}
      <Card testID="phases-card">
        <PhaseTimes dive={dive.data} mayEdit={false} />
      </Card>
      <Card testID="recording-card">
        <RecordingSettings dive={dive.data} mayEdit={false} />
      </Card>
      <ImportHistory imports={samples.data.imports} />
      <Button
        label="Dive report"
        tone="secondary"
        accessibilityRole="link"
        testID="summary-dive-report"
        style={styles.link}
        onPress={() => router.push(`/dives/${diveId}/report`)}
      />
      {maySet ? (
        <Button
          label="Dive settings"
          tone="secondary"
          accessibilityRole="link"
          testID="summary-dive-settings"
          style={styles.link}
          onPress={() => router.push(`/dives/${diveId}/settings`)}
        />
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.lg },
  plots: { gap: space.lg },
  plotsSide: { flexDirection: 'row', alignItems: 'flex-start' },
  half: { flex: 1, flexBasis: 0, minWidth: 0 },
  link: { alignSelf: 'flex-start' },
  empty: { borderWidth: 1, borderRadius: radius.lg, padding: space.xl, gap: space.sm },
});
