import { useLocalSearchParams } from 'expo-router';

import { DiveGallery } from '@/components/photos/gallery';
import { Screen, ScreenHeader } from '@/components/ui/screen';
import { useDive } from '@/hooks/dives';

export default function DiveGalleryScreen() {
  const { diveId } = useLocalSearchParams<{ diveId: string }>();
  const dive = useDive(diveId);
  return (
    <Screen>
      <ScreenHeader title={dive.data ? `Dive ${dive.data.number} · photos` : 'Dive photos'} back={`/dives/${diveId}`} />
      <DiveGallery diveId={diveId} />
    </Screen>
  );
}
