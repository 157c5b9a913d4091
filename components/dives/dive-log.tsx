import { useCallback, useMemo, useRef } from 'react';
import { ActivityIndicator, FlatList, Pressable, StyleSheet, View } from 'react-native';

import { ObservationCard } from '@/components/observations/observation-card';
import { WaitingEntries } from '@/components/observations/waiting-entries';
import { DiveSearchFallback } from '@/components/search/dive-search-fallback';
import { Button } from '@/components/ui/button';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useDiveLog, type DiveLogFilters } from '@/hooks/observations';
import { useTheme } from '@/hooks/theme';
import { formatUtcTime } from '@/lib/format';
import type { Dive, Observation } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';
import { matchesSearch, withPhases, type LogRow } from './log-rows';
import type { Column } from './log-columns';
import { LogTableHeader, LogTableRow } from './log-table';

type Props = {
  diveId: string;
  filters: DiveLogFilters;
  /** Text the loaded entries' titles and notes are searched for, here in the app. */
  search: string;
  /** The dive's phases, shown between the entries when the log is in time order. */
  phases?: Dive['phases'];
  /** The dive's video clock: each entry shows its time code once it is set. */
  recording?: Dive['recording'];
  /** The dive's phases and plan, to show dates and mark entries outside the dive's window. */
  timing?: Pick<Dive, 'phases' | 'plannedStartAt'>;
  onFiltersChange: (f: DiveLogFilters) => void;
  view: 'cards' | 'table';
  /** The table's columns (the person's pick of the optional ones). */
  columns: readonly Column[];
  selectedId?: string;
  onSelect: (o: Observation) => void;
  /** The dive's live feed (held-back entries), and where the list is scrolled to. */
  live: { held: Observation[]; showHeld: () => void };
  onScrollOffset: (y: number) => void;
  onRetryWaiting: () => void;
  header?: React.ReactElement;
};

/** A reader this far down the list is reading: new entries wait behind the marker. */
export const READING_OFFSET = 120;

/**
 * The dive's running list of observations, newest first, loading older pages as it scrolls and
 * following the live stream. New entries never push the list down under the reader: while they
 * are scrolled away from the top, a marker counts them instead.
 */
