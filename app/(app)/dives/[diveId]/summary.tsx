import { useLocalSearchParams } from 'expo-router';

import { DiveSummaryView } from '@/components/telemetry/dive-summary';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';
import { useDive } from '@/hooks/dives';

export default function DiveSummaryScreen() {
  const { diveId } = useLocalSearchParams<{ diveId: string }>();
  const dive = useDive(diveId);
  return (
    <Screen>
      <ScreenHeader title={dive.data ? `Dive ${dive.data.number} · summary` : 'Dive summary'} back={`/dives/${diveId}`} />
      <ScreenBody>
        <DiveSummaryView diveId={diveId} />
      </ScreenBody>
    </Screen>
  );
}
