import { useRouter } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';

import { kindLabels } from '@/components/observations/kind-badge';
import { Text } from '@/components/ui/text';
import { useTheme } from '@/hooks/theme';
import { diveWindow } from '@/lib/dive-window';
import { formatUtc } from '@/lib/format';
import type { Dive, SummaryObservation } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';

/** The window as people read it: "2026-05-13 16:40:00Z to 2026-05-14 00:05:00Z". */
function windowText(dive: Dive): string | null {
  const w = diveWindow(dive);
  if (!w) return null;
  const from = formatUtc(new Date(w.from).toISOString());
  return w.to === null ? `from ${from}` : `${from} to ${formatUtc(new Date(w.to).toISOString())}`;
}

/**
 * Entries whose time lies outside the dive's window, listed apart from the plots and the figures:
 * each is kept (logging from the video later is real work), but a wrong date must show, not
 * stretch the dive's time axis.
 */
export function OutsideEntries({ dive, entries }: { dive: Dive; entries: SummaryObservation[] }) {
  const { colors } = useTheme();
  const router = useRouter();
  const outside = entries.filter((o) => o.outsideDive);
  if (outside.length === 0) return null;
  const span = windowText(dive);
  return (
    <View style={styles.wrap} testID="outside-entries">
      <Text variant="label">Outside the dive</Text>
      <Text variant="caption" muted>
        {outside.length === 1 ? 'This entry’s time lies' : `These ${outside.length} entries’ times lie`} outside dive {dive.number}
        {span ? ` (${span})` : ''}, so the profile, the site plan and the figures above leave {outside.length === 1 ? 'it' : 'them'} out.
        Check the date.
      </Text>
      {outside.map((o) => (
        <Pressable
          key={o.id}
          accessibilityRole="link"
          onPress={() => router.push(`/observations/${o.id}`)}
          style={[styles.row, { borderColor: colors.border, backgroundColor: colors.surface }]}
          testID={`outside-entry-${o.id}`}
        >
          <Text variant="mono" color={colors.warning}>
            {formatUtc(o.observedAt)}
          </Text>
          <Text style={styles.title} numberOfLines={2}>
            {kindLabels[o.kind]} · {o.title}
          </Text>
        </Pressable>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.sm },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, borderWidth: 1, borderRadius: radius.md, padding: space.md },
  title: { flexShrink: 1, minWidth: 160 },
});
