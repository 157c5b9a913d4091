import { useLocalSearchParams, useRouter } from 'expo-router';

import { CampaignSummary } from '@/components/campaigns/campaign-summary';
import { DiveList } from '@/components/dives/dive-list';
import { Button } from '@/components/ui/button';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';
import { ErrorState } from '@/components/ui/states';
import { useCampaign } from '@/hooks/campaigns';

export default function CampaignScreen() {
  const { campaignId } = useLocalSearchParams<{ campaignId: string }>();
  const campaign = useCampaign(campaignId);
  const router = useRouter();
  return (
    <Screen>
      <ScreenHeader
        title={campaign.data?.name ?? 'Campaign'}
        subtitle={campaign.data?.siteName}
        back="/"
        right={
          campaign.data ? (
            <Button
              label="Tags & quick marks"
              tone="secondary"
              compact
              testID="campaign-settings"
              onPress={() => router.push(`/campaigns/${campaignId}/settings`)}
            />
          ) : null
        }
      />
      <ScreenBody>
        {campaign.isError ? <ErrorState error={campaign.error} onRetry={() => void campaign.refetch()} /> : null}
        {campaign.data ? <CampaignSummary campaign={campaign.data} /> : null}
        {campaign.isError ? null : <DiveList campaignId={campaignId} />}
      </ScreenBody>
    </Screen>
  );
}
