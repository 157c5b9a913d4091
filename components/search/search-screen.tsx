import { useRouter } from 'expo-router';
import { useEffect, useMemo, useRef, useState } from 'react';
import { ScrollView, StyleSheet, TextInput, View, type NativeSyntheticEvent, type TextInputKeyPressEventData } from 'react-native';

import { saveFile } from '@/components/exports/save-file';
import { ObservationDetail } from '@/components/observations/observation-detail';
import { Button } from '@/components/ui/button';
import { Chip } from '@/components/ui/chip';
import { Icon } from '@/components/ui/icon';
import { Screen, ScreenHeader } from '@/components/ui/screen';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useKeyboardShortcuts } from '@/hooks/keyboard';
import { useLayout } from '@/hooks/layout';
import { useDebounced, useRecentSearches, useSearch, type SearchFilters } from '@/hooks/search';
import { useMe } from '@/hooks/session';
import { useTheme } from '@/hooks/theme';
import { SEARCH_MAX_LENGTH, type SearchResult } from '@/lib/schemas/search';
import { fonts, radius, space } from '@/lib/tokens';
import { SearchFilterChips } from './search-filters';
import { groupByCampaign, SearchResults } from './search-results';

type Props = {
  /** The query and filters as the URL holds them: the URL is where a search lives. */
  q: string;
  filters: SearchFilters;
  /** The entry open beside the results on wide screens. */
  entryId?: string;
};

/**
 * Search across every campaign the person belongs to. What is typed reaches the URL after a short
 * pause (replacing the address rather than adding to the history), so a search can be shared and
 * the back button returns to it; on wide screens the chosen entry opens beside the results.
 */
