import { useLocalSearchParams } from 'expo-router';

import { DiveScreen } from '@/components/dives/dive-screen';

export default function DiveRoute() {
  const { diveId, entry } = useLocalSearchParams<{ diveId: string; entry?: string }>();
  return <DiveScreen diveId={diveId} entryId={entry} />;
}
