import { useState } from 'react';
import { ActivityIndicator, FlatList, Pressable, ScrollView, StyleSheet, View } from 'react-native';

import { Chip } from '@/components/ui/chip';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useCampaignTags } from '@/hooks/campaigns';
import { useDive } from '@/hooks/dives';
import { useLayout } from '@/hooks/layout';
import { useFollowDive } from '@/hooks/live';
import { photoUrl, useGallery, useThumbnailsOnly } from '@/hooks/photos';
import { useTheme } from '@/hooks/theme';
import { formatUtcTime } from '@/lib/format';
import { observationKinds, type GalleryPhoto, type ObservationKind } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';
import { PhotoImage } from './photo-image';
import { PhotoViewer } from './photo-viewer';

const kindLabels: Record<ObservationKind, string> = {
  biology: 'Biology',
  archaeology: 'Archaeology',
  environment: 'Environment',
  operations: 'Operations',
};

const columnsFor = { phone: 3, tablet: 5, wide: 7 } as const;

/** Every photo of a dive, as thumbnails in the order of the dive log, filtered by kind and tag. */
export function DiveGallery({ diveId }: { diveId: string }) {
  const { breakpoint } = useLayout();
  const [width, setWidth] = useState(0);
  const dive = useDive(diveId);
  useFollowDive(diveId);
  const tags = useCampaignTags(dive.data?.campaignId);
  const [kind, setKind] = useState<ObservationKind | undefined>();
  const [tag, setTag] = useState<string | undefined>();
  const [open, setOpen] = useState<number | null>(null);
  const [thumbnailsOnly, setThumbnailsOnly] = useThumbnailsOnly();
  const gallery = useGallery(diveId, { kind, tag });
  const items = gallery.data?.pages.flatMap((p) => p.items) ?? [];
  const total = gallery.data?.pages[0]?.total ?? 0;
  const columns = columnsFor[breakpoint];
  const usedTags = (tags.data ?? []).filter((t) => !t.retired && t.usage > 0);
  const more = () => {
    if (gallery.hasNextPage && !gallery.isFetchingNextPage) void gallery.fetchNextPage();
  };

  const filters = (
    <View style={styles.filters}>
      <ScrollView horizontal showsHorizontalScrollIndicator={false} contentContainerStyle={styles.chips}>
        <Chip label="All kinds" selected={!kind} onPress={() => setKind(undefined)} testID="gallery-kind-all" />
        {observationKinds.map((k) => (
          <Chip
            key={k}
            label={kindLabels[k]}
            selected={kind === k}
            onPress={() => setKind(kind === k ? undefined : k)}
            testID={`gallery-kind-${k}`}
          />
        ))}
      </ScrollView>
      {usedTags.length > 0 ? (
        <ScrollView horizontal showsHorizontalScrollIndicator={false} contentContainerStyle={styles.chips}>
          {usedTags.map((t) => (
            <Chip
              key={t.id}
              label={`#${t.name}`}
              selected={tag === t.name}
              onPress={() => setTag(tag === t.name ? undefined : t.name)}
              testID={`gallery-tag-${t.name}`}
            />
          ))}
        </ScrollView>
      ) : null}
      <View style={styles.summary}>
        <Text variant="caption" muted testID="gallery-total">
          {gallery.isPending ? ' ' : total === 1 ? '1 photo' : `${total} photos`}
        </Text>
        <View style={styles.flex} />
        <Chip
          label="Thumbnails only"
          selected={thumbnailsOnly}
          onPress={() => setThumbnailsOnly(!thumbnailsOnly)}
          testID="gallery-thumbnails-only"
        />
      </View>
    </View>
  );

  let empty: React.ReactElement;
  if (gallery.isPending) empty = <LoadingState label="Loading the photos…" />;
  else if (gallery.isError) empty = <ErrorState error={gallery.error} onRetry={() => void gallery.refetch()} />;
  else
    empty = (
      <EmptyState
        title="No photos"
        body={kind || tag ? 'No photo matches these filters.' : 'No photos have been added to this dive yet.'}
      />
    );

  // Sized from the list's own width, which the side navigation of wider screens takes a part of.
  const tile = Math.max(64, Math.floor((Math.min(width, 1400) - space.lg * 2 - space.sm * (columns - 1)) / columns));

  return (
    <>
      <FlatList
        key={columns}
        testID="gallery"
        onLayout={(e) => setWidth(e.nativeEvent.layout.width)}
        data={items}
        numColumns={columns}
        keyExtractor={(p) => p.id}
        ListHeaderComponent={filters}
        ListEmptyComponent={empty}
        renderItem={({ item, index }) => <GalleryTile photo={item} size={tile} onPress={() => setOpen(index)} />}
        columnWrapperStyle={styles.rowGap}
        contentContainerStyle={styles.content}
        onEndReached={more}
        onEndReachedThreshold={0.5}
        ListFooterComponent={gallery.isFetchingNextPage ? <ActivityIndicator /> : null}
      />
      <PhotoViewer
        photos={items.map((p) => ({ ...p, entryTitle: `${formatUtcTime(p.observation.observedAt)} · ${p.observation.title}` }))}
        index={open}
        onIndexChange={setOpen}
        onClose={() => setOpen(null)}
        total={total}
        onNeedMore={more}
      />
    </>
  );
}

function GalleryTile({ photo, size, onPress }: { photo: GalleryPhoto; size: number; onPress: () => void }) {
  const { colors } = useTheme();
  const label = photo.caption ?? photo.observation.title;
  return (
    <Pressable
      onPress={onPress}
      accessibilityRole="button"
      accessibilityLabel={`Open ${label}`}
      testID={`gallery-photo-${photo.id}`}
      style={[
        styles.tile,
        { width: size, height: size, backgroundColor: colors.surfaceAlt, borderColor: colors.kind[photo.observation.kind] },
      ]}
    >
      <PhotoImage uri={photoUrl(photo, 'thumb')} label={label} />
    </Pressable>
  );
}

const styles = StyleSheet.create({
  content: { padding: space.lg, gap: space.sm, maxWidth: 1400, width: '100%', alignSelf: 'center' },
  filters: { gap: space.sm, marginBottom: space.md },
  chips: { gap: space.sm, paddingVertical: 2 },
  summary: { flexDirection: 'row', alignItems: 'center', gap: space.sm },
  flex: { flex: 1 },
  rowGap: { gap: space.sm },
  tile: { borderRadius: radius.sm, overflow: 'hidden', position: 'relative', borderBottomWidth: 3 },
});
