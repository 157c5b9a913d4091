import { useLocalSearchParams } from 'expo-router';

import { VocabularySettings } from '@/components/campaigns/vocabulary-settings';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';

export default function CampaignSettingsScreen() {
  const { campaignId } = useLocalSearchParams<{ campaignId: string }>();
  return (
    <Screen>
      <ScreenHeader title="Tags & quick marks" back={`/campaigns/${campaignId}`} />
      <ScreenBody>
        <VocabularySettings campaignId={campaignId} />
      </ScreenBody>
    </Screen>
  );
}
