import { useLocalSearchParams, useRouter } from 'expo-router';
import type React from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useLayout } from '@/hooks/layout';
import { useMailLog, useRetryMail } from '@/hooks/team';
import { useTheme } from '@/hooks/theme';
import { formatUtc } from '@/lib/format';
import type { CaughtMailItem, MailLogItem, MailState } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';
import { MailHtml } from './mail-html';

/**
 * The site administrator's mail log: every mail the server queued (invitations, digests) with
 * where it stands, a failed one with its reason and "Send again"; then, while no SMTP_URL is set,
 * the mail the built-in catcher caught instead of sending, to read and follow while trying the app
 * out. A phone shows the caught list or one mail; a wide screen both.
 */
export function MailLog() {
  const log = useMailLog();
  if (log.isPending) return <LoadingState label="Loading the mail log…" />;
  if (log.isError) return <ErrorState error={log.error} onRetry={() => void log.refetch()} />;
  const refresh = (
    <Button label="Refresh" tone="secondary" compact testID="outbox-refresh" busy={log.isFetching} onPress={() => void log.refetch()} />
  );
  return (
    <View style={styles.list}>
      <MailQueue items={log.data.items} counts={log.data.counts} refresh={refresh} />
      {log.data.caught === null ? (
        <EmptyState
          title="Mail goes out for real"
          body="This server sends mail through its SMTP server (SMTP_URL), so nothing is caught here. Look in the recipients’ mailboxes instead."
        />
      ) : (
        <CaughtMail mails={log.data.caught} refresh={refresh} />
      )}
    </View>
  );
}

const stateLabels: Record<MailState, string> = {
  queued: 'Queued',
  sending: 'Sending',
  sent: 'Sent',
  failed: 'Failed',
  cancelled: 'Cancelled',
};

function MailQueue({ items, counts, refresh }: { items: MailLogItem[]; counts: Record<MailState, number>; refresh: React.ReactNode }) {
  const { colors } = useTheme();
  const retry = useRetryMail();
  const tint: Record<MailState, string> = {
    queued: colors.accent,
    sending: colors.accent,
    sent: colors.success,
    failed: colors.danger,
    cancelled: colors.textMuted,
  };
  const summary = (Object.keys(stateLabels) as MailState[])
    .filter((s) => counts[s] > 0)
    .map((s) => `${counts[s]} ${stateLabels[s].toLowerCase()}`)
    .join(' · ');
  return (
    <View style={styles.list} testID="mail-queue">
      <View style={styles.heading}>
        <Text variant="title" role="heading" aria-level={2} style={styles.flex}>
          Sent by this server
        </Text>
        {refresh}
      </View>
      <Text variant="caption" muted testID="mail-queue-counts">
        {summary || 'Nothing queued yet.'}
      </Text>
      {items.map((m) => (
        <Card key={m.id} testID={`queued-mail-${m.id}`} accent={tint[m.state]}>
          <View style={styles.heading}>
            <Text variant="label" numberOfLines={2} style={styles.flex}>
              {m.subject}
            </Text>
            <Text variant="caption" color={tint[m.state]} testID="queued-mail-state">
              {stateLabels[m.state]}
            </Text>
          </View>
          <Text variant="caption" muted>
            {`${m.kind === 'digest' ? 'Digest' : m.kind === 'invitation' ? 'Invitation' : 'Mail'} to ${m.to} · queued ${formatUtc(m.createdAt)}`}
          </Text>
          {m.sentAt ? <Text variant="monoSmall" muted>{`Sent ${formatUtc(m.sentAt)}`}</Text> : null}
          {m.state === 'queued' && m.attempts > 0 && m.nextAttemptAt ? (
            <Text variant="caption" muted>{`Attempt ${m.attempts} failed; trying again at ${formatUtc(m.nextAttemptAt)}`}</Text>
          ) : null}
          {m.reason && m.state !== 'sent' ? (
            <Text
              variant="caption"
              color={m.state === 'failed' ? colors.danger : undefined}
              muted={m.state !== 'failed'}
              testID="queued-mail-reason"
            >
              {m.reason}
            </Text>
          ) : null}
          {m.state === 'failed' ? (
            <Button
              label="Send again"
              tone="secondary"
              compact
              testID="queued-mail-retry"
              busy={retry.isPending && retry.variables === m.id}
              onPress={() => retry.mutate(m.id)}
              style={styles.start}
            />
          ) : null}
        </Card>
      ))}
    </View>
  );
}

