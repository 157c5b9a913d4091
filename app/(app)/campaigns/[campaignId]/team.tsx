import { useLocalSearchParams } from 'expo-router';

import { TeamPanel } from '@/components/team/team-panel';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';
import { useCampaign } from '@/hooks/campaigns';

export default function CampaignTeamScreen() {
  const { campaignId } = useLocalSearchParams<{ campaignId: string }>();
  const campaign = useCampaign(campaignId);
  return (
    <Screen>
      <ScreenHeader title="Team" subtitle={campaign.data?.name} back={`/campaigns/${campaignId}`} />
      <ScreenBody>
        <TeamPanel campaignId={campaignId} />
      </ScreenBody>
    </Screen>
  );
}
