import { CampaignList } from '@/components/campaigns/campaign-list';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';

export default function CampaignsScreen() {
  return (
    <Screen>
      <ScreenHeader title="Campaigns" subtitle="The campaigns you belong to" />
      <ScreenBody>
        <CampaignList />
      </ScreenBody>
    </Screen>
  );
}
