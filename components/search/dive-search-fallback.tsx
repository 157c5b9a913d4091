import { StyleSheet, View } from 'react-native';

import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useDebounced, useSearch, type SearchFilters } from '@/hooks/search';
import type { Observation } from '@/lib/schemas';
import { space } from '@/lib/tokens';
import { SearchResults } from './search-results';

type Props = {
  diveId: string;
  q: string;
  /** The dive log's own filters; those search knows apply here too. */
  filters: Pick<SearchFilters, 'kind' | 'tag' | 'author' | 'hasPhotos' | 'verification'>;
  onSelect: (o: Observation) => void;
};

/**
 * When none of the entries the dive log has loaded match its search box, the whole dive is
 * searched on the server (older entries, typos, tags, names and find numbers included).
 */
export function DiveSearchFallback({ diveId, q, filters, onSelect }: Props) {
  const typed = useDebounced(q.trim(), 300);
  const scope: SearchFilters = { diveId };
  for (const key of ['kind', 'tag', 'author', 'hasPhotos', 'verification'] as const) {
    const v = filters[key];
    if (v) (scope as Record<string, string>)[key] = v;
  }
  const search = useSearch(typed, scope);
  const items = search.data?.pages.flatMap((p) => p.items) ?? [];
  if (typed === '' || search.isPending) return <LoadingState label="Searching the whole dive…" />;
  if (search.isError) return <ErrorState error={search.error} onRetry={() => void search.refetch()} />;
  if (items.length === 0) return <EmptyState title="Nothing found" body={`No entry of this dive matches “${typed}” — try fewer words.`} />;
  return (
    <View style={styles.wrap} testID="dive-search-fallback">
      <Text variant="caption" muted>
        None of the loaded entries match; the whole dive has {search.data?.pages[0]?.total === 1 ? 'this one' : 'these'}:
      </Text>
      <SearchResults items={items} onOpen={onSelect} />
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.md, paddingVertical: space.md },
});
