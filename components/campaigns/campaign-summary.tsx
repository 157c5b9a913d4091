import { StyleSheet, View } from 'react-native';

import { Text } from '@/components/ui/text';
import { useTheme } from '@/hooks/theme';
import { formatLatLon } from '@/lib/format';
import type { Campaign } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';

export function CampaignSummary({ campaign: c }: { campaign: Campaign }) {
  const { colors } = useTheme();
  const facts: [string, string | null][] = [
    ['Site datum', formatLatLon(c.datumLat, c.datumLon)],
    ['Dates', c.startDate && c.endDate ? `${c.startDate} → ${c.endDate}` : null],
    ['Vessel', c.vessel],
    ['Vehicle', c.vehicle],
    ['Permit', c.permitRef],
    ['Display time zone', c.timeZone],
  ];
  return (
    <View style={[styles.box, { borderColor: colors.border, backgroundColor: colors.surface }]} testID="campaign-summary">
      {facts
        .filter((f): f is [string, string] => !!f[1])
        .map(([k, v]) => (
          <View key={k} style={styles.fact}>
            <Text variant="caption" muted>
              {k}
            </Text>
            <Text variant={k === 'Site datum' ? 'monoSmall' : 'body'}>{v}</Text>
          </View>
        ))}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { borderWidth: 1, borderRadius: radius.lg, padding: space.lg, flexDirection: 'row', flexWrap: 'wrap', gap: space.lg },
  fact: { minWidth: 150, gap: 2 },
});