export function SearchScreen({ q, filters, entryId }: Props) {
  const router = useRouter();
  const { colors } = useTheme();
  const { splitView, breakpoint } = useLayout();
  const keyboard = breakpoint !== 'phone';
  const me = useMe().data;
  const { recent, remember, clear } = useRecentSearches(me?.user.id);
  const [text, setText] = useState(q);
  const typed = useDebounced(text, 250);
  const input = useRef<TextInput>(null);
  const [cursor, setCursor] = useState<string | undefined>(entryId);

  // Another search arriving through the URL (a recent search, the back button) fills the box.
  const lastUrlQ = useRef(q);
  useEffect(() => {
    if (q !== lastUrlQ.current) {
      lastUrlQ.current = q;
      setText(q);
    }
  }, [q]);
  useEffect(() => {
    if (typed === lastUrlQ.current) return;
    lastUrlQ.current = typed;
    router.setParams({ q: typed || undefined });
  }, [typed, router]);

  const search = useSearch(q, filters);
  const items = useMemo(() => search.data?.pages.flatMap((p) => p.items) ?? [], [search.data]);
  // Arrow keys go through the results in the order they are shown (grouped by campaign).
  const shown = useMemo(() => groupByCampaign(items).flatMap((g) => g.items), [items]);
  const first = search.data?.pages[0];

  const setFilters = (next: SearchFilters) => {
    const cleared = Object.fromEntries(Object.keys(filters).map((k) => [k, undefined]));
    router.setParams({ ...cleared, ...next });
  };
  const open = (item: SearchResult) => {
    remember(q);
    setCursor(item.id);
    if (splitView) router.setParams({ entry: item.id });
    else router.push(`/observations/${item.id}`);
  };
  const move = (by: number) => {
    if (shown.length === 0) return;
    const at = shown.findIndex((i) => i.id === cursor);
    const next = shown[at < 0 ? 0 : Math.min(shown.length - 1, Math.max(0, at + by))]!;
    setCursor(next.id);
    if (splitView) router.setParams({ entry: next.id });
  };
  useKeyboardShortcuts(
    {
      '/': () => input.current?.focus(),
      ArrowDown: () => move(1),
      ArrowUp: () => move(-1),
      Enter: () => {
        const item = shown.find((i) => i.id === cursor);
        if (item) open(item);
      },
    },
    keyboard,
  );
  const onKeyPress = (e: NativeSyntheticEvent<TextInputKeyPressEventData>) => {
    // From the box, the down arrow steps into the results.
    if (keyboard && e.nativeEvent.key === 'ArrowDown' && shown.length > 0) {
      input.current?.blur();
      move(cursor ? 0 : 1);
    }
  };

  let body: React.ReactNode;
  if (q.trim() === '') {
    body = (
      <View style={styles.recent} testID="recent-searches">
        {recent.length > 0 ? (
          <>
            <View style={styles.recentHead}>
              <Text variant="label">Recent searches</Text>
              <Button label="Forget" tone="secondary" compact onPress={clear} testID="recent-clear" />
            </View>
            <View style={styles.chips}>
              {recent.map((r) => (
                <Chip
                  key={r}
                  label={r}
                  onPress={() => setText(r)}
                  action={{ accessibilityLabel: `Search again for ${r}` }}
                  testID="recent-search"
                />
              ))}
            </View>
          </>
        ) : (
          <EmptyState
            title="Search every campaign you belong to"
            body="Titles, notes, tags, scientific names and find numbers. Spelling slips are forgiven; a find number or a name typed exactly comes first."
          />
        )}
      </View>
    );
  } else if (search.isPending) {
    body = <LoadingState label="Searching…" />;
  } else if (search.isError && !search.data) {
    body = <ErrorState error={search.error} onRetry={() => void search.refetch()} />;
  } else if (items.length === 0) {
    body = (
      <EmptyState
        title="Nothing matched — try fewer words"
        body={Object.keys(filters).length > 0 ? 'Or loosen the filters: each one narrows the results further.' : undefined}
      />
    );
  } else {
    body = (
      <View style={styles.results}>
        <View style={styles.summary}>
          <Text variant="caption" muted testID="search-total" role="status" style={styles.fill}>
            {first?.total === 1 ? '1 entry' : `${first?.total ?? items.length} entries`}
            {first?.widened ? ' · close spellings included' : ''}
            {search.isFetching && !search.isFetchingNextPage ? ' · updating…' : ''}
          </Text>
          <Button
            label="Download as CSV"
            tone="secondary"
            compact
            testID="search-download-csv"
            onPress={() => saveFile(`/api/search/export.csv?${new URLSearchParams({ q, ...filters }).toString()}`)}
          />
        </View>
        <SearchResults items={items} selectedId={splitView ? entryId : cursor} onOpen={open} />
        {search.hasNextPage ? (
          <Button
            label="More results"
            tone="secondary"
            busy={search.isFetchingNextPage}
            onPress={() => void search.fetchNextPage()}
            testID="search-more"
          />
        ) : null}
      </View>
    );
  }

  const list = (
    <ScrollView style={styles.fill} contentContainerStyle={styles.listInner} keyboardShouldPersistTaps="handled" testID="search-list">
      <View style={[styles.box, { borderColor: colors.border, backgroundColor: colors.surface }]}>
        <Icon name="search" color={colors.textMuted} size={20} />
        <TextInput
          ref={input}
          value={text}
          onChangeText={setText}
          onKeyPress={onKeyPress}
          onSubmitEditing={() => remember(text)}
          placeholder="Search titles, notes, tags, names, find numbers"
          placeholderTextColor={colors.textMuted}
          accessibilityLabel="Search"
          autoFocus={q === ''}
          autoCapitalize="none"
          autoCorrect={false}
          returnKeyType="search"
          maxLength={SEARCH_MAX_LENGTH}
          testID="search-input"
          style={[styles.input, { color: colors.text, fontFamily: fonts.regular }]}
        />
        {text ? <Button label="Clear" tone="secondary" compact onPress={() => setText('')} testID="search-clear" /> : null}
      </View>
      <SearchFilterChips filters={filters} onChange={setFilters} myId={me?.user.id} />
      {body}
    </ScrollView>
  );

  return (
    <Screen>
      <ScreenHeader title="Search" subtitle={keyboard ? 'Keys: / search · ↑ ↓ choose · Enter open' : undefined} />
      {splitView ? (
        <View style={styles.split}>
          <View style={[styles.listPane, { borderRightColor: colors.border }]}>{list}</View>
          <ScrollView style={styles.fill} testID="detail-pane" contentContainerStyle={styles.detailInner}>
            {entryId ? (
              <ObservationDetail id={entryId} />
            ) : (
              <EmptyState title="Choose a result" body="The entry opens here, beside the results." />
            )}
          </ScrollView>
        </View>
      ) : (
        list
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  fill: { flex: 1 },
  listInner: { padding: space.lg, gap: space.md, maxWidth: 960, width: '100%', alignSelf: 'center' },
  box: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: space.sm,
    borderWidth: 1,
    borderRadius: radius.md,
    paddingHorizontal: space.md,
    minHeight: 48,
  },
  input: { flex: 1, fontSize: 16, paddingVertical: space.sm },
  results: { gap: space.md },
  summary: { flexDirection: 'row', alignItems: 'center', gap: space.sm },
  recent: { gap: space.sm },
  recentHead: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between' },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs },
  split: { flex: 1, flexDirection: 'row' },
  listPane: { width: 560, borderRightWidth: StyleSheet.hairlineWidth },
  detailInner: { padding: space.xl },
});
