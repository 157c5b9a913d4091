import { useLocalSearchParams } from 'expo-router';

import { TaxaList } from '@/components/taxa/taxa-list';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';
import { useCampaign } from '@/hooks/campaigns';

export default function CampaignTaxaScreen() {
  const { campaignId } = useLocalSearchParams<{ campaignId: string }>();
  const campaign = useCampaign(campaignId);
  return (
    <Screen>
      <ScreenHeader
        title={campaign.data ? `${campaign.data.name} · taxa` : 'Campaign taxa'}
        back={`/campaigns/${campaignId}`}
        backLabel="Campaign"
      />
      <ScreenBody>
        <TaxaList scope={{ campaignId }} />
      </ScreenBody>
    </Screen>
  );
}
