import type { ReactNode } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';

import { timecodeOf } from '@/components/telemetry/timecode-label';
import { Text } from '@/components/ui/text';
import type { DiveLogFilters } from '@/hooks/observations';
import { useTheme } from '@/hooks/theme';
import { isOtherDay, isOutsideDive } from '@/lib/dive-window';
import { formatDepth, formatScientificName, formatTemperature, formatUtcTime } from '@/lib/format';
import { formatHeading } from '@/lib/heading';
import type { Dive, Observation } from '@/lib/schemas';
import { CELL_GAP, ROW_PADDING, TITLE_MIN_WIDTH, type Column, type ColumnId } from './log-columns';
import { kindLabels } from '../observations/kind-badge';

type Sort = NonNullable<DiveLogFilters['sort']>;

/** A cell's box: its fixed width, or the rest of the row for the title. */
const cellStyle = (c: Column) => (c.width ? { width: c.width } : styles.titleCell);

export function LogTableHeader({
  columns,
  filters,
  onSort,
}: {
  columns: readonly Column[];
  filters: DiveLogFilters;
  onSort: (sort: Sort, order: 'asc' | 'desc') => void;
}) {
  const { colors } = useTheme();
  const sort = filters.sort ?? 'time';
  const order = filters.order ?? (sort === 'time' ? 'desc' : 'asc');
  return (
    <View style={[styles.row, styles.header, { borderBottomColor: colors.border }]} role="row" testID="log-table-header">
      {columns.map((c) => {
        const active = c.sort === sort;
        const label = `${c.label}${active ? (order === 'asc' ? ' ▲' : ' ▼') : ''}`;
        return c.sort ? (
          <Pressable
            key={c.id}
            role="columnheader"
            aria-sort={active ? (order === 'asc' ? 'ascending' : 'descending') : 'none'}
            style={cellStyle(c)}
            testID={`sort-${c.sort}`}
            onPress={() => onSort(c.sort!, active ? (order === 'asc' ? 'desc' : 'asc') : c.sort === 'time' ? 'desc' : 'asc')}
          >
            <Text variant="label" numberOfLines={1} color={active ? colors.accent : colors.textMuted} testID={`column-${c.id}`}>
              {label}
            </Text>
          </Pressable>
        ) : (
          <View key={c.id} role="columnheader" style={cellStyle(c)}>
            <Text variant="label" numberOfLines={1} muted testID={`column-${c.id}`}>
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
  columns: readonly Column[];
  selected: boolean;
  onPress: () => void;
  recording?: Dive['recording'];
  /** The dive's phases and plan: an entry outside its window is marked. */
  timing?: Pick<Dive, 'phases' | 'plannedStartAt'>;
};

export function LogTableRow({ observation: o, columns, selected, onPress, recording, timing }: RowProps) {
  const { colors } = useTheme();
  const tc = recording ? timecodeOf({ recording }, o.observedAt)?.label : null;
  const cells: Record<ColumnId, () => ReactNode> = {
    date: () => (
      <>
        <Text variant="monoSmall" muted={!!timing && !isOtherDay(timing, o.observedAt)}>
          {o.observedAt.slice(0, 10)}
        </Text>
        {timing && isOutsideDive(timing, o.observedAt) ? (
          <Text variant="caption" color={colors.warning} testID="entry-outside-dive">
            outside the dive
          </Text>
        ) : null}
      </>
    ),
    time: () => (
      <>
        <Text variant="monoSmall">{formatUtcTime(o.observedAt)}</Text>
        {tc ? (
          <Text variant="monoSmall" muted testID="observation-timecode" accessibilityLabel={`Video time code ${tc}`}>
            TC {tc}
          </Text>
        ) : null}
      </>
    ),
    kind: () => (
      <Text variant="caption" color={colors.kind[o.kind]}>
        {kindLabels[o.kind]}
      </Text>
    ),
    title: () => (
      <Text numberOfLines={2} testID="observation-title">
        {o.title}
        {o.photoCount > 0 ? ` · ${o.photoCount} photo${o.photoCount > 1 ? 's' : ''}` : ''}
      </Text>
    ),
    depth: () => <Text variant="monoSmall">{formatDepth(o.depth)}</Text>,
    // Latitude over longitude: two short lines read better than one long one in a narrow column.
    position: () =>
      o.lat == null || o.lon == null ? (
        <Text variant="monoSmall" muted>
          —
        </Text>
      ) : (
        <>
          <Text variant="monoSmall">{`${Math.abs(o.lat).toFixed(5)}° ${o.lat >= 0 ? 'N' : 'S'}`}</Text>
          <Text variant="monoSmall">{`${Math.abs(o.lon).toFixed(5)}° ${o.lon >= 0 ? 'E' : 'W'}`}</Text>
        </>
      ),
    temperature: () => <Text variant="monoSmall">{formatTemperature(o.temperature)}</Text>,
    heading: () => <Text variant="monoSmall">{formatHeading(o.heading)}</Text>,
    altitude: () => <Text variant="monoSmall">{o.altitude == null ? '—' : `${o.altitude.toFixed(1)} m`}</Text>,
    count: () => (
      <Text variant="monoSmall" muted={o.individualCount === null && o.organismQuantity === null}>
        {o.individualCount !== null
          ? String(o.individualCount)
          : o.organismQuantity !== null
            ? `${o.organismQuantity}${o.organismQuantityType === '% cover' ? ' %' : o.organismQuantityType === 'individuals per m²' ? '/m²' : ''}`
            : '—'}
      </Text>
    ),
    identification: () =>
      o.identification ? (
        <Text variant="caption" style={styles.italic} numberOfLines={2}>
          {formatScientificName(o.identification.scientificName, o.identification.qualifier)}
          {o.identification.verificationStatus === 'verified' ? ' ✓' : ''}
        </Text>
      ) : (
        <Text variant="caption" muted>
          —
        </Text>
      ),
    find: () => (
      <Text variant="monoSmall" muted={!o.findNumber}>
        {o.findNumber ?? '—'}
      </Text>
    ),
    author: () => (
      <Text variant="caption" muted numberOfLines={2}>
        {o.authorName}
      </Text>
    ),
  };
  return (
    <Pressable
      role="row"
      testID={`observation-${o.id}`}
      aria-selected={selected}
      onPress={onPress}
      style={[styles.row, { borderBottomColor: colors.border, backgroundColor: selected ? colors.surfaceAlt : 'transparent' }]}
    >
      {columns.map((c) => (
        <View key={c.id} style={cellStyle(c)} testID={`cell-${c.id}`}>
          {cells[c.id]()}
        </View>
      ))}
    </Pressable>
  );
}

const styles = StyleSheet.create({
  row: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: CELL_GAP,
    paddingHorizontal: ROW_PADDING,
    paddingVertical: 6,
    minHeight: 44,
    borderBottomWidth: StyleSheet.hairlineWidth,
  },
  header: { minHeight: 36, paddingVertical: 0 },
  titleCell: { flex: 1, minWidth: TITLE_MIN_WIDTH },
  italic: { fontStyle: 'italic' },
});
