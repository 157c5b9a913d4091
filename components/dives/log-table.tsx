import { Pressable, StyleSheet, View } from 'react-native';

import { timecodeOf } from '@/components/telemetry/timecode-label';
import { Text } from '@/components/ui/text';
import type { DiveLogFilters } from '@/hooks/observations';
import { useTheme } from '@/hooks/theme';
import { isOtherDay, isOutsideDive } from '@/lib/dive-window';
import { formatDepth, formatUtcTime } from '@/lib/format';
import type { Dive, Observation } from '@/lib/schemas';
import { space } from '@/lib/tokens';
import { kindLabels } from '../observations/kind-badge';

type Sort = NonNullable<DiveLogFilters['sort']>;
const columns: { key: string; label: string; sort?: Sort; flex: number; mono?: boolean }[] = [
  { key: 'date', label: 'Date', flex: 0.9, mono: true },
  { key: 'time', label: 'Time (UTC)', sort: 'time', flex: 1.1, mono: true },
  { key: 'kind', label: 'Kind', sort: 'kind', flex: 1 },
  { key: 'title', label: 'Title', flex: 3 },
  { key: 'depth', label: 'Depth', sort: 'depth', flex: 0.9, mono: true },
  { key: 'author', label: 'Author', sort: 'author', flex: 1.2 },
];

export function LogTableHeader({ filters, onSort }: { filters: DiveLogFilters; onSort: (sort: Sort, order: 'asc' | 'desc') => void }) {
  const { colors } = useTheme();
  const sort = filters.sort ?? 'time';
  const order = filters.order ?? (sort === 'time' ? 'desc' : 'asc');
  return (
    <View style={[styles.row, styles.header, { borderBottomColor: colors.border }]} role="row">
      {columns.map((c) => {
        const active = c.sort === sort;
        const label = `${c.label}${active ? (order === 'asc' ? ' ▲' : ' ▼') : ''}`;
        return c.sort ? (
          <Pressable
            key={c.key}
            role="columnheader"
            aria-sort={active ? (order === 'asc' ? 'ascending' : 'descending') : 'none'}
            style={{ flex: c.flex }}
            testID={`sort-${c.sort}`}
            onPress={() => onSort(c.sort!, active ? (order === 'asc' ? 'desc' : 'asc') : c.sort === 'time' ? 'desc' : 'asc')}
          >
            <Text variant="label" color={active ? colors.accent : colors.textMuted}>
              {label}
            </Text>
          </Pressable>
        ) : (
          <View key={c.key} role="columnheader" style={{ flex: c.flex }}>
            <Text variant="label" muted>
              {c.label}
            </Text>
          </View>
        );
      })}
    </View>
  );
}

type RowProps = {
  observation: Observation;
  selected: boolean;
  onPress: () => void;
  recording?: Dive['recording'];
  /** The dive's phases and plan: an entry outside its window is marked. */
  timing?: Pick<Dive, 'phases' | 'plannedStartAt'>;
};

export function LogTableRow({ observation: o, selected, onPress, recording, timing }: RowProps) {
  const { colors } = useTheme();
  const tc = recording ? timecodeOf({ recording }, o.observedAt)?.label : null;
  return (
    <Pressable
      role="row"
      testID={`observation-${o.id}`}
      aria-selected={selected}
      onPress={onPress}
      style={[styles.row, { borderBottomColor: colors.border, backgroundColor: selected ? colors.surfaceAlt : 'transparent' }]}
    >
      <View style={{ flex: 0.9 }}>
        <Text variant="monoSmall" muted={!!timing && !isOtherDay(timing, o.observedAt)}>
          {o.observedAt.slice(0, 10)}
        </Text>
        {timing && isOutsideDive(timing, o.observedAt) ? (
          <Text variant="caption" color={colors.warning} testID="entry-outside-dive">
            outside the dive
          </Text>
        ) : null}
      </View>
      <View style={{ flex: 1.1 }}>
        <Text variant="monoSmall">{formatUtcTime(o.observedAt)}</Text>
        {tc ? (
          <Text variant="monoSmall" muted testID="observation-timecode" accessibilityLabel={`Video time code ${tc}`}>
            TC {tc}
          </Text>
        ) : null}
      </View>
      <Text variant="caption" color={colors.kind[o.kind]} style={{ flex: 1 }}>
        {kindLabels[o.kind]}
      </Text>
      <Text numberOfLines={1} style={{ flex: 3 }}>
        {o.title}
        {o.photoCount > 0 ? ` · ${o.photoCount} photo${o.photoCount > 1 ? 's' : ''}` : ''}
      </Text>
      <Text variant="monoSmall" style={{ flex: 0.9 }}>
        {formatDepth(o.depth)}
      </Text>
      <Text variant="caption" muted numberOfLines={1} style={{ flex: 1.2 }}>
        {o.authorName}
      </Text>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  row: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: space.sm,
    paddingHorizontal: space.md,
    minHeight: 40,
    borderBottomWidth: StyleSheet.hairlineWidth,
  },
  header: { minHeight: 36 },
});
