import { useLocalSearchParams, useRouter } from 'expo-router';

import { ObservationEditor } from '@/components/observations/observation-editor';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';

export default function EditObservationScreen() {
  const { id } = useLocalSearchParams<{ id: string }>();
  const router = useRouter();
  return (
    <Screen>
      <ScreenHeader title="Edit entry" back={`/observations/${id}`} />
      <ScreenBody>
        <ObservationEditor id={id} onDone={() => (router.canGoBack() ? router.back() : router.replace(`/observations/${id}`))} />
      </ScreenBody>
    </Screen>
  );
}
