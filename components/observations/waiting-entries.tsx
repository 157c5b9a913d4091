import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Text } from '@/components/ui/text';
import { discardWaiting, retryWaiting, useWaitingEntries, type WaitingEntry } from '@/hooks/send-queue';
import { useTheme } from '@/hooks/theme';
import { formatUtcTime } from '@/lib/format';
import { space } from '@/lib/tokens';

/**
 * The signed-in person's entries written on this device that have not reached the server yet.
 * (Their test ids keep the name the browser tests know them by.)
 */
export function WaitingEntries({ diveId, onRetry }: { diveId: string; onRetry: () => void }) {
  const waiting = useWaitingEntries(diveId);
  if (waiting.length === 0) return null;
  return (
    <View style={styles.list} testID="pending-entries">
      {waiting.map((p) => (
        <WaitingCard key={p.clientRef} entry={p} onRetry={onRetry} />
      ))}
    </View>
  );
}

function WaitingCard({ entry, onRetry }: { entry: WaitingEntry; onRetry: () => void }) {
  const { colors } = useTheme();
  const refused = entry.attempts < 0;
  return (
    <Card accent={colors.warning} testID={`pending-${entry.clientRef}`}>
      <View style={styles.row}>
        <Text variant="mono">{entry.body.observedAt ? formatUtcTime(entry.body.observedAt) : '—'}</Text>
        <Text variant="caption" color={refused ? colors.danger : colors.warning}>
          {refused ? 'Refused by the server' : 'Waiting to send'}
        </Text>
      </View>
      <Text variant="title">{entry.body.title}</Text>
      <Text variant="caption" muted>
        {refused
          ? entry.lastError
          : `Kept on this device; tried ${entry.attempts} time${entry.attempts === 1 ? '' : 's'}. ${entry.lastError ?? ''}`}
      </Text>
      <View style={styles.row}>
        <Button
          label={refused ? 'Try again' : 'Send now'}
          tone="secondary"
          compact
          onPress={() => {
            if (refused) retryWaiting(entry.clientRef);
            onRetry();
          }}
          testID="pending-retry"
        />
        <Button label="Discard" tone="ghost" compact onPress={() => discardWaiting(entry.clientRef)} testID="pending-discard" />
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  list: { gap: space.md, marginBottom: space.md },
  row: { flexDirection: 'row', alignItems: 'center', gap: space.md, flexWrap: 'wrap' },
});
