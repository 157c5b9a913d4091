import { useLocalSearchParams } from 'expo-router';
import { useState } from 'react';

import { SampleRegister } from '@/components/taxa/sample-register';
import { TaxaList } from '@/components/taxa/taxa-list';
import { Segmented } from '@/components/ui/segmented';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';
import { useCampaign } from '@/hooks/campaigns';

export default function CampaignTaxaScreen() {
  const { campaignId } = useLocalSearchParams<{ campaignId: string }>();
  const campaign = useCampaign(campaignId);
  const [view, setView] = useState<'taxa' | 'samples'>('taxa');
  return (
    <Screen>
      <ScreenHeader
        title={campaign.data ? `${campaign.data.name} · taxa and samples` : 'Campaign taxa and samples'}
        back={`/campaigns/${campaignId}`}
        backLabel="Campaign"
      />
      <ScreenBody>
        <Segmented
          label="Show"
          hideLabel
          value={view}
          onChange={setView}
          options={[
            { value: 'taxa', label: 'Taxa' },
            { value: 'samples', label: 'Samples' },
          ]}
          testID="record-view"
        />
        {view === 'taxa' ? <TaxaList scope={{ campaignId }} /> : <SampleRegister scope={{ campaignId }} />}
      </ScreenBody>
    </Screen>
  );
}