export function DiveLog({
  diveId,
  filters,
  search,
  phases,
  recording,
  timing,
  onFiltersChange,
  view,
  columns,
  selectedId,
  onSelect,
  live,
  onScrollOffset,
  onRetryWaiting,
  header,
}: Props) {
  const { colors } = useTheme();
  const list = useRef<FlatList<LogRow>>(null);
  const log = useDiveLog(diveId, filters);
  const searching = search.trim() !== '';
  const loaded = useMemo(() => log.data?.pages.flatMap((p) => p.items) ?? [], [log.data]);
  const items = useMemo(() => loaded.filter((o) => matchesSearch(o, search)), [loaded, search]);
  const inTimeOrder = (filters.sort ?? 'time') === 'time';
  const rows = useMemo(
    () => withPhases(items, inTimeOrder ? phases : undefined, filters.order ?? 'desc', !log.hasNextPage),
    [items, inTimeOrder, phases, filters.order, log.hasNextPage],
  );

  const renderItem = useCallback(
    ({ item }: { item: LogRow }) => {
      if (item.type === 'phase') return <PhaseDivider label={item.label} at={item.at} table={view === 'table'} phase={item.phase} />;
      const o = item.observation;
      return view === 'table' ? (
        <LogTableRow
          observation={o}
          columns={columns}
          recording={recording}
          timing={timing}
          selected={o.id === selectedId}
          onPress={() => onSelect(o)}
        />
      ) : (
        <ObservationCard observation={o} recording={recording} timing={timing} selected={o.id === selectedId} onPress={() => onSelect(o)} />
      );
    },
    [columns, onSelect, recording, selectedId, timing, view],
  );

  let empty: React.ReactElement;
  if (log.isPending) empty = <LoadingState label="Loading the dive log…" />;
  else if (log.isError) empty = <ErrorState error={log.error} onRetry={() => void log.refetch()} />;
  else if (filters.retired) empty = <EmptyState title="No retired entries" body="Nothing on this dive has been retired." />;
  // Nothing loaded matches: the whole dive is searched on the server instead.
  else if (searching) empty = <DiveSearchFallback diveId={diveId} q={search} filters={filters} onSelect={onSelect} />;
  else if (Object.values(filters).some((v) => v && v !== 'time' && v !== 'desc'))
    empty = <EmptyState title="No entries match" body="Loosen the filters to see more of the log." />;
  else empty = <EmptyState title="No entries yet" body="Nothing has been logged on this dive. Log the first observation." />;

  const showNew = () => {
    live.showHeld();
    list.current?.scrollToOffset({ offset: 0, animated: true });
  };

  return (
    <View style={styles.fill}>
      <FlatList
        ref={list}
        testID="dive-log"
        data={rows}
        keyExtractor={(r) => r.key}
        renderItem={renderItem}
        ListHeaderComponent={
          <View>
            {/* The table runs edge to edge; what sits above it keeps the cards' margin. */}
            <View style={view === 'table' ? styles.tableHeader : undefined}>
              {header}
              <WaitingEntries diveId={diveId} onRetry={onRetryWaiting} />
            </View>
            {view === 'table' ? (
              <LogTableHeader columns={columns} filters={filters} onSort={(sort, order) => onFiltersChange({ ...filters, sort, order })} />
            ) : null}
          </View>
        }
        ListEmptyComponent={empty}
        ListFooterComponent={
          log.isFetchingNextPage ? (
            <ActivityIndicator color={colors.accent} />
          ) : searching && items.length > 0 ? (
            <View style={styles.endBox}>
              <Text variant="caption" muted testID="search-count">
                {items.length} of {loaded.length} loaded {loaded.length === 1 ? 'entry matches' : 'entries match'}
                {log.hasNextPage ? '; older entries load as you scroll' : ''}
              </Text>
              {log.hasNextPage ? (
                <Button label="Load older entries" tone="ghost" compact onPress={() => void log.fetchNextPage()} testID="load-older" />
              ) : null}
            </View>
          ) : log.hasNextPage || items.length === 0 ? null : (
            <Text variant="caption" muted style={styles.end}>
              Start of the dive log · {items.length} {items.length === 1 ? 'entry' : 'entries'}
            </Text>
          )
        }
        onScroll={(e) => {
          const y = e.nativeEvent.contentOffset.y;
          onScrollOffset(y);
          if (y <= READING_OFFSET && live.held.length > 0) live.showHeld();
        }}
        scrollEventThrottle={100}
        onEndReached={() => {
          if (log.hasNextPage && !log.isFetchingNextPage) void log.fetchNextPage();
        }}
        onEndReachedThreshold={0.5}
        contentContainerStyle={view === 'table' ? styles.tableContent : styles.content}
        ItemSeparatorComponent={view === 'table' ? null : Separator}
      />
      {live.held.length > 0 ? (
        <View style={styles.markerWrap} pointerEvents="box-none">
          <Pressable
            testID="new-entries"
            accessibilityRole="button"
            onPress={showNew}
            style={[styles.marker, { backgroundColor: colors.accent }]}
          >
            <Text variant="label" color={colors.accentText}>
              ↑ {live.held.length} new {live.held.length === 1 ? 'entry' : 'entries'}
            </Text>
          </Pressable>
        </View>
      ) : null}
    </View>
  );
}

/** A dive phase where it falls among the entries: a labelled rule, not an entry. */
function PhaseDivider({ label, at, table, phase }: { label: string; at: string; table: boolean; phase: string }) {
  const { colors } = useTheme();
  return (
    <View
      style={[styles.phase, table && styles.phaseTable]}
      testID={`log-phase-${phase}`}
      role="separator"
      aria-label={`${label} at ${formatUtcTime(at)}`}
    >
      <View style={[styles.rule, { backgroundColor: colors.border }]} />
      <Text variant="monoSmall" muted>
        {formatUtcTime(at)}
      </Text>
      <Text variant="label" muted>
        {label}
      </Text>
      <View style={[styles.rule, { backgroundColor: colors.border }]} />
    </View>
  );
}

function Separator() {
  return <View style={styles.sep} />;
}

const styles = StyleSheet.create({
  fill: { flex: 1 },
  // The entry button sits outside the list (in the header, or in the bar under it on phones), so
  // the list's end needs no room kept for it.
  content: { padding: space.lg, paddingBottom: space.xl },
  tableContent: { paddingTop: space.lg, paddingBottom: space.xl },
  tableHeader: { paddingHorizontal: space.lg },
  sep: { height: space.md },
  phase: { flexDirection: 'row', alignItems: 'center', gap: space.sm, paddingVertical: space.xs },
  phaseTable: { paddingHorizontal: space.md, paddingVertical: space.sm },
  rule: { flex: 1, height: StyleSheet.hairlineWidth },
  end: { textAlign: 'center', paddingVertical: space.lg },
  endBox: { alignItems: 'center', paddingVertical: space.lg, gap: space.xs },
  markerWrap: { position: 'absolute', top: space.md, left: 0, right: 0, alignItems: 'center' },
  marker: { borderRadius: radius.pill, paddingHorizontal: space.lg, paddingVertical: space.sm, elevation: 3 },
});
