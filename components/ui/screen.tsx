import type { ReactNode } from 'react';
import { Pressable, ScrollView, StyleSheet, View } from 'react-native';
import { useRouter } from 'expo-router';

import { useLayout } from '@/hooks/layout';
import { useTheme } from '@/hooks/theme';
import { space } from '@/lib/tokens';
import { Text } from './text';

type HeaderProps = { title: string; subtitle?: string; back?: string; right?: ReactNode };

/** A screen's title bar: where you are, the way back, and the screen's own actions. */
export function ScreenHeader({ title, subtitle, back, right }: HeaderProps) {
  const { colors } = useTheme();
  const router = useRouter();
  return (
    <View style={[styles.header, { borderBottomColor: colors.border, backgroundColor: colors.surface }]}>
      {back ? (
        <Pressable
          accessibilityRole="link"
          accessibilityLabel="Back"
          testID="back"
          onPress={() => (router.canGoBack() ? router.back() : router.replace(back))}
          style={styles.back}
        >
          <Text variant="title" color={colors.accent}>
            ‹
          </Text>
        </Pressable>
      ) : null}
      <View style={styles.titles}>
        <Text variant="title" role="heading" aria-level={1} numberOfLines={1}>
          {title}
        </Text>
        {subtitle ? (
          <Text variant="caption" muted numberOfLines={1}>
            {subtitle}
          </Text>
        ) : null}
      </View>
      {right}
    </View>
  );
}

/** The scrolling body of a screen, kept to a readable width on wide screens. */
export function ScreenBody({ children, scroll = true }: { children: ReactNode; scroll?: boolean }) {
  const { breakpoint } = useLayout();
  const pad = breakpoint === 'phone' ? space.lg : space.xl;
  if (!scroll) return <View style={[styles.fill, { padding: pad }]}>{children}</View>;
  return (
    <ScrollView style={styles.fill} contentContainerStyle={[styles.content, { padding: pad }]} keyboardShouldPersistTaps="handled">
      {children}
    </ScrollView>
  );
}

export function Screen({ children }: { children: ReactNode }) {
  const { colors } = useTheme();
  return <View style={[styles.fill, { backgroundColor: colors.bg }]}>{children}</View>;
}

const styles = StyleSheet.create({
  fill: { flex: 1 },
  content: { gap: space.lg, maxWidth: 960, width: '100%', alignSelf: 'center' },
  header: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: space.md,
    paddingHorizontal: space.lg,
    minHeight: 56,
    borderBottomWidth: StyleSheet.hairlineWidth,
  },
  back: { minWidth: 32, minHeight: 44, justifyContent: 'center' },
  titles: { flex: 1, paddingVertical: space.sm },
});
