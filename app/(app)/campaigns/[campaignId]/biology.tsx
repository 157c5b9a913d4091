import { useLocalSearchParams } from 'expo-router';

import { BiologySettings } from '@/components/campaigns/biology-settings';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';
import { useCampaign } from '@/hooks/campaigns';
import { can } from '@/lib/permissions';

export default function CampaignBiologyScreen() {
  const { campaignId } = useLocalSearchParams<{ campaignId: string }>();
  const campaign = useCampaign(campaignId);
  return (
    <Screen>
      <ScreenHeader title="Substrates & species list" back={`/campaigns/${campaignId}`} backLabel="Campaign" />
      <ScreenBody>
        <BiologySettings campaignId={campaignId} lead={can(campaign.data?.myRole, 'checklist.import')} />
      </ScreenBody>
    </Screen>
  );
}
