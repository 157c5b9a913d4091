import { useLocalSearchParams, useRouter } from 'expo-router';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useLayout } from '@/hooks/layout';
import { useMailOutbox } from '@/hooks/team';
import { useTheme } from '@/hooks/theme';
import { formatUtc } from '@/lib/format';
import type { CaughtMailItem } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';
import { MailHtml } from './mail-html';

/**
 * The mail the server caught instead of sending (no SMTP_URL set): invitations and digests, to
 * read and follow while trying the app out. A phone shows the list or one mail; a wide screen both.
 */
export function MailOutbox() {
  const { splitView } = useLayout();
  const router = useRouter();
  const { mail: openId } = useLocalSearchParams<{ mail?: string }>();
  const outbox = useMailOutbox();
  if (outbox.isPending) return <LoadingState label="Loading caught mail…" />;
  if (outbox.isError) return <ErrorState error={outbox.error} onRetry={() => void outbox.refetch()} />;
  if (outbox.data === null) {
    return (
      <EmptyState
        title="Mail goes out for real"
        body="This server sends mail through its SMTP server (SMTP_URL), so nothing is caught here. Look in the recipients’ mailboxes instead."
      />
    );
  }
  const mails = outbox.data;
  const open = mails.find((m) => m.id === openId);
  const select = (id: string | undefined) => router.setParams({ mail: id });
  const refresh = (
    <Button
      label="Refresh"
      tone="secondary"
      compact
      testID="outbox-refresh"
      busy={outbox.isFetching}
      onPress={() => void outbox.refetch()}
    />
  );
  const list =
    mails.length === 0 ? (
      <EmptyState title="No mail caught yet" body="Invitations appear here as soon as a lead sends one." action={refresh} />
    ) : (
      <View style={styles.list} testID="outbox-list">
        <View style={styles.heading}>
          <Text variant="caption" muted style={styles.flex}>
            {`${mails.length} mail${mails.length === 1 ? '' : 's'}, newest first`}
          </Text>
          {refresh}
        </View>
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
