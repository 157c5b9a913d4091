import { useLocalSearchParams } from 'expo-router';

import { TaxaAndSamples } from '@/components/taxa/taxa-and-samples';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';
import { useDive } from '@/hooks/dives';

export default function DiveTaxaScreen() {
  const { diveId } = useLocalSearchParams<{ diveId: string }>();
  const dive = useDive(diveId);
  return (
    <Screen>
      <ScreenHeader
        title={dive.data ? `Dive ${dive.data.number} · taxa and samples` : 'Dive taxa and samples'}
        back={`/dives/${diveId}`}
        backLabel="Dive log"
      />
      <ScreenBody>
        <TaxaAndSamples scope={{ diveId }} />
      </ScreenBody>
    </Screen>
  );
}
