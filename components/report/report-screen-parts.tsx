import { useRouter } from 'expo-router';
import { StyleSheet, View } from 'react-native';

import { Chip } from '@/components/ui/chip';
import { Text } from '@/components/ui/text';
import { useCampaign, useCampaignDives } from '@/hooks/campaigns';
import { diveDay } from '@/lib/schemas';
import { space } from '@/lib/tokens';
import { REPORT_WIDTH } from './paper';

/** The days of the campaign with a dive on them, newest first, in the display zone. */
export function useDiveDays(campaignId: string | undefined): string[] | undefined {
  const campaign = useCampaign(campaignId);
  const dives = useCampaignDives(campaignId);
  if (!campaign.data || !dives.data) return undefined;
  const zone = campaign.data.timeZone;
  return [...new Set(dives.data.map((d) => diveDay(d, zone)))].sort().reverse();
}

/** Chips for the days with dives, to move between daily reports. */
export function DayPicker({ campaignId, date }: { campaignId: string; date: string }) {
  const router = useRouter();
  const days = useDiveDays(campaignId);
  if (!days || days.length === 0) return null;
  return (
    <View style={styles.wrap} testID="report-days">
      <Text variant="label">Days with dives</Text>
      <View style={styles.row}>
        {days.map((d) => (
          <Chip
            key={d}
            label={d}
            selected={d === date}
            testID={`report-day-${d}`}
            onPress={() => router.replace(`/campaigns/${campaignId}/report/${d}`)}
          />
        ))}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.xs, width: '100%', maxWidth: REPORT_WIDTH + 2 * space.xl, alignSelf: 'center' },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
});
