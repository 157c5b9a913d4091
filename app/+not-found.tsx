import { Link } from 'expo-router';
import { StyleSheet, View } from 'react-native';

import { AppShell } from '@/components/layout/app-shell';
import { Text } from '@/components/ui/text';
import { useMe } from '@/hooks/session';
import { useTheme } from '@/hooks/theme';
import { space } from '@/lib/tokens';

export default function NotFound() {
  const { colors } = useTheme();
  const signedIn = !!useMe().data;
  const page = (
    <View style={[styles.wrap, { backgroundColor: colors.bg }]} testID="not-found">
      <Text variant="heading" role="heading" aria-level={1}>
        Nothing at this depth
      </Text>
      <Text muted style={styles.body}>
        This page does not exist, or it belongs to a campaign you are not a member of.
      </Text>
      <Link href="/" style={{ color: colors.accent }}>
        <Text color={colors.accent}>{signedIn ? 'Back to your campaigns' : 'Sign in'}</Text>
      </Link>
    </View>
  );
  // Someone signed in keeps the navigation, so a wrong link is not a dead end.
  return signedIn ? <AppShell>{page}</AppShell> : page;
}

const styles = StyleSheet.create({
  wrap: { flex: 1, alignItems: 'center', justifyContent: 'center', gap: space.md, padding: space.xl },
  body: { textAlign: 'center' },
});
