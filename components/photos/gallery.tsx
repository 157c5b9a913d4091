import { useMemo, useState } from 'react';
import { ActivityIndicator, FlatList, Pressable, StyleSheet, View } from 'react-native';

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
import { justifiedRows } from './justified-rows';
import { PhotoImage } from './photo-image';
import { PhotoViewer } from './photo-viewer';

const kindLabels: Record<ObservationKind, string> = {
  biology: 'Biology',
  archaeology: 'Archaeology',
  environment: 'Environment',
  operations: 'Operations',
};

/** Height a row of thumbnails aims at; each row is then fitted to the width exactly. */
const rowHeightFor = { phone: 112, tablet: 150, wide: 180 } as const;
/** Two lines of caption under each photo. */
const CAPTION_HEIGHT = 36;
const GAP = space.sm;

/**
 * Every photo of a dive in the order of the dive log, filtered by kind and tag: a justified grid
 * that shows each at its own aspect ratio, with its time and caption under it.
 */
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
  const pages = gallery.data?.pages;
  const items = useMemo(() => pages?.flatMap((p) => p.items) ?? [], [pages]);
  const total = gallery.data?.pages[0]?.total ?? 0;
  const usedTags = (tags.data ?? []).filter((t) => !t.retired && t.usage > 0);
  const more = () => {
    if (gallery.hasNextPage && !gallery.isFetchingNextPage) void gallery.fetchNextPage();
  };

  const filters = (
    <View style={styles.filters}>
      <View style={styles.chips} testID="gallery-kinds">
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
      </View>
      {usedTags.length > 0 ? (
        <View style={styles.chips} testID="gallery-tags">
          {usedTags.map((t) => (
            <Chip
              key={t.id}
              label={`#${t.name}`}
              selected={tag === t.name}
              onPress={() => setTag(tag === t.name ? undefined : t.name)}
              testID={`gallery-tag-${t.name}`}
            />
          ))}
        </View>
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
  const inner = Math.max(0, Math.min(width, 1400) - space.lg * 2);
  const rows = useMemo(
    () =>
      justifiedRows(
        items,
        (p) => p.width / p.height,
        (p) => p.id,
        { width: inner, targetHeight: rowHeightFor[breakpoint], gap: GAP },
      ),
    [items, inner, breakpoint],
  );
  const indexOf = useMemo(() => new Map(items.map((p, i) => [p.id, i])), [items]);

  return (
    <>
      <FlatList
        testID="gallery"
        onLayout={(e) => setWidth(e.nativeEvent.layout.width)}
        data={inner > 0 ? rows : []}
        keyExtractor={(r) => r.key}
        ListHeaderComponent={filters}
        ListEmptyComponent={empty}
        renderItem={({ item: row }) => (
          <View style={styles.row}>
            {row.tiles.map((t) => (
              <GalleryTile
                key={t.item.id}
                photo={t.item}
                width={t.width}
                height={t.height}
                onPress={() => setOpen(indexOf.get(t.item.id) ?? 0)}
              />
            ))}
          </View>
        )}
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

function GalleryTile({ photo, width, height, onPress }: { photo: GalleryPhoto; width: number; height: number; onPress: () => void }) {
  const { colors } = useTheme();
  const label = photo.caption ?? photo.observation.title;
  return (
    <Pressable
      onPress={onPress}
      accessibilityRole="button"
      accessibilityLabel={`Open ${label}`}
      testID={`gallery-photo-${photo.id}`}
      style={({ pressed, hovered }: { pressed: boolean; hovered?: boolean }) => [
        styles.tile,
        { width },
        (pressed || hovered) && styles.lit,
      ]}
    >
      <View
        testID={`gallery-frame-${photo.id}`}
        style={[styles.frame, { width, height, backgroundColor: colors.surfaceAlt, borderColor: colors.kind[photo.observation.kind] }]}
      >
        <PhotoImage uri={photoUrl(photo, 'thumb')} label={label} />
      </View>
      <View style={styles.caption} testID={`gallery-caption-${photo.id}`}>
        <Text variant="caption" numberOfLines={2}>
          <Text variant="caption" muted>
            {formatUtcTime(photo.observation.observedAt)}
          </Text>{' '}
          {label}
        </Text>
      </View>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  content: { padding: space.lg, gap: space.md, maxWidth: 1400, width: '100%', alignSelf: 'center' },
  filters: { gap: space.sm, marginBottom: space.md },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, paddingVertical: 2 },
  summary: { flexDirection: 'row', alignItems: 'center', gap: space.sm },
  flex: { flex: 1 },
  row: { flexDirection: 'row', gap: GAP },
  tile: { gap: space.xs },
  lit: { opacity: 0.85 },
  frame: { borderRadius: radius.sm, overflow: 'hidden', position: 'relative', borderBottomWidth: 3 },
  caption: { height: CAPTION_HEIGHT, overflow: 'hidden' },
});
