import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { useToast } from '@/components/ui/toast';
import { ApiError } from '@/hooks/api';
import { useInvitations, useResendInvitation, useRevokeInvitation } from '@/hooks/team';
import { useTheme } from '@/hooks/theme';
import { formatUtc } from '@/lib/format';
import type { Invitation } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';
import { roleLabels } from '@/lib/permissions';

import { invitationStatusLabels } from './roles';

/**
 * Open invitations (pending or expired) first, with their actions and where their mail stands (a
 * mail the server could not send shows why, with "Send again"); answered ones below.
 */
export function InvitationList({ campaignId }: { campaignId: string }) {
  const invitations = useInvitations(campaignId, true);
  if (invitations.isPending) return <LoadingState label="Loading invitations…" />;
  if (invitations.isError) return <ErrorState error={invitations.error} onRetry={() => void invitations.refetch()} />;
  const open = invitations.data.filter((i) => i.status === 'pending' || i.status === 'expired');
  const past = invitations.data.filter((i) => i.status === 'accepted' || i.status === 'revoked');
  return (
    <View style={styles.wrap} testID="invitations">
      <Text variant="title" role="heading" aria-level={2}>
        Invitations
      </Text>
      {invitations.data.length === 0 ? (
        <EmptyState title="No invitations yet" body="People you invite appear here until they join." />
      ) : null}
      {open.map((i) => (
        <InvitationRow key={i.id} campaignId={campaignId} invitation={i} testID={`invitation-${i.email}`} />
      ))}
      {past.length > 0 ? (
        <>
          <Text variant="label" muted>
            Answered and withdrawn
          </Text>
          {past.map((i) => (
            <InvitationRow key={i.id} campaignId={campaignId} invitation={i} testID={`past-invitation-${i.id}`} />
          ))}
        </>
      ) : null}
    </View>
  );
}

function InvitationRow({ campaignId, invitation: i, testID }: { campaignId: string; invitation: Invitation; testID: string }) {
  const { colors } = useTheme();
  const toast = useToast();
  const resend = useResendInvitation(campaignId);
  const revoke = useRevokeInvitation(campaignId);
  const tint = { pending: colors.accent, expired: colors.warning, accepted: colors.success, revoked: colors.textMuted }[i.status];
  const open = i.status === 'pending' || i.status === 'expired';
  const mailFailed = i.mail?.state === 'failed';
  const mailWaiting = i.mail?.state === 'queued' || i.mail?.state === 'sending';
  const error = resend.error ?? revoke.error;
  const detail = {
    pending: `Invited by ${i.invitedByName} · the link works until ${formatUtc(i.expiresAt).slice(0, 16)}Z`,
    expired: `The link expired on ${formatUtc(i.expiresAt).slice(0, 16)}Z. Resend it for a new one.`,
    accepted: i.acceptedAt ? `Joined on ${formatUtc(i.acceptedAt).slice(0, 16)}Z` : 'Joined',
    revoked: 'Withdrawn: the link no longer works. Invite them again if they should join.',
  }[i.status];
  return (
    <Card testID={testID} accent={tint}>
      <View style={styles.heading}>
        <Text variant="label" style={styles.flex} numberOfLines={1}>
          {i.email}
        </Text>
        <View style={[styles.badge, { borderColor: tint }]}>
          <Text variant="caption" color={tint} testID="invitation-status">
            {invitationStatusLabels[i.status]}
          </Text>
        </View>
      </View>
      <Text variant="caption" muted>
        {`${roleLabels[i.role]} · ${detail}`}
      </Text>
      {open && mailFailed ? (
        <Text color={colors.danger} variant="caption" role="alert" testID="invitation-mail-failed">
          {`The mail could not be sent: ${i.mail?.reason ?? 'no reason given'}. Send it again once the mail server is back.`}
        </Text>
      ) : null}
      {open && mailWaiting ? (
        <Text variant="caption" muted testID="invitation-mail-waiting">
          {i.mail?.attempts
            ? `The mail is waiting for another try (${i.mail.reason ?? 'the mail server did not take it'}).`
            : 'The mail is queued and goes out in a moment.'}
        </Text>
      ) : null}
      {open ? (
        <View style={styles.actions}>
          <Button
            label={mailFailed ? 'Send again' : 'Resend'}
            tone="secondary"
            compact
            testID={mailFailed ? 'invitation-send-again' : 'invitation-resend'}
            busy={resend.isPending}
            disabled={revoke.isPending}
            onPress={() => {
              revoke.reset();
              resend.mutate(i.id, {
                onSuccess: () => toast(`A new link is on its way to ${i.email}; the old one stops working once it has gone.`),
              });
            }}
          />
          <Button
            label="Revoke"
            tone="ghost"
            compact
            testID="invitation-revoke"
            busy={revoke.isPending}
            disabled={resend.isPending}
            onPress={() => {
              resend.reset();
              revoke.mutate(i.id, { onSuccess: () => toast(`The invitation to ${i.email} was withdrawn.`) });
            }}
          />
        </View>
      ) : null}
      {error ? (
        <Text color={colors.danger} role="alert" testID="invitation-error">
          {error instanceof ApiError ? error.message : 'That did not go through. Try again.'}
        </Text>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.md },
  heading: { flexDirection: 'row', alignItems: 'center', gap: space.md },
  flex: { flex: 1, minWidth: 0 },
  badge: { borderWidth: 1, borderRadius: radius.pill, paddingHorizontal: space.md, paddingVertical: 2 },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
});
