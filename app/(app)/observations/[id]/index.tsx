import { useLocalSearchParams } from 'expo-router';

import { ObservationDetail } from '@/components/observations/observation-detail';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';
import { useObservation } from '@/hooks/observations';

export default function ObservationScreen() {
  const { id } = useLocalSearchParams<{ id: string }>();
  const observation = useObservation(id);
  const back = observation.data ? `/dives/${observation.data.diveId}` : '/';
  return (
    <Screen>
      <ScreenHeader title="Entry" subtitle={observation.data?.title} back={back} />
      <ScreenBody>
        <ObservationDetail id={id} />
      </ScreenBody>
    </Screen>
  );
}
