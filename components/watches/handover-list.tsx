import { StyleSheet, View } from 'react-native';

import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useMe } from '@/hooks/session';
import { useHandovers } from '@/hooks/watches';
import type { CampaignRole } from '@/lib/schemas';
import { space } from '@/lib/tokens';
import { HandoverCard } from './handover-card';

/** The campaign's handover notes, newest first. */
export function HandoverList({ campaignId, timeZone, role }: { campaignId: string; timeZone: string; role: CampaignRole | 'admin' }) {
  const list = useHandovers(campaignId);
  const me = useMe();
  const myId = me.data?.user.id;
  return (
    <View style={styles.list} testID="handover-list">
      <Text variant="title">Handover notes</Text>
      {list.isPending ? <LoadingState /> : null}
      {list.isError ? <ErrorState error={list.error} onRetry={() => void list.refetch()} /> : null}
      {list.data?.items.length === 0 ? <EmptyState title="No handover notes yet" body="One is written at each change of watch." /> : null}
      {list.data?.items.map((h) => (
        <HandoverCard
          key={h.id}
          handover={h}
          timeZone={timeZone}
          canAcknowledge={role === 'lead' || !!h.incoming?.members.some((m) => m.id === myId)}
          canMail={role === 'lead'}
        />
      ))}
    </View>
  );
}

const styles = StyleSheet.create({ list: { gap: space.sm } });
