import { StyleSheet, View } from 'react-native';

import { Button } from '@/components/ui/button';
import { Text } from '@/components/ui/text';
import { ApiError } from '@/hooks/api';
import { useUnsubscribe } from '@/hooks/digests';
import { useTheme } from '@/hooks/theme';
import { space } from '@/lib/tokens';

/**
 * Where a digest's "unsubscribe" link lands, signed in or not. Opening the page changes nothing
 * (mail scanners open links too); the button does, for the one subscription the link names.
 */
export function UnsubscribePanel({ token }: { token: string }) {
  const { colors } = useTheme();
  const unsubscribe = useUnsubscribe();
  return (
    <View style={styles.wrap} testID="unsubscribe">
      <Text variant="title" role="heading" aria-level={1}>
        Stop this campaign’s digest
      </Text>
      {unsubscribe.data ? (
        <Text testID="unsubscribe-done">{unsubscribe.data.message}</Text>
      ) : (
        <>
          <Text muted>You will get no more digest mails of this campaign. Your other campaigns’ digests stay as they are.</Text>
          <Button
            label="Unsubscribe"
            testID="unsubscribe-confirm"
            busy={unsubscribe.isPending}
            onPress={() => unsubscribe.mutate(token)}
            style={styles.start}
          />
        </>
      )}
      {unsubscribe.error ? (
        <Text color={colors.danger} role="alert" testID="unsubscribe-error">
          {unsubscribe.error instanceof ApiError ? unsubscribe.error.message : 'That did not go through. Try again.'}
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.md, padding: space.xl, maxWidth: 560, width: '100%', alignSelf: 'center' },
  start: { alignSelf: 'flex-start' },
});
