import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useToast } from '@/components/ui/toast';
import { ApiError } from '@/hooks/api';
import { useDigestLog, useSendDigestNow } from '@/hooks/digests';
import { useTheme } from '@/hooks/theme';
import { formatUtc } from '@/lib/format';
import type { DigestLogItem, MailState } from '@/lib/schemas';
import { space } from '@/lib/tokens';

const triggerLabels = { 'after-dive': 'after a dive', daily: 'daily', manual: 'sent by a lead' } as const;
const stateLabels: Record<MailState, string> = {
  queued: 'Queued',
  sending: 'Sending',
  sent: 'Sent',
  failed: 'Failed',
  cancelled: 'Not sent',
};

/** The lead's log of the campaign's digests with where each mail stands, and "send now". */
export function DigestLog({ campaignId }: { campaignId: string }) {
  const toast = useToast();
  const { colors } = useTheme();
  const log = useDigestLog(campaignId, true);
  const send = useSendDigestNow(campaignId);
  if (log.isPending) return <LoadingState label="Loading the digest log…" />;
  if (log.isError) return <ErrorState error={log.error} onRetry={() => void log.refetch()} />;
  return (
    <View style={styles.wrap} testID="digest-log">
      <Text variant="title" role="heading" aria-level={2}>
        Digests sent
      </Text>
      <Button
        label="Send digests now"
        tone="secondary"
        compact
        testID="digest-send-now"
        busy={send.isPending}
        style={styles.start}
        onPress={() =>
          send.mutate(
            {},
            {
              onSuccess: (r) =>
                toast(
                  r.queued.length === 0
                    ? 'Nothing new for any subscriber: no digest sent.'
                    : `${r.queued.length} digest${r.queued.length === 1 ? '' : 's'} on the way${r.nothingNew ? `; ${r.nothingNew} with nothing new` : ''}.`,
                ),
            },
          )
        }
      />
      {send.error ? (
        <Text color={colors.danger} role="alert">
          {send.error instanceof ApiError ? send.error.message : 'That did not go through. Try again.'}
        </Text>
      ) : null}
      {log.data.length === 0 ? (
        <EmptyState title="No digests yet" body="Digests appear here once a dive comes on deck or you send one." />
      ) : null}
      {log.data.map((d) => (
        <DigestRow key={d.id} digest={d} />
      ))}
    </View>
  );
}

function DigestRow({ digest: d }: { digest: DigestLogItem }) {
  const { colors } = useTheme();
  const state = d.mail?.state ?? 'queued';
  const tint = { queued: colors.accent, sending: colors.accent, sent: colors.success, failed: colors.danger, cancelled: colors.textMuted }[
    state
  ];
  return (
    <Card testID={`digest-${d.id}`} accent={tint}>
      <View style={styles.heading}>
        <Text variant="label" style={styles.flex} numberOfLines={2}>
          {`${d.recipientName}: ${d.observationCount} ${d.observationCount === 1 ? 'entry' : 'entries'}`}
        </Text>
        <Text variant="caption" color={tint} testID="digest-state">
          {stateLabels[state]}
        </Text>
      </View>
      <Text variant="caption" muted numberOfLines={2}>
        {`${d.trigger ? triggerLabels[d.trigger] : 'digest'} · ${formatUtc(d.createdAt)}${d.since ? ` · since ${formatUtc(d.since)}` : ''}`}
      </Text>
      {d.mail && d.mail.attempts > 1 && state !== 'failed' ? (
        <Text variant="caption" muted>{`Retried: ${d.mail.attempts} attempts`}</Text>
      ) : null}
      {d.mail?.reason && state !== 'sent' ? (
        <Text variant="caption" color={state === 'failed' ? colors.danger : undefined} muted={state !== 'failed'} testID="digest-reason">
          {d.mail.reason}
        </Text>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.md },
  heading: { flexDirection: 'row', alignItems: 'center', gap: space.md },
  flex: { flex: 1, minWidth: 0 },
  start: { alignSelf: 'flex-start' },
});
