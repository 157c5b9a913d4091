import { useRouter } from 'expo-router';
import { StyleSheet, View } from 'react-native';

import { Card } from '@/components/ui/card';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useCampaigns } from '@/hooks/campaigns';
import { space } from '@/lib/tokens';

const roleLabel = { lead: 'Lead', scientist: 'Scientist', pilot: 'Pilot', guest: 'Guest', admin: 'Site administrator' } as const;

export function CampaignList() {
  const router = useRouter();
  const campaigns = useCampaigns();
  if (campaigns.isPending) return <LoadingState label="Loading your campaigns…" />;
  if (campaigns.isError) return <ErrorState error={campaigns.error} onRetry={() => void campaigns.refetch()} />;
  if (campaigns.data.length === 0) {
    return <EmptyState title="No campaigns yet" body="You are not a member of any campaign. A campaign lead can invite you by e-mail." />;
  }
  return (
    <View style={styles.list} testID="campaign-list">
      {campaigns.data.map((c) => (
        <Card key={c.id} testID={`campaign-${c.id}`} label={c.name} onPress={() => router.push(`/campaigns/${c.id}`)}>
          <View style={styles.row}>
            <Text variant="title" style={styles.flex}>
              {c.name}
            </Text>
            <Text variant="caption" muted>
              {roleLabel[c.myRole]}
            </Text>
          </View>
          <Text muted>{c.siteName}</Text>
          <Text variant="monoSmall" muted>
            {[c.startDate && c.endDate ? `${c.startDate} → ${c.endDate}` : null, `${c.diveCount} dives`, `${c.observationCount} entries`]
              .filter(Boolean)
              .join(' · ')}
          </Text>
          {c.vessel || c.vehicle ? (
            <Text variant="caption" muted>
              {[c.vessel, c.vehicle].filter(Boolean).join(' · ')}
            </Text>
          ) : null}
        </Card>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  list: { gap: space.md },
  row: { flexDirection: 'row', alignItems: 'center', gap: space.sm },
  flex: { flex: 1 },
});
