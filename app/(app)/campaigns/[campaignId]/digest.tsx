import { useLocalSearchParams } from 'expo-router';
import { View } from 'react-native';

import { DigestLog } from '@/components/digests/digest-log';
import { SubscriptionForm } from '@/components/digests/subscription-form';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';
import { useCampaign } from '@/hooks/campaigns';
import { space } from '@/lib/tokens';

export default function CampaignDigestScreen() {
  const { campaignId } = useLocalSearchParams<{ campaignId: string }>();
  const campaign = useCampaign(campaignId);
  const role = campaign.data?.myRole;
  return (
    <Screen>
      <ScreenHeader title="Digest" subtitle={campaign.data?.name} back={`/campaigns/${campaignId}`} />
      <ScreenBody>
        <View style={{ gap: space.xl }}>
          {role && role !== 'admin' ? <SubscriptionForm campaignId={campaignId} /> : null}
          {role === 'lead' ? <DigestLog campaignId={campaignId} /> : null}
        </View>
      </ScreenBody>
    </Screen>
  );
}
