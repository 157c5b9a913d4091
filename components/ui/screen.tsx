import type { ReactNode } from 'react';
import { Pressable, ScrollView, StyleSheet, View } from 'react-native';
import { useRouter } from 'expo-router';

import { useLayout } from '@/hooks/layout';
import { useTheme } from '@/hooks/theme';
import { space } from '@/lib/tokens';
import { Text } from './text';

type HeaderProps = {
  title: string;
  subtitle?: string;
  back?: string;
  /** What the back control says (and reads out); "Back" unless the screen knows where it leads. */
  backLabel?: string;
  right?: ReactNode;
  /** A state line under the titles (e.g. whether the screen is following live updates). */
  status?: ReactNode;
};

/**
 * A screen's title bar: where you are, the way back, and the screen's own actions. The titles
 * wrap rather than cut off, and the actions move to a line of their own when they do not fit
 * beside them, so a narrow screen never shrinks the titles to a few letters.
 */
export function ScreenHeader({ title, subtitle, back, backLabel = 'Back', right, status }: HeaderProps) {
  const { colors } = useTheme();
  const router = useRouter();
  return (
    <View style={[styles.header, { borderBottomColor: colors.border, backgroundColor: colors.surface }]} testID="screen-header">
      <View style={styles.lead}>
        {back ? (
          <Pressable
            accessibilityRole="link"
            accessibilityLabel={backLabel}
            testID="back"
            onPress={() => (router.canGoBack() ? router.back() : router.replace(back))}
            style={({ pressed }) => [styles.back, pressed && { backgroundColor: colors.surfaceAlt }]}
            hitSlop={4}
          >
            <Text variant="title" color={colors.accent} aria-hidden>
              ‹
            </Text>
            <Text variant="label" color={colors.accent}>
              {backLabel}
            </Text>
          </Pressable>
        ) : null}
        <View style={styles.titles}>
          <Text variant="title" role="heading" aria-level={1} testID="screen-title">
            {title}
          </Text>
          {subtitle ? (
            <Text variant="caption" muted testID="screen-subtitle">
              {subtitle}
            </Text>
          ) : null}
          {status}
        </View>
      </View>
      {right ? <View style={styles.right}>{right}</View> : null}
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
    flexWrap: 'wrap',
    alignItems: 'center',
    columnGap: space.md,
    paddingHorizontal: space.lg,
    paddingBottom: space.xs,
    minHeight: 56,
    borderBottomWidth: StyleSheet.hairlineWidth,
  },
  // Back and titles stay together; below ~260 px of room for the titles the actions wrap under them.
  lead: { flexDirection: 'row', alignItems: 'center', gap: space.sm, flexGrow: 1, flexShrink: 1, flexBasis: 260, minWidth: 0 },
  back: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: 2,
    minWidth: 44,
    minHeight: 44,
    paddingHorizontal: space.xs,
    marginLeft: -space.xs,
    borderRadius: 8,
  },
  titles: { flex: 1, minWidth: 0, paddingVertical: space.sm },
  right: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', justifyContent: 'flex-end', gap: space.sm, flexGrow: 1 },
});
