import { StyleSheet, View } from 'react-native';

import { useMe } from '@/hooks/session';
import { useHandovers, useWatchPlan } from '@/hooks/watches';
import { space } from '@/lib/tokens';
import { HandoverCard } from './handover-card';
import { OnWatch } from './on-watch';

/**
 * Above the dive log: who is on watch now, and for someone of the incoming watch the latest
 * handover note with its Acknowledge button.
 */
export function DiveWatch({ campaignId, timeZone }: { campaignId: string; timeZone: string }) {
  const me = useMe();
  const handovers = useHandovers(campaignId);
  const on = useWatchPlan(campaignId).data?.onWatch;
  const myId = me.data?.user.id;
  const latest = handovers.data?.items[0];
  // Shown while the incoming watch is still on, so the acknowledgment stays in sight once given.
  const mine =
    latest?.incoming && on && latest.incoming.start === on.start && latest.incoming.members.some((m) => m.id === myId) ? latest : null;
  return (
    <View style={styles.box}>
      <OnWatch campaignId={campaignId} />
      {mine ? <HandoverCard handover={mine} timeZone={timeZone} canAcknowledge /> : null}
    </View>
  );
}

const styles = StyleSheet.create({ box: { gap: space.sm } });