function CaughtMail({ mails, refresh }: { mails: CaughtMailItem[]; refresh: React.ReactNode }) {
  const { splitView } = useLayout();
  const router = useRouter();
  const { mail: openId } = useLocalSearchParams<{ mail?: string }>();
  const open = mails.find((m) => m.id === openId);
  const select = (id: string | undefined) => router.setParams({ mail: id });
  const list =
    mails.length === 0 ? (
      <EmptyState title="No mail caught yet" body="Invitations and digests appear here as soon as they are sent." action={refresh} />
    ) : (
      <View style={styles.list} testID="outbox-list">
        <Text variant="title" role="heading" aria-level={2}>
          Caught instead of sent
        </Text>
        <Text variant="caption" muted>
          {`${mails.length} mail${mails.length === 1 ? '' : 's'}, newest first`}
        </Text>
        {mails.map((m) => (
          <Card key={m.id} testID={`mail-${m.id}`} label={m.subject} selected={m.id === openId} onPress={() => select(m.id)}>
            <Text variant="label" numberOfLines={2}>
              {m.subject}
            </Text>
            <Text variant="caption" muted numberOfLines={1}>
              {`To ${m.to}`}
            </Text>
            <Text variant="monoSmall" muted>
              {formatUtc(m.receivedAt)}
            </Text>
          </Card>
        ))}
      </View>
    );

  if (splitView) {
    return (
      <View style={styles.split}>
        <View style={styles.listColumn}>{list}</View>
        <View style={styles.detailColumn}>
          {open ? <MailView mail={open} /> : <EmptyState title="Pick a mail" body="Its text, its page and its headers open here." />}
        </View>
      </View>
    );
  }
  if (!open) return list;
  return (
    <View style={styles.list}>
      <Button label="‹ All mail" tone="ghost" compact testID="outbox-back" onPress={() => select(undefined)} style={styles.start} />
      <MailView mail={open} />
    </View>
  );
}

function MailView({ mail: m }: { mail: CaughtMailItem }) {
  const { colors } = useTheme();
  const box = [styles.box, { borderColor: colors.border, backgroundColor: colors.surface }];
  return (
    <View style={styles.list} testID="mail-view">
      <View style={box}>
        <Text variant="title" role="heading" aria-level={2} testID="mail-subject">
          {m.subject}
        </Text>
        <Text variant="caption" muted>{`From ${m.from}`}</Text>
        <Text variant="caption" muted>{`To ${m.to}`}</Text>
        <Text variant="caption" muted>{`Caught ${formatUtc(m.receivedAt)}`}</Text>
      </View>
      <View style={box}>
        <Text variant="label">Text</Text>
        <Text variant="monoSmall" selectable testID="mail-text">
          {m.text}
        </Text>
      </View>
      <View style={box}>
        <Text variant="label">As the reader sees it</Text>
        <MailHtml html={m.html} text={m.text} testID="mail-html" />
      </View>
      <View style={box} testID="mail-headers">
        <Text variant="label">Headers</Text>
        {Object.entries(m.headers).map(([k, v]) => (
          <View key={k} style={styles.header}>
            <Text variant="monoSmall" muted style={styles.headerKey}>
              {k}
            </Text>
            <Text variant="monoSmall" selectable style={styles.flex}>
              {v}
            </Text>
          </View>
        ))}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  list: { gap: space.md },
  split: { flexDirection: 'row', gap: space.xl, alignItems: 'flex-start' },
  listColumn: { width: 340, gap: space.md },
  detailColumn: { flex: 1, minWidth: 0 },
  heading: { flexDirection: 'row', alignItems: 'center', gap: space.md },
  flex: { flex: 1, minWidth: 0 },
  start: { alignSelf: 'flex-start' },
  box: { borderWidth: 1, borderRadius: radius.lg, padding: space.lg, gap: space.sm },
  header: { flexDirection: 'row', gap: space.md, flexWrap: 'wrap' },
  headerKey: { width: 160 },
});
