import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Text } from '@/components/ui/text';
import { useCampaign } from '@/hooks/campaigns';
import { useMe } from '@/hooks/session';
import { can } from '@/lib/permissions';
import type { ObservationDetail } from '@/lib/schemas';
import { space } from '@/lib/tokens';
import { EntryMeasurements } from './entry-measurements';
import { GalleryLink } from './gallery-link';
import { PhotoStrip } from './photo-strip';
import { PhotoUploader } from './photo-uploader';
import { PhotoViewer } from './photo-viewer';

/** The photos of one entry, and adding more (for its author and the lead). */
export function ObservationPhotos({ observation }: { observation: ObservationDetail }) {
  const me = useMe().data;
  const campaign = useCampaign(observation.campaignId).data;
  const [open, setOpen] = useState<number | null>(null);
  const canEdit = !observation.retired && can(campaign?.myRole, 'photo.edit', { isAuthor: me?.user.id === observation.authorId });
  const count = observation.photos.length;
  // Measuring adds to the entry's record, so it is for those who may edit the entry.
  const canMeasure = !observation.retired && can(campaign?.myRole, 'entry.edit', { isAuthor: me?.user.id === observation.authorId });

  return (
    <View style={styles.wrap} testID="observation-photos">
      <View style={styles.head}>
        <Text variant="title" role="heading" aria-level={2}>
          Photos
        </Text>
        <Text variant="caption" muted testID="photo-count">
          {count === 0 ? 'none yet' : count === 1 ? '1 photo' : `${count} photos`}
        </Text>
        <View style={styles.flex} />
        <GalleryLink diveId={observation.diveId} label="All photos of the dive" testID="entry-gallery-link" />
      </View>
      {count > 0 ? <PhotoStrip observation={observation} canEdit={canEdit} onOpen={setOpen} /> : null}
      {count > 0 ? (
        <EntryMeasurements observation={observation} myId={me?.user.id} isLead={campaign?.myRole === 'lead'} canEdit={canMeasure} />
      ) : null}
      {canEdit ? <PhotoUploader observation={observation} /> : null}
      <PhotoViewer
        photos={observation.photos.map((p) => ({ ...p, entryTitle: observation.title }))}
        index={open}
        onIndexChange={setOpen}
        onClose={() => setOpen(null)}
        measureFor={canMeasure ? observation : undefined}
      />
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.md },
  head: { flexDirection: 'row', alignItems: 'center', gap: space.sm, flexWrap: 'wrap' },
  flex: { flex: 1 },
});
