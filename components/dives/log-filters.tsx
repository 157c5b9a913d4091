import { StyleSheet, View } from 'react-native';

import { ListCsvButton } from '@/components/exports/list-csv-button';
import { Chip } from '@/components/ui/chip';
import { Text } from '@/components/ui/text';
import { useCampaignTags } from '@/hooks/campaigns';
import type { DiveLogFilters } from '@/hooks/observations';
import { useCampaignMembers } from '@/hooks/team';
import { useTheme } from '@/hooks/theme';
import { observationKinds } from '@/lib/schemas';
import { space, tagColors } from '@/lib/tokens';
import { kindLabels } from '../observations/kind-badge';

type Props = { campaignId: string; filters: DiveLogFilters; onChange: (f: DiveLogFilters) => void; isLead: boolean };

type Sort = NonNullable<DiveLogFilters['sort']>;
type Order = NonNullable<DiveLogFilters['order']>;
/** The orders the log can be read in (the table's column headers sort the same way). */
const sorts: { sort: Sort; order: Order; label: string; id: string }[] = [
  { sort: 'time', order: 'desc', label: 'Newest first', id: 'newest' },
  { sort: 'time', order: 'asc', label: 'Oldest first', id: 'oldest' },
  { sort: 'depth', order: 'desc', label: 'Deepest first', id: 'deepest' },
  { sort: 'depth', order: 'asc', label: 'Shallowest first', id: 'shallowest' },
  { sort: 'kind', order: 'asc', label: 'By kind', id: 'kind' },
  { sort: 'author', order: 'asc', label: 'By author', id: 'author' },
];

/**
 * Order the log, and narrow it by kind, tag, author, photos and verification; leads can also look
 * at retired entries.
 */
export function LogFilters({ campaignId, filters, onChange, isLead }: Props) {
  const { colors, scheme } = useTheme();
  const members = [...(useCampaignMembers(campaignId).data ?? [])].sort((a, b) => a.name.localeCompare(b.name));
  const tags = (useCampaignTags(campaignId).data ?? []).filter((t) => !t.retired && t.usage > 0).sort((a, b) => b.usage - a.usage);
  const set = (patch: Partial<DiveLogFilters>) => onChange({ ...filters, ...patch });
  const sort = filters.sort ?? 'time';
  const order = filters.order ?? (sort === 'time' || sort === 'depth' ? 'desc' : 'asc');
  return (
    <View style={styles.wrap} testID="log-filters">
      <View style={styles.row} testID="log-sort">
        <Text variant="caption" muted>
          Order
        </Text>
        {sorts.map((o) => (
          <Chip
            key={o.id}
            label={o.label}
            selected={sort === o.sort && order === o.order}
            onPress={() =>
              o.sort === 'time' && o.order === 'desc' ? set({ sort: undefined, order: undefined }) : set({ sort: o.sort, order: o.order })
            }
            testID={`sort-${o.id}`}
          />
        ))}
      </View>
      <View style={styles.row}>
        <Chip label="All kinds" selected={!filters.kind} onPress={() => set({ kind: undefined })} testID="filter-kind-all" />
        {observationKinds.map((k) => (
          <Chip
            key={k}
            label={kindLabels[k]}
            color={colors.kind[k]}
            selected={filters.kind === k}
            onPress={() => set({ kind: filters.kind === k ? undefined : k })}
            testID={`filter-kind-${k}`}
          />
        ))}
        <Chip
          label="With photos"
          selected={filters.hasPhotos === 'true'}
          onPress={() => set({ hasPhotos: filters.hasPhotos === 'true' ? undefined : 'true' })}
          testID="filter-photos"
        />
        {(['unverified', 'verified', 'disputed'] as const).map((v) => (
          <Chip
            key={v}
            label={`ID ${v}`}
            selected={filters.verification === v}
            onPress={() => set({ verification: filters.verification === v ? undefined : v })}
          />
        ))}
      </View>
      {members.length > 1 ? (
        <View style={styles.row} testID="filter-authors">
          <Text variant="caption" muted>
            Logged by
          </Text>
          {members.map((m) => (
            <Chip
              key={m.userId}
              label={m.name}
              selected={filters.author === m.userId}
              onPress={() => set({ author: filters.author === m.userId ? undefined : m.userId })}
              testID={`filter-author-${m.userId}`}
            />
          ))}
        </View>
      ) : null}
      {tags.length > 0 ? (
        <View style={styles.row}>
          <Text variant="caption" muted>
            Tag
          </Text>
          {tags.map((t) => (
            <Chip
              key={t.id}
              label={`#${t.name}`}
              color={tagColors(t.name, scheme).fg}
              selected={filters.tag === t.name}
              onPress={() => set({ tag: filters.tag === t.name ? undefined : t.name })}
              testID={`filter-tag-${t.name}`}
            />
          ))}
        </View>
      ) : null}
      {isLead ? (
        <View style={styles.row}>
          <Chip
            label={filters.retired ? 'Showing retired entries' : 'Retired entries'}
            color={colors.danger}
            selected={!!filters.retired}
            onPress={() => set({ retired: filters.retired ? undefined : 'only' })}
            testID="filter-retired"
          />
          {filters.retired ? (
            <Text variant="caption" muted style={styles.note}>
              Only leads see these. Open one to restore it to the log.
            </Text>
          ) : null}
        </View>
      ) : null}
      <ListCsvButton campaignId={campaignId} filters={filters} />
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.sm },
  // Rows wrap: every choice stays in sight on a phone instead of running off the edge.
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, alignItems: 'center', paddingVertical: 2 },
  note: { flexGrow: 1, flexShrink: 1, flexBasis: 200 },
});
