import { StyleSheet, View } from 'react-native';

import { Text } from '@/components/ui/text';
import { useTheme } from '@/hooks/theme';
import { formatUtc } from '@/lib/format';
import type { TelemetrySamples } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';

const count = (n: number) => n.toLocaleString('en');

/** The dive's log imports, newest first: who, when, which file, what it did and what it covered. */
export function ImportHistory({ imports, limit = 10 }: { imports: TelemetrySamples['imports']; limit?: number }) {
  const { colors } = useTheme();
  if (imports.length === 0) return null;
  return (
    <View style={styles.wrap} testID="import-history">
      <Text variant="label">Log imports</Text>
      {imports.slice(0, limit).map((i) => (
        <View key={i.id} style={[styles.item, { borderColor: colors.border }]} testID={`import-${i.id}`}>
          <Text variant="caption">
            {formatUtc(i.importedAt)} · {i.importedByName} · {i.fileName ?? 'log'} ·{' '}
            {i.mode === 'replace' ? 'replaced the log' : 'added to the log'}
          </Text>
          <Text variant="caption" muted>
            {count(i.rowsTaken)} rows taken{i.rowsRejected > 0 ? `, ${count(i.rowsRejected)} rejected` : ''}
            {i.span ? ` · covers ${formatUtc(i.span.firstAt)} to ${formatUtc(i.span.lastAt)}` : ''}
          </Text>
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.xs },
  item: { borderLeftWidth: 2, paddingLeft: space.sm, gap: 2, borderRadius: radius.sm },
});
