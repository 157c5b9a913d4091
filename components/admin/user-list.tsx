import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Field } from '@/components/ui/field';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useToast } from '@/components/ui/toast';
import { ApiError } from '@/hooks/api';
import { useMe } from '@/hooks/session';
import { useBanUser, useSiteUsers, useUnbanUser, type SiteUser } from '@/hooks/team';
import { useTheme } from '@/hooks/theme';
import { space } from '@/lib/tokens';

/** Every account on this server; the administrator disables one (signing it out at once) or enables it again. */
export function UserList() {
  const users = useSiteUsers(true);
  const meId = useMe().data?.user.id;
  if (users.isPending) return <LoadingState label="Loading accounts…" />;
  if (users.isError) return <ErrorState error={users.error} onRetry={() => void users.refetch()} />;
  if (users.data.users.length === 0) return <EmptyState title="No accounts" />;
  return (
    <View style={styles.list} testID="admin-users">
      {users.data.total > users.data.users.length ? (
        <Text variant="caption" muted>{`The first ${users.data.users.length} of ${users.data.total} accounts, by name.`}</Text>
      ) : null}
      {users.data.users.map((u) => (
        <UserRow key={u.id} user={u} isMe={u.id === meId} />
      ))}
    </View>
  );
}

function UserRow({ user: u, isMe }: { user: SiteUser; isMe: boolean }) {
  const { colors } = useTheme();
  const toast = useToast();
  const ban = useBanUser();
  const unban = useUnbanUser();
  const [confirming, setConfirming] = useState(false);
  const [reason, setReason] = useState('');
  const error = ban.error ?? unban.error;
  const disabled = !!u.banned;
  return (
    <Card testID={`user-${u.email}`} accent={disabled ? colors.danger : undefined}>
      <View style={styles.heading}>
        <View style={styles.flex}>
          <Text variant="label">{isMe ? `${u.name || u.email} (you)` : u.name || u.email}</Text>
          <Text variant="caption" muted numberOfLines={1}>
            {u.email}
          </Text>
        </View>
        <Text variant="caption" color={disabled ? colors.danger : colors.textMuted} testID="user-status">
          {disabled ? 'Disabled' : u.role === 'admin' ? 'Site administrator' : 'Active'}
        </Text>
      </View>
      {disabled && u.banReason ? (
        <Text variant="caption" muted>
          {`Reason: ${u.banReason}`}
        </Text>
      ) : null}
      {isMe ? (
        <Text variant="caption" muted>
          This is your own account: an administrator cannot disable themself.
        </Text>
      ) : disabled ? (
        <View style={styles.row}>
          <Button
            label="Enable"
            tone="secondary"
            compact
            testID="user-enable"
            busy={unban.isPending}
            onPress={() => {
              ban.reset();
              unban.mutate(u.id, { onSuccess: () => toast(`${u.name || u.email} can sign in again.`) });
            }}
          />
        </View>
      ) : confirming ? (
        <View style={styles.confirm}>
          <Text>{`Disable ${u.name || u.email}? They are signed out everywhere at once and cannot sign in until enabled again. Their entries stay in the record.`}</Text>
          <Field label="Reason (optional, kept with the account)" value={reason} onChangeText={setReason} testID="user-disable-reason" />
          <View style={styles.row}>
            <Button
              label="Disable account"
              tone="danger"
              compact
              testID="user-disable-confirm"
              busy={ban.isPending}
              onPress={() =>
                ban.mutate(
                  { userId: u.id, ...(reason.trim() ? { banReason: reason.trim() } : {}) },
                  {
                    onSuccess: () => {
                      setConfirming(false);
                      setReason('');
                      toast(`${u.name || u.email} is disabled and signed out.`);
                    },
                  },
                )
              }
            />
            <Button label="Cancel" tone="secondary" compact onPress={() => setConfirming(false)} />
          </View>
        </View>
      ) : (
        <View style={styles.row}>
          <Button
            label="Disable…"
            tone="ghost"
            compact
            testID="user-disable"
            onPress={() => {
              unban.reset();
              setConfirming(true);
            }}
          />
        </View>
      )}
      {error ? (
        <Text color={colors.danger} role="alert">
          {error instanceof ApiError ? error.message : 'Not done. Try again.'}
        </Text>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  list: { gap: space.md },
  heading: { flexDirection: 'row', alignItems: 'center', gap: space.md },
  flex: { flex: 1, minWidth: 0 },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  confirm: { gap: space.sm },
});
