import { useLocalSearchParams } from 'expo-router';

import { TaxaList } from '@/components/taxa/taxa-list';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';
import { useDive } from '@/hooks/dives';

export default function DiveTaxaScreen() {
  const { diveId } = useLocalSearchParams<{ diveId: string }>();
  const dive = useDive(diveId);
  return (
    <Screen>
      <ScreenHeader title={dive.data ? `Dive ${dive.data.number} · taxa` : 'Dive taxa'} back={`/dives/${diveId}`} backLabel="Dive log" />
      <ScreenBody>
        <TaxaList scope={{ diveId }} />
      </ScreenBody>
    </Screen>
  );
}
