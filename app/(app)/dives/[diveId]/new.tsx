import { useLocalSearchParams, useRouter } from 'expo-router';

import { NewObservationForm } from '@/components/observations/observation-form';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';
import { ErrorState, LoadingState } from '@/components/ui/states';
import { useDive } from '@/hooks/dives';
import { useLayout } from '@/hooks/layout';

export default function NewObservationScreen() {
  const { diveId } = useLocalSearchParams<{ diveId: string }>();
  const router = useRouter();
  const { splitView } = useLayout();
  const dive = useDive(diveId);
  return (
    <Screen>
      <ScreenHeader title="Log entry" subtitle={dive.data ? `Dive ${dive.data.number}` : undefined} back={`/dives/${diveId}`} />
      <ScreenBody>
        {dive.isPending ? <LoadingState /> : null}
        {dive.isError ? <ErrorState error={dive.error} onRetry={() => void dive.refetch()} /> : null}
        {dive.data ? (
          <NewObservationForm
            diveId={diveId}
            campaignId={dive.data.campaignId}
            onCreated={(o) => router.dismissTo(splitView && o ? `/dives/${diveId}?entry=${o.id}` : `/dives/${diveId}`)}
          />
        ) : null}
      </ScreenBody>
    </Screen>
  );
}
