import { Link } from 'expo-router';
import { StyleSheet, View } from 'react-native';

import { Text } from '@/components/ui/text';
import { useTheme } from '@/hooks/theme';
import { space } from '@/lib/tokens';

export default function NotFound() {
  const { colors } = useTheme();
  return (
    <View style={[styles.wrap, { backgroundColor: colors.bg }]} testID="not-found">
      <Text variant="heading">Nothing at this depth</Text>
      <Text muted>This page does not exist, or it belongs to a campaign you are not a member of.</Text>
      <Link href="/" style={{ color: colors.accent }}>
        <Text color={colors.accent}>Back to your campaigns</Text>
      </Link>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { flex: 1, alignItems: 'center', justifyContent: 'center', gap: space.md, padding: space.xl },
});
