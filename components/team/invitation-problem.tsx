import { useRouter } from 'expo-router';
import { ScrollView, StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Text } from '@/components/ui/text';
import { useMe, useSignOut } from '@/hooks/session';
import { useTheme } from '@/hooks/theme';
import { radius, space } from '@/lib/tokens';

type Explanation = { key: string; title: string; body: string; next: string; signOutFirst?: boolean };

const used: Explanation = {
  key: 'used',
  title: 'This invitation link was already used',
  body: 'An invitation link works once: it signed someone in the first time it was opened, and it cannot be used again.',
  next: 'If you joined with it, sign in with your account to reach the campaign. If you did not, ask your campaign lead to send you a new invitation.',
};

const expired: Explanation = {
  key: 'expired',
  title: 'This invitation has expired',
  body: 'An invitation link works for 72 hours after it was sent, and this one is older.',
  next: 'Ask your campaign lead to send you a new invitation; the new mail has a fresh link.',
};

const reasons: Record<string, Explanation> = {
  used,
  expired,
  revoked: {
    key: 'revoked',
    title: 'This invitation was withdrawn',
    body: 'The campaign lead revoked it, so its link no longer opens the campaign.',
    next: 'If you should still join, ask your campaign lead to invite you again.',
  },
  replaced: {
    key: 'replaced',
    title: 'A newer invitation mail replaced this link',
    body: 'Your campaign lead sent the invitation again, and only the link in the newest mail works.',
    next: 'Open the link in the most recent invitation mail from Bathynote.',
  },
  'not-yours': {
    key: 'not-yours',
    title: 'This invitation is for someone else',
    body: 'You are signed in with another account than the address the invitation was sent to.',
    next: 'Sign out, then open the link in the invitation mail again.',
    signOutFirst: true,
  },
  'signed-out': {
    key: 'signed-out',
    title: 'You were not signed in',
    body: 'The invitation could not be accepted because nobody was signed in when it was opened.',
    next: 'Open the link in the invitation mail again. If it says the link was already used, ask your campaign lead to resend the invitation.',
  },
};

/** The sign-in service's codes for a link it would not take. */
const errors: Record<string, Explanation> = {
  INVALID_TOKEN: {
    ...used,
    key: 'invalid-token',
    title: 'This invitation link no longer works',
    body: 'An invitation link works once, and only until it expires. This one was already used, has expired, was replaced by a newer mail, or its invitation was withdrawn.',
  },
  INVITATION_CLOSED: {
    ...used,
    key: 'invitation-closed',
    title: 'This invitation is no longer open',
    body: 'The invitation behind this link was withdrawn, has expired or was already accepted, so it cannot make an account.',
  },
  EXPIRED_TOKEN: { ...expired, key: 'expired-token' },
  ATTEMPTS_EXCEEDED: { ...used, key: 'attempts-exceeded' },
};

const unknown: Explanation = {
  key: 'unknown',
  title: 'The invitation could not be opened',
  body: 'Something went wrong while signing you in with this link.',
  next: 'Try the link again in a minute. If it still fails, ask your campaign lead to send you a new invitation.',
};

export function explain(reason: string | undefined, error: string | undefined): Explanation {
  if (reason && reasons[reason]) return reasons[reason];
  if (error && errors[error.toUpperCase()]) return errors[error.toUpperCase()]!;
  return unknown;
}

/** What went wrong with an invitation link, in plain words, and the way on from here. */
export function InvitationProblem({ reason, error }: { reason?: string; error?: string }) {
  const { colors } = useTheme();
  const router = useRouter();
  const me = useMe().data;
  const signOut = useSignOut();
  const e = explain(reason, error);
  return (
    <ScrollView style={{ backgroundColor: colors.bg }} contentContainerStyle={styles.page} testID="invitation-problem">
      <View style={[styles.card, { backgroundColor: colors.surface, borderColor: colors.border }]} testID={`invitation-problem-${e.key}`}>
        <Text variant="heading" color={colors.accent}>
          Bathynote
        </Text>
        <Text variant="title" role="heading" aria-level={1} testID="invitation-problem-title">
          {e.title}
        </Text>
        <Text testID="invitation-problem-body">{e.body}</Text>
        <Text testID="invitation-problem-next">{e.next}</Text>
        {me ? (
          <>
            <Text variant="caption" muted testID="invitation-problem-signed-in">
              {`You are signed in as ${me.user.name} (${me.user.email}).`}
            </Text>
            <View style={styles.actions}>
              {e.signOutFirst ? null : (
                <Button label="Open your campaigns" testID="invitation-problem-campaigns" onPress={() => router.replace('/')} />
              )}
              <Button
                label={e.signOutFirst ? 'Sign out' : 'Sign out and use another account'}
                tone={e.signOutFirst ? 'primary' : 'secondary'}
                testID="invitation-problem-sign-out"
                busy={signOut.isPending}
                onPress={() => signOut.mutate()}
              />
            </View>
          </>
        ) : (
          <View style={styles.actions}>
            <Button label="Sign in" testID="invitation-problem-sign-in" onPress={() => router.replace('/sign-in')} />
          </View>
        )}
      </View>
    </ScrollView>
  );
}

const styles = StyleSheet.create({
  page: { flexGrow: 1, alignItems: 'center', justifyContent: 'center', padding: space.lg },
  card: { width: '100%', maxWidth: 480, borderWidth: 1, borderRadius: radius.lg, padding: space.xl, gap: space.md },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, marginTop: space.sm },
});
