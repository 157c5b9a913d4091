import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Text } from '@/components/ui/text';
import { useMe } from '@/hooks/session';
import { useTheme } from '@/hooks/theme';
import type { Campaign } from '@/lib/schemas';
import { radius, space } from '@/lib/tokens';
import { roleDescriptions, roleWithArticle } from '@/lib/permissions';

/** Shown once on arrival from an invitation link: where you are now and what you may do. */
export function WelcomeNotice({ campaign, onDismiss }: { campaign: Campaign; onDismiss: () => void }) {
  const { colors } = useTheme();
  const me = useMe().data;
  if (campaign.myRole === 'admin') return null;
  return (
    <View role="status" testID="welcome-notice" style={[styles.box, { borderColor: colors.success, backgroundColor: colors.surface }]}>
      <View style={styles.text}>
        <Text variant="title">{`You joined ${campaign.name} as ${roleWithArticle[campaign.myRole]}.`}</Text>
        <Text muted>{roleDescriptions[campaign.myRole]}</Text>
        {campaign.myRole === 'guest' ? (
          <Text muted testID="welcome-digest">
            You will get a digest mail after each dive with what was logged on it. Change or stop it under Digest.
          </Text>
        ) : null}
        {me && !me.hasPassword ? (
          <Text muted testID="welcome-password">
            You signed in with the link in your invitation. Set a password under Account to sign in again after this session ends, or ask
            for a new sign-in link on the sign-in screen.
          </Text>
        ) : null}
      </View>
      <Button label="Got it" tone="secondary" compact testID="welcome-dismiss" onPress={onDismiss} />
    </View>
  );
}

const styles = StyleSheet.create({
  box: {
    borderWidth: 1,
    borderLeftWidth: 4,
    borderRadius: radius.lg,
    padding: space.lg,
    gap: space.md,
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'center',
  },
  text: { flex: 1, minWidth: 220, gap: space.xs },
});
