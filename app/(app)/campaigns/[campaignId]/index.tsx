import { useLocalSearchParams, useRouter } from 'expo-router';
import { StyleSheet, View } from 'react-native';

import { CampaignSummary } from '@/components/campaigns/campaign-summary';
import { DiveList } from '@/components/dives/dive-list';
import { WelcomeNotice } from '@/components/team/welcome-notice';
import { Button } from '@/components/ui/button';
import { Screen, ScreenBody, ScreenHeader } from '@/components/ui/screen';
import { ErrorState } from '@/components/ui/states';
import { useCampaign } from '@/hooks/campaigns';
import { useLayout } from '@/hooks/layout';
import { space } from '@/lib/tokens';

export default function CampaignScreen() {
  const { campaignId, welcome } = useLocalSearchParams<{ campaignId: string; welcome?: string }>();
  const campaign = useCampaign(campaignId);
  const router = useRouter();
  const { breakpoint } = useLayout();
  const actions = campaign.data ? (
    <View style={styles.actions}>
      <Button label="Team" tone="secondary" compact testID="campaign-team" onPress={() => router.push(`/campaigns/${campaignId}/team`)} />
      <Button
        label="Tags & quick marks"
        tone="secondary"
        compact
        testID="campaign-settings"
        onPress={() => router.push(`/campaigns/${campaignId}/settings`)}
      />
      <Button label="Taxa" tone="secondary" compact testID="campaign-taxa" onPress={() => router.push(`/campaigns/${campaignId}/taxa`)} />
      <Button
        label="Watches"
        tone="secondary"
        compact
        testID="campaign-watches"
        onPress={() => router.push(`/campaigns/${campaignId}/watches`)}
      />
      <Button
        label="Daily report"
        tone="secondary"
        compact
        testID="campaign-report"
        onPress={() => router.push(`/campaigns/${campaignId}/report`)}
      />
      <Button
        label="Exports"
        tone="secondary"
        compact
        testID="campaign-exports"
        onPress={() => router.push(`/campaigns/${campaignId}/exports`)}
      />
      {campaign.data.myRole !== 'admin' ? (
        <Button
          label="Digest"
          tone="secondary"
          compact
          testID="campaign-digest"
          onPress={() => router.push(`/campaigns/${campaignId}/digest`)}
        />
      ) : null}
    </View>
  ) : null;
  // A phone's title bar has no room for two buttons beside the campaign's name.
  const actionsInBody = breakpoint === 'phone';
  return (
    <Screen>
      <ScreenHeader
        title={campaign.data?.name ?? 'Campaign'}
        subtitle={campaign.data?.siteName}
        back="/"
        right={actionsInBody ? null : actions}
      />
      <ScreenBody>
        {campaign.isError ? <ErrorState error={campaign.error} onRetry={() => void campaign.refetch()} /> : null}
        {campaign.data && welcome === '1' ? (
          <WelcomeNotice campaign={campaign.data} onDismiss={() => router.setParams({ welcome: undefined })} />
        ) : null}
        {actionsInBody ? actions : null}
        {campaign.data ? <CampaignSummary campaign={campaign.data} /> : null}
        {campaign.isError ? null : <DiveList campaignId={campaignId} />}
      </ScreenBody>
    </Screen>
  );
}

const styles = StyleSheet.create({
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
});
