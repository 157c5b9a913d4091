import { useRouter } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Segmented } from '@/components/ui/segmented';
import { Text } from '@/components/ui/text';
import { useToast } from '@/components/ui/toast';
import { ApiError } from '@/hooks/api';
import { useChangeRole, useRemoveMember } from '@/hooks/team';
import { useTheme } from '@/hooks/theme';
import type { CampaignRole, Member } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';
import { roleLabels, roleOrder, roleWithArticle } from '@/lib/permissions';

type Props = { campaignId: string; campaignName: string; members: Member[]; meId: string | undefined; manage: boolean };

export function MemberList({ campaignId, campaignName, members, meId, manage }: Props) {
  const sorted = [...members].sort((a, b) => roleOrder.indexOf(a.role) - roleOrder.indexOf(b.role) || a.name.localeCompare(b.name));
  return (
    <View style={styles.list} testID="member-list">
      {sorted.map((m) =>
        manage ? (
          <ManagedMember key={m.userId} campaignId={campaignId} campaignName={campaignName} member={m} isMe={m.userId === meId} />
        ) : (
          <Card key={m.userId} testID={`member-${m.email}`}>
            <MemberHeading member={m} isMe={m.userId === meId} />
          </Card>
        ),
      )}
    </View>
  );
}

function MemberHeading({ member: m, isMe }: { member: Member; isMe: boolean }) {
  const { colors } = useTheme();
  return (
    <View style={styles.heading}>
      <View style={styles.flex}>
        <Text variant="label">{isMe ? `${m.name} (you)` : m.name}</Text>
        <Text variant="caption" muted numberOfLines={1}>
          {m.email}
        </Text>
      </View>
      <View style={[styles.badge, { borderColor: m.role === 'lead' ? colors.accent : colors.border }]}>
        <Text variant="caption" testID="member-role-label">
          {roleLabels[m.role]}
        </Text>
      </View>
    </View>
  );
}

/** Why the server refused: a campaign keeps a lead, said in the terms of this member. */
function refusal(err: unknown, m: Member, isMe: boolean): string | null {
  if (!(err instanceof ApiError)) return err ? 'That did not go through. Try again.' : null;
  if (err.code === 'last_lead') {
    return `${isMe ? 'You are' : `${m.name} is`} the only lead of this campaign, and a campaign always keeps at least one lead. Make another member lead first; then this role can change.`;
  }
  return err.message;
}

type Pending = { kind: 'role'; role: CampaignRole } | { kind: 'remove' } | null;

function ManagedMember({
  campaignId,
  campaignName,
  member: m,
  isMe,
}: {
  campaignId: string;
  campaignName: string;
  member: Member;
  isMe: boolean;
}) {
  const { colors } = useTheme();
  const toast = useToast();
  const router = useRouter();
  const change = useChangeRole(campaignId);
  const remove = useRemoveMember(campaignId);
  const [pending, setPending] = useState<Pending>(null);
  const busy = change.isPending || remove.isPending;
  const error = refusal(change.error ?? remove.error, m, isMe);

  const applyRole = (role: CampaignRole) => {
    setPending(null);
    remove.reset();
    change.mutate(
      { userId: m.userId, role },
      { onSuccess: () => toast(isMe ? `You are now ${roleWithArticle[role]}.` : `${m.name} is now ${roleWithArticle[role]}.`) },
    );
  };
  const pickRole = (role: CampaignRole) => {
    if (role === m.role || busy) return;
    change.reset();
    // Giving up one's own lead role ends one's own say over the team: ask first.
    if (isMe && m.role === 'lead') setPending({ kind: 'role', role });
    else applyRole(role);
  };
  const confirmRemove = () => {
    setPending(null);
    change.reset();
    remove.mutate(m.userId, {
      onSuccess: () => {
        toast(isMe ? `You left ${campaignName}.` : `${m.name} was removed from the team.`);
        // Having left, this person may no longer open the campaign at all.
        if (isMe) router.replace('/');
      },
    });
  };

  return (
    <Card testID={`member-${m.email}`}>
      <MemberHeading member={m} isMe={isMe} />
      <Segmented<CampaignRole>
        label={`Role of ${m.name}`}
        hideLabel
        testID="member-role"
        value={pending?.kind === 'role' ? pending.role : m.role}
        onChange={pickRole}
        options={roleOrder.map((r) => ({ value: r, label: roleLabels[r] }))}
      />
      {pending?.kind === 'role' ? (
        <View style={[styles.confirm, { borderColor: colors.warning }]} testID="member-confirm">
          <Text>
            {`Make yourself ${roleWithArticle[pending.role]}? You would no longer manage the team, the tags or the dives of ${campaignName}.`}
          </Text>
          <View style={styles.actions}>
            <Button label="Change my role" tone="danger" compact testID="member-role-confirm" onPress={() => applyRole(pending.role)} />
            <Button label="Stay lead" tone="secondary" compact testID="member-cancel" onPress={() => setPending(null)} />
          </View>
        </View>
      ) : null}
      {pending?.kind === 'remove' ? (
        <View style={[styles.confirm, { borderColor: colors.danger }]} testID="member-confirm">
          <Text>
            {isMe
              ? `Leave ${campaignName}? You lose access to it at once. The entries you logged stay in the record.`
              : `Remove ${m.name} from ${campaignName}? They lose access at once. The entries they logged stay in the record.`}
          </Text>
          <View style={styles.actions}>
            <Button
              label={isMe ? 'Leave the campaign' : 'Remove from the team'}
              tone="danger"
              compact
              testID="member-remove-confirm"
              onPress={confirmRemove}
            />
            <Button label="Cancel" tone="secondary" compact testID="member-cancel" onPress={() => setPending(null)} />
          </View>
        </View>
      ) : (
        <View style={styles.actions}>
          <Button
            label={isMe ? 'Leave…' : 'Remove…'}
            tone="ghost"
            compact
            busy={remove.isPending}
            disabled={busy}
            testID="member-remove"
            onPress={() => {
              change.reset();
              remove.reset();
              setPending({ kind: 'remove' });
            }}
          />
          {change.isPending ? (
            <Text variant="caption" muted>
              Changing the role…
            </Text>
          ) : null}
        </View>
      )}
      {error ? (
        <View style={[styles.problem, { backgroundColor: colors.dangerBg }]}>
          <Text color={colors.danger} role="alert" testID="member-error">
            {error}
          </Text>
        </View>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  list: { gap: space.md },
  heading: { flexDirection: 'row', alignItems: 'center', gap: space.md },
  flex: { flex: 1, minWidth: 0 },
  badge: { borderWidth: 1, borderRadius: radius.pill, paddingHorizontal: space.md, paddingVertical: 2 },
  confirm: { borderLeftWidth: 3, paddingLeft: space.md, gap: space.sm },
  actions: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.sm },
  problem: { borderRadius: radius.md, padding: space.md },
});
