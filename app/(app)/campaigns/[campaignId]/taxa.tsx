import { useLocalSearchParams } from 'expo-router';

import { TaxaAndSamples } from '@/components/taxa/taxa-and-samples';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';
import { useCampaign } from '@/hooks/campaigns';

export default function CampaignTaxaScreen() {
  const { campaignId } = useLocalSearchParams<{ campaignId: string }>();
  const campaign = useCampaign(campaignId);
  return (
    <Screen>
      <ScreenHeader
        title={campaign.data ? `${campaign.data.name} · taxa and samples` : 'Campaign taxa and samples'}
        back={`/campaigns/${campaignId}`}
        backLabel="Campaign"
      />
      <ScreenBody>
        <TaxaAndSamples scope={{ campaignId }} />
      </ScreenBody>
    </Screen>
  );
}
