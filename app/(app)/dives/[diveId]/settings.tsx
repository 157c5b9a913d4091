import { useLocalSearchParams } from 'expo-router';

import { DiveSettingsView } from '@/components/telemetry/dive-settings';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';
import { useDive } from '@/hooks/dives';

export default function DiveSettingsScreen() {
  const { diveId } = useLocalSearchParams<{ diveId: string }>();
  const dive = useDive(diveId);
  return (
    <Screen>
      <ScreenHeader
        title={dive.data ? `Dive ${dive.data.number} · dive settings` : 'Dive settings'}
        back={`/dives/${diveId}`}
        backLabel="Dive"
      />
      <ScreenBody>
        <DiveSettingsView diveId={diveId} />
      </ScreenBody>
    </Screen>
  );
}
