import { Redirect, useLocalSearchParams } from 'expo-router';
import { DateTime } from 'luxon';

import { useDiveDays } from '@/components/report/report-screen-parts';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';
import { ErrorState, LoadingState } from '@/components/ui/states';
import { useCampaign } from '@/hooks/campaigns';

/** The daily report opens on the latest day with a dive, or today in the display zone before any dive. */
export default function DayReportIndex() {
  const { campaignId } = useLocalSearchParams<{ campaignId: string }>();
  const campaign = useCampaign(campaignId);
  const days = useDiveDays(campaignId);
  if (!campaign.data || !days) {
    return (
      <Screen>
        <ScreenHeader title="Daily report" back={`/campaigns/${campaignId}`} backLabel="Campaign" />
        <ScreenBody>
          {campaign.isError ? (
            <ErrorState error={campaign.error} onRetry={() => void campaign.refetch()} />
          ) : (
            <LoadingState label="Finding the latest dive…" />
          )}
        </ScreenBody>
      </Screen>
    );
  }
  const date = days[0] ?? DateTime.now().setZone(campaign.data.timeZone).toISODate();
  return <Redirect href={`/campaigns/${campaignId}/report/${date}`} />;
}
