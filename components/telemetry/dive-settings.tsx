import { StyleSheet, View } from 'react-native';

import { PhaseTimes } from '@/components/dives/phase-times';
import { LaserSpacingSettings } from '@/components/photos/laser-spacing-settings';
import { Card } from '@/components/ui/card';
import { ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useCampaign } from '@/hooks/campaigns';
import { useDive } from '@/hooks/dives';
import { useFollowDive } from '@/hooks/live';
import { useTelemetry } from '@/hooks/telemetry';
import { useTheme } from '@/hooks/theme';
import { refusal } from '@/lib/permissions';
import { radius, space } from '@/lib/tokens';
import { ImportHistory } from './import-history';
import { RecordingSettings } from './recording-settings';
import { TelemetryImport } from './telemetry-import';

/**
 * What the lead and the pilot set for a dive after (or while) running it: its phase times, the
 * video clock and the telemetry gap, and the vehicle log with every import's report. Everyone else
 * reads these on the summary.
 */
export function DiveSettingsView({ diveId }: { diveId: string }) {
  const { colors } = useTheme();
  const dive = useDive(diveId);
  useFollowDive(diveId);
  const campaign = useCampaign(dive.data?.campaignId);
  const samples = useTelemetry(diveId);

  const failed = dive.error ?? campaign.error ?? samples.error;
  if (failed) {
    return (
      <ErrorState
        error={failed}
        onRetry={() => {
          void dive.refetch();
          void campaign.refetch();
          void samples.refetch();
        }}
      />
    );
  }
  if (!dive.data || !campaign.data || !samples.data) return <LoadingState label="Loading the dive’s settings…" />;

  const refused = refusal(campaign.data.myRole, 'dive.run');
  if (refused) {
    return (
      <View style={[styles.refused, { borderColor: colors.border, backgroundColor: colors.surface }]} testID="dive-settings-refused">
        <Text variant="title">Only the lead and the pilot change a dive’s settings.</Text>
        <Text muted>{refused} The dive’s phases, video clock and log imports are shown on its summary.</Text>
      </View>
    );
  }

  return (
    <View style={styles.wrap} testID="dive-settings-view">
      <Card testID="phases-card">
        <PhaseTimes dive={dive.data} mayEdit />
      </Card>
      <Card testID="recording-card">
        <RecordingSettings dive={dive.data} mayEdit />
      </Card>
      <Card testID="laser-card">
        <LaserSpacingSettings dive={dive.data} />
      </Card>
      <Card testID="import-card">
        <TelemetryImport diveId={diveId} hasLog={samples.data.sampleCount > 0} sampleCount={samples.data.sampleCount} />
        <ImportHistory imports={samples.data.imports} limit={50} />
      </Card>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.lg },
  refused: { borderWidth: 1, borderRadius: radius.lg, padding: space.xl, gap: space.sm },
});
