import { useCallback } from 'react';
import { ActivityIndicator, FlatList, StyleSheet, View } from 'react-native';

import { ObservationCard } from '@/components/observations/observation-card';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useDiveLog } from '@/hooks/observations';
import { useTheme } from '@/hooks/theme';
import type { Observation } from '@/lib/schemas';
import { space } from '@/lib/tokens';

type Props = {
  diveId: string;
  selectedId?: string;
  onSelect: (o: Observation) => void;
  header?: React.ReactElement;
};

/** The dive's running list of observations, newest first, loading older pages as it scrolls. */
export function DiveLog({ diveId, selectedId, onSelect, header }: Props) {
  const { colors } = useTheme();
  const log = useDiveLog(diveId);
  const items = log.data?.pages.flatMap((p) => p.items) ?? [];
  const renderItem = useCallback(
    ({ item }: { item: Observation }) => (
      <ObservationCard observation={item} selected={item.id === selectedId} onPress={() => onSelect(item)} />
    ),
    [onSelect, selectedId],
  );

  let empty: React.ReactElement | null = null;
  if (log.isPending) empty = <LoadingState label="Loading the dive log…" />;
  else if (log.isError) empty = <ErrorState error={log.error} onRetry={() => void log.refetch()} />;
  else empty = <EmptyState title="No entries yet" body="Nothing has been logged on this dive. Log the first observation." />;

  return (
    <FlatList
      testID="dive-log"
      data={items}
      keyExtractor={(o) => o.id}
      renderItem={renderItem}
      ListHeaderComponent={header}
      ListEmptyComponent={empty}
      ListFooterComponent={
        log.isFetchingNextPage ? (
          <ActivityIndicator color={colors.accent} />
        ) : log.hasNextPage ? null : items.length > 0 ? (
          <Text variant="caption" muted style={styles.end}>
            Start of the dive log · {items.length} entries
          </Text>
        ) : null
      }
      onEndReached={() => {
        if (log.hasNextPage && !log.isFetchingNextPage) void log.fetchNextPage();
      }}
      onEndReachedThreshold={0.5}
      contentContainerStyle={styles.content}
      ItemSeparatorComponent={Separator}
    />
  );
}

function Separator() {
  return <View style={styles.sep} />;
}

const styles = StyleSheet.create({
  content: { padding: space.lg, paddingBottom: 96, gap: 0 },
  sep: { height: space.md },
  end: { textAlign: 'center', paddingVertical: space.lg },
});
