import { StyleSheet, View } from 'react-native';

import { Text } from '@/components/ui/text';
import { useTheme } from '@/hooks/theme';
import { formatUtc } from '@/lib/format';
import type { TelemetrySamples } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';

const count = (n: number) => n.toLocaleString('en');

/** The dive's log imports, newest first: who, when, which file, what it did and what it covered, with its warnings and first rejected lines. */
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
          {i.warnings.map((w) => (
            <Text key={w.code + w.message} variant="caption" color={colors.warning} testID="import-warning">
              {w.message}
            </Text>
          ))}
          {i.rejected.map((r) => (
            <Text key={r.line} variant="caption" muted testID="import-rejected-line">
              Line {r.line}: {r.reason}
            </Text>
          ))}
          {i.rowsRejected > i.rejected.length ? (
            <Text variant="caption" muted>
              and {count(i.rowsRejected - i.rejected.length)} more rejected
            </Text>
          ) : null}
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.xs },
  item: { borderLeftWidth: 2, paddingLeft: space.sm, gap: 2, borderRadius: radius.sm },
});
