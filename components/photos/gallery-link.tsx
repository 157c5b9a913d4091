import { useRouter } from 'expo-router';

import { Button } from '@/components/ui/button';

/** The way to a dive's gallery, for the dive screen's header and an entry's photos. */
export function GalleryLink({ diveId, label = 'Photos', testID = 'dive-gallery' }: { diveId: string; label?: string; testID?: string }) {
  const router = useRouter();
  return (
    <Button
      label={label}
      tone="secondary"
      compact
      accessibilityRole="link"
      testID={testID}
      onPress={() => router.push(`/dives/${diveId}/gallery`)}
    />
  );
}
