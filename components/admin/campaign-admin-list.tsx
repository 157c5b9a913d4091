import { useQueries } from '@tanstack/react-query';
import { useRouter } from 'expo-router';
import { StyleSheet, View } from 'react-native';

import { Card } from '@/components/ui/card';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { campaignMembersQuery, useCampaigns } from '@/hooks/campaigns';
import { useTheme } from '@/hooks/theme';
import type { Member } from '@/lib/schemas';
import { space } from '@/lib/tokens';

/** Every campaign on this server with its leads, as the site administrator sees them. */
export function CampaignAdminList() {
  const { colors } = useTheme();
  const router = useRouter();
  const campaigns = useCampaigns();
  const ids = campaigns.data?.map((c) => c.id) ?? [];
  const teams = useQueries({ queries: ids.map((id) => campaignMembersQuery(id)) });
  if (campaigns.isPending) return <LoadingState label="Loading campaigns…" />;
  if (campaigns.isError) return <ErrorState error={campaigns.error} onRetry={() => void campaigns.refetch()} />;
  if (campaigns.data.length === 0) return <EmptyState title="No campaigns yet" body="Create the first one and name its lead." />;
  return (
    <View style={styles.list} testID="admin-campaigns">
      {campaigns.data.map((c, n) => {
        const team = teams[n];
        const leads = team?.data?.filter((m: Member) => m.role === 'lead') ?? [];
        const leadLine = team?.isPending
          ? 'Looking up its leads…'
          : team?.isError
            ? 'Its leads could not be loaded.'
            : leads.length > 0
              ? `Lead${leads.length > 1 ? 's' : ''}: ${leads.map((l) => l.name || l.email).join(', ')}`
              : 'No lead yet: the first lead joins when they open their invitation.';
        return (
          <Card key={c.id} testID={`admin-campaign-${c.id}`} label={c.name} onPress={() => router.push(`/campaigns/${c.id}`)}>
            <Text variant="label">{c.name}</Text>
            <Text variant="caption" muted>
              {[
                c.siteName,
                c.startDate && c.endDate ? `${c.startDate} → ${c.endDate}` : null,
                `${c.diveCount} dives`,
                `${team?.data?.length ?? '…'} members`,
              ]
                .filter(Boolean)
                .join(' · ')}
            </Text>
            <Text
              variant="caption"
              color={leads.length > 0 || team?.isPending ? colors.text : colors.warning}
              testID="admin-campaign-leads"
            >
              {leadLine}
            </Text>
          </Card>
        );
      })}
    </View>
  );
}

const styles = StyleSheet.create({
  list: { gap: space.md },
});
