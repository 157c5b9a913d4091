import { useQuery } from '@tanstack/react-query';
import { useLocalSearchParams } from 'expo-router';

import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';
import { ErrorState, LoadingState } from '@/components/ui/states';
import { HandoverList } from '@/components/watches/handover-list';
import { OnWatch } from '@/components/watches/on-watch';
import { WatchPlanEditor } from '@/components/watches/watch-plan-editor';
import { WatchPlanView } from '@/components/watches/watch-plan-view';
import { campaignMembersQuery, useCampaign } from '@/hooks/campaigns';
import { useWatchPlan } from '@/hooks/watches';

export default function CampaignWatchesScreen() {
  const { campaignId } = useLocalSearchParams<{ campaignId: string }>();
  const campaign = useCampaign(campaignId);
  const plan = useWatchPlan(campaignId);
  const isLead = campaign.data?.myRole === 'lead';
  const members = useQuery({ ...campaignMembersQuery(campaignId), enabled: isLead });
  return (
    <Screen>
      <ScreenHeader
        title={campaign.data ? `${campaign.data.name} · watches` : 'Watches'}
        back={`/campaigns/${campaignId}`}
        backLabel="Campaign"
      />
      <ScreenBody>
        {plan.isPending ? <LoadingState /> : null}
        {plan.isError ? <ErrorState error={plan.error} onRetry={() => void plan.refetch()} /> : null}
        <OnWatch campaignId={campaignId} />
        {plan.data && isLead && members.data ? (
          <WatchPlanEditor key={plan.data.updatedAt ?? 'new'} plan={plan.data} members={members.data} />
        ) : null}
        {plan.data && campaign.data && !isLead ? <WatchPlanView plan={plan.data} /> : null}
        {campaign.data ? <HandoverList campaignId={campaignId} timeZone={campaign.data.timeZone} role={campaign.data.myRole} /> : null}
      </ScreenBody>
    </Screen>
  );
}
