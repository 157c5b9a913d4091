import { StyleSheet, View } from 'react-native';

import { KindBadge } from '@/components/observations/kind-badge';
import { PhotoImage } from '@/components/photos/photo-image';
import { Card } from '@/components/ui/card';
import { Text } from '@/components/ui/text';
import { apiUrl } from '@/hooks/api';
import { useTheme } from '@/hooks/theme';
import { formatDepth, formatScientificName, formatUtc } from '@/lib/format';
import type { SearchResult } from '@/lib/schemas/search';
import { radius, space } from '@/lib/tokens';
import { HighlightedText } from './highlighted-text';

type Group = { campaignId: string; campaignName: string; items: SearchResult[] };

/** Results grouped by campaign, the groups in the order of their best result. */
export function groupByCampaign(items: SearchResult[]): Group[] {
  const groups = new Map<string, Group>();
  for (const item of items) {
    let g = groups.get(item.campaignId);
    if (!g) {
      g = { campaignId: item.campaignId, campaignName: item.campaignName, items: [] };
      groups.set(item.campaignId, g);
    }
    g.items.push(item);
  }
  return [...groups.values()];
}

const fieldNames: Record<SearchResult['matchedFields'][number], string> = {
  title: 'title',
  tags: 'tags',
  scientificName: 'name',
  findNumber: 'find number',
  note: 'note',
};

function ResultCard({ item, selected, onOpen }: { item: SearchResult; selected: boolean; onOpen: () => void }) {
  const { colors } = useTheme();
  return (
    <Card testID={`search-result-${item.id}`} onPress={onOpen} selected={selected} accent={colors.kind[item.kind]} label={item.title}>
      <View style={styles.row}>
        <View style={styles.text}>
          <View style={styles.meta}>
            <KindBadge kind={item.kind} />
            <Text variant="monoSmall" muted>
              {item.diveNumber} · {formatUtc(item.observedAt)} · {formatDepth(item.depth)}
            </Text>
          </View>
          <HighlightedText variant="title" numberOfLines={2} parts={item.titleParts} testID="search-title" />
          {item.identification || item.findNumber ? (
            <Text variant="caption" muted>
              {[
                item.identification ? formatScientificName(item.identification.scientificName, item.identification.qualifier) : null,
                item.findNumber ? `Find ${item.findNumber}` : null,
              ]
                .filter(Boolean)
                .join(' · ')}
            </Text>
          ) : null}
          {item.snippet.length > 0 ? (
            <HighlightedText variant="caption" numberOfLines={3} parts={item.snippet} testID="search-snippet" />
          ) : null}
          <Text variant="caption" muted testID="search-matched">
            {item.exact ? 'Exact match · ' : ''}found in {item.matchedFields.map((f) => fieldNames[f]).join(', ')}
            {item.tags.length > 0 ? ` · ${item.tags.map((t) => `#${t}`).join(' ')}` : ''}
          </Text>
        </View>
        {item.thumbnailId ? (
          <View style={[styles.thumb, { backgroundColor: colors.surfaceAlt }]}>
            <PhotoImage uri={apiUrl(`/api/photos/${encodeURIComponent(item.thumbnailId)}?size=thumb`)} label={`Photo of ${item.title}`} />
          </View>
        ) : null}
      </View>
    </Card>
  );
}

type Props = { items: SearchResult[]; selectedId?: string; onOpen: (item: SearchResult) => void };

export function SearchResults({ items, selectedId, onOpen }: Props) {
  return (
    <View style={styles.list} testID="search-results">
      {groupByCampaign(items).map((g) => (
        <View key={g.campaignId} style={styles.group} testID={`search-group-${g.campaignId}`}>
          <Text variant="label" role="heading" aria-level={2}>
            {g.campaignName}
          </Text>
          {g.items.map((item) => (
            <ResultCard key={item.id} item={item} selected={item.id === selectedId} onOpen={() => onOpen(item)} />
          ))}
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  list: { gap: space.lg },
  group: { gap: space.sm },
  row: { flexDirection: 'row', gap: space.md },
  text: { flex: 1, gap: 4 },
  meta: { flexDirection: 'row', alignItems: 'center', gap: space.sm, flexWrap: 'wrap' },
  thumb: { width: 72, height: 72, borderRadius: radius.sm, overflow: 'hidden' },
});
