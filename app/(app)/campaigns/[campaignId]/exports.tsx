import { useLocalSearchParams } from 'expo-router';

import { ExportPanel } from '@/components/exports/export-panel';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';

export default function CampaignExportsScreen() {
  const { campaignId } = useLocalSearchParams<{ campaignId: string }>();
  return (
    <Screen>
      <ScreenHeader title="Exports" back={`/campaigns/${campaignId}`} />
      <ScreenBody>
        <ExportPanel campaignId={campaignId} />
      </ScreenBody>
    </Screen>
  );
}
