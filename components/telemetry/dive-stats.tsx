import { StyleSheet, View } from 'react-native';

import { kindLabels } from '@/components/observations/kind-badge';
import { Text } from '@/components/ui/text';
import { useTheme } from '@/hooks/theme';
import { observationKinds, type DiveStatsAnswer, type ObservationKind } from '@/lib/schemas';
import { radius, space, tagColors } from '@/lib/tokens';

const dash = '—';

/** "4 h 07 min", "18 min 30 s", "45 s". */
export function formatDuration(ms: number | null): string {
  if (ms === null) return dash;
  const s = Math.round(ms / 1000);
  const h = Math.floor(s / 3600);
  const m = Math.floor((s % 3600) / 60);
  if (h > 0) return `${h} h ${String(m).padStart(2, '0')} min`;
  if (m > 0) return `${m} min ${String(s % 60).padStart(2, '0')} s`;
  return `${s} s`;
}

const metres = (m: number | null) => (m === null ? dash : m >= 1000 ? `${(m / 1000).toFixed(2)} km` : `${m.toFixed(m >= 100 ? 0 : 1)} m`);
const rate = (r: number | null) => (r === null ? dash : `${r.toFixed(1)} m/min`);

const isKind = (label: string): label is ObservationKind => (observationKinds as readonly string[]).includes(label);

/** The dive's figures as a grid: durations between phases, depth, rates, track and what was logged. */
export function DiveStatsGrid({ stats, maxDepth }: { stats: DiveStatsAnswer; maxDepth: number | null }) {
  const { colors, scheme } = useTheme();
  const facts: [string, string, string][] = [
    ['total', 'Launch to on deck', formatDuration(stats.totalMs)],
    ['descent', 'Descent', formatDuration(stats.descentMs)],
    ['bottom', 'Bottom time', formatDuration(stats.bottomTimeMs)],
    ['ascent', 'Ascent', formatDuration(stats.ascentMs)],
    ['max-depth', 'Maximum depth', maxDepth === null ? dash : `${maxDepth.toFixed(1)} m`],
    ['descent-rate', 'Mean descent rate', rate(stats.descentRateMPerMin)],
    ['ascent-rate', 'Mean ascent rate', rate(stats.ascentRateMPerMin)],
    ['track', 'Track length', metres(stats.trackLengthM)],
    ['entries', 'Entries', String(stats.entryCount)],
  ];
  return (
    <View style={styles.wrap} testID="dive-stats">
      <View style={styles.grid} role="list">
        {facts.map(([key, label, value]) => (
          <View key={key} role="listitem" style={[styles.cell, { borderColor: colors.border, backgroundColor: colors.surface }]}>
            <Text variant="caption" muted>
              {label}
            </Text>
            <Text variant="mono" testID={`stat-${key}`}>
              {value}
            </Text>
          </View>
        ))}
      </View>
      <View style={styles.columns}>
        <View style={styles.column}>
          <Text variant="label">Entries per kind</Text>
          {stats.entriesByKind.length === 0 ? (
            <Text variant="caption" muted>
              No entries yet.
            </Text>
          ) : (
            stats.entriesByKind.map((k) => (
              <View key={k.label} style={styles.row} testID={`stat-kind-${k.label}`}>
                <View style={[styles.dot, { backgroundColor: isKind(k.label) ? colors.kind[k.label] : colors.textMuted }]} />
                <Text style={styles.grow}>{isKind(k.label) ? kindLabels[k.label] : k.label}</Text>
                <Text variant="mono">{k.count}</Text>
              </View>
            ))
          )}
        </View>
        <View style={styles.column}>
          <Text variant="label">Entries per tag</Text>
          {stats.entriesByTag.length === 0 ? (
            <Text variant="caption" muted>
              No tags yet.
            </Text>
          ) : (
            <View style={styles.tags}>
              {stats.entriesByTag.map((tag) => {
                // The tag's own colour, as on the entries.
                const { fg, bg } = tagColors(tag.label, scheme);
                return (
                  <View key={tag.label} style={[styles.tag, { backgroundColor: bg, borderColor: fg }]} testID={`stat-tag-${tag.label}`}>
                    <Text variant="caption" color={fg}>
                      #{tag.label}
                    </Text>
                    <Text variant="monoSmall" color={fg}>
                      {tag.count}
                    </Text>
                  </View>
                );
              })}
            </View>
          )}
        </View>
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.lg },
  grid: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  cell: { flexGrow: 1, flexBasis: 150, borderWidth: 1, borderRadius: radius.md, padding: space.md, gap: 2 },
  columns: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xl },
  column: { flexGrow: 1, flexBasis: 260, gap: space.sm },
  row: { flexDirection: 'row', alignItems: 'center', gap: space.sm },
  grow: { flex: 1 },
  dot: { width: 10, height: 10, borderRadius: 5 },
  tags: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  tag: {
    flexDirection: 'row',
    gap: space.xs,
    alignItems: 'center',
    borderWidth: 1,
    borderRadius: radius.pill,
    paddingHorizontal: space.md,
    paddingVertical: 2,
  },
});
