import { ActivityIndicator, StyleSheet, View } from 'react-native';

import { ApiError } from '@/hooks/api';
import { useTheme } from '@/hooks/theme';
import { space } from '@/lib/tokens';
import { Button } from './button';
import { Text } from './text';

export function LoadingState({ label = 'Loading…' }: { label?: string }) {
  const { colors } = useTheme();
  return (
    <View style={styles.center} testID="loading" accessibilityRole="progressbar" accessibilityLabel={label}>
      <ActivityIndicator color={colors.accent} />
      <Text muted>{label}</Text>
    </View>
  );
}

export function EmptyState({ title, body, action }: { title: string; body?: string; action?: React.ReactNode }) {
  return (
    <View style={styles.center} testID="empty">
      <Text variant="title">{title}</Text>
      {body ? (
        <Text muted style={styles.text}>
          {body}
        </Text>
      ) : null}
      {action}
    </View>
  );
}

export function ErrorState({ error, onRetry }: { error: unknown; onRetry?: () => void }) {
  const { colors } = useTheme();
  const notFound = error instanceof ApiError && error.status === 404;
  const message = error instanceof Error ? error.message : 'Something went wrong.';
  return (
    <View style={styles.center} testID="error" role="alert">
      <Text variant="title" color={colors.danger}>
        {notFound ? 'Nothing here' : 'Could not load this'}
      </Text>
      <Text muted style={styles.text}>
        {notFound ? 'It does not exist, or you are not a member of its campaign.' : message}
      </Text>
      {onRetry && !notFound ? <Button label="Try again" tone="secondary" onPress={onRetry} /> : null}
    </View>
  );
}

const styles = StyleSheet.create({
  center: { flex: 1, alignItems: 'center', justifyContent: 'center', gap: space.md, padding: space.xl, minHeight: 200 },
  text: { textAlign: 'center', maxWidth: 420 },
});
