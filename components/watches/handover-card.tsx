import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Text } from '@/components/ui/text';
import { useTheme } from '@/hooks/theme';
import { useAcknowledgeHandover, useMailHandover } from '@/hooks/watches';
import { phaseSteps } from '@/lib/dive-phases';
import { formatDepth, formatInZone, formatUtc } from '@/lib/format';
import type { Handover } from '@/lib/schemas';
import { space } from '@/lib/tokens';

const kindLabels = { biology: 'Biology', archaeology: 'Archaeology', environment: 'Environment', operations: 'Operations' } as const;

/** A handover note: what the outgoing watch leaves to the incoming one, and whether it was acknowledged. */
export function HandoverCard({
  handover: h,
  timeZone,
  canAcknowledge,
  canMail = false,
}: {
  handover: Handover;
  timeZone: string;
  canAcknowledge: boolean;
  canMail?: boolean;
}) {
  const { colors } = useTheme();
  const ack = useAcknowledgeHandover(h.campaignId);
  const mail = useMailHandover();
  const c = h.content;
  const kinds = (Object.keys(kindLabels) as (keyof typeof kindLabels)[]).filter((k) => (c.entries.byKind[k] ?? 0) > 0);
  const phase = c.dive?.phase ? (phaseSteps.find((s) => s.phase === c.dive?.phase)?.label ?? c.dive.phase) : 'not launched';
  return (
    <Card testID="handover-card" accent={h.acknowledgedAt ? undefined : colors.warning}>
      <Text variant="label">{`${h.outgoing?.name ?? 'No watch'} → ${h.incoming?.name ?? 'no watch'}`}</Text>
      <Text muted variant="caption">{`${formatUtc(h.changeAt)} · ${formatInZone(h.changeAt, timeZone)}`}</Text>
      <Text>
        {c.entries.total === 0
          ? 'No entries logged during the watch.'
          : `${c.entries.total} entries: ${kinds.map((k) => `${kindLabels[k]} ${c.entries.byKind[k]}`).join(', ')}`}
      </Text>
      {c.dive ? <Text testID="handover-dive">{`Dive ${c.dive.number}: ${phase}, depth ${formatDepth(c.dive.depth)}`}</Text> : null}
      <View style={styles.items}>
        <Text variant="label">{`Open items (${c.openItems.length})`}</Text>
        {c.openItems.slice(0, 12).map((o) => (
          <Text key={`${o.kind}-${o.observationId}`} variant="caption" testID="handover-open-item">
            {`• ${o.title}: ${o.detail}`}
          </Text>
        ))}
        {c.openItems.length > 12 ? <Text variant="caption" muted>{`And ${c.openItems.length - 12} more`}</Text> : null}
      </View>
      {h.acknowledgedAt ? (
        <Text muted testID="handover-acknowledged">
          {`Acknowledged by ${h.acknowledgedBy?.name ?? 'someone'} at ${formatUtc(h.acknowledgedAt)}`}
        </Text>
      ) : canAcknowledge ? (
        <View style={styles.row}>
          <Button label="Acknowledge" compact busy={ack.isPending} testID="handover-acknowledge" onPress={() => ack.mutate(h.id)} />
          {ack.isError ? <Text color={colors.danger}>{ack.error.message}</Text> : null}
        </View>
      ) : (
        <Text muted variant="caption">
          Not acknowledged yet
        </Text>
      )}
      {canMail && h.incoming && h.incoming.members.length > 0 ? (
        <View style={styles.row}>
          <Button
            label="Mail to the incoming watch"
            tone="ghost"
            compact
            busy={mail.isPending}
            testID="handover-mail"
            onPress={() => mail.mutate(h.id)}
          />
          {mail.isSuccess ? (
            <Text muted testID="handover-mailed">{`Queued ${mail.data.queued} mail${mail.data.queued === 1 ? '' : 's'}`}</Text>
          ) : null}
          {mail.isError ? <Text color={colors.danger}>{mail.error.message}</Text> : null}
        </View>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  items: { gap: 2, marginTop: space.xs },
  row: { flexDirection: 'row', alignItems: 'center', gap: space.sm, marginTop: space.xs },
});
