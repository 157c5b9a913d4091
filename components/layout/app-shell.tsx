import { useState, type ReactNode } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { Link, usePathname } from 'expo-router';
import { useSafeAreaInsets } from 'react-native-safe-area-context';

import { Icon, type IconName } from '@/components/ui/icon';
import { Text } from '@/components/ui/text';
import { useToastClearance } from '@/components/ui/toast';
import { useLayout } from '@/hooks/layout';
import { useMe } from '@/hooks/session';
import { useTheme } from '@/hooks/theme';
import { space } from '@/lib/tokens';

type NavItem = { id: string; href: string; label: string; icon: (color: string) => ReactNode; match: (path: string) => boolean };

const glyph = (name: IconName) => (color: string) => <Icon name={name} color={color} />;

const campaignsItem: NavItem = {
  id: 'campaigns',
  href: '/',
  label: 'Campaigns',
  icon: glyph('campaigns'),
  match: (p) => p === '/' || p.startsWith('/campaigns') || p.startsWith('/dives') || p.startsWith('/observations'),
};

const searchItem: NavItem = {
  id: 'search',
  href: '/search',
  label: 'Search',
  icon: glyph('search'),
  match: (p) => p.startsWith('/search'),
};

const accountItem: NavItem = {
  id: 'account',
  href: '/account',
  label: 'Account',
  icon: glyph('account'),
  match: (p) => p.startsWith('/account'),
};

/** Shown to the site administrator only. */
const adminItem: NavItem = {
  id: 'admin',
  href: '/admin',
  label: 'Admin',
  icon: glyph('admin'),
  match: (p) => p.startsWith('/admin'),
};

/** The frame around every signed-in screen: navigation at the bottom on phones, at the side elsewhere. */
export function AppShell({ children }: { children: ReactNode }) {
  const { navPlacement } = useLayout();
  const { colors } = useTheme();
  const insets = useSafeAreaInsets();
  const path = usePathname();
  const me = useMe().data;
  const [barHeight, setBarHeight] = useState(0);
  useToastClearance('navigation', navPlacement === 'bottom' ? barHeight : 0);

  const shown = me?.siteRole === 'admin' ? [campaignsItem, searchItem, adminItem, accountItem] : [campaignsItem, searchItem, accountItem];
  const links = shown.map((item) => {
    const active = item.match(path);
    const tint = active ? colors.accent : colors.textMuted;
    return (
      <Link key={item.href} href={item.href} asChild>
        <Pressable
          testID={`nav-${item.id}`}
          accessibilityRole="link"
          aria-current={active ? 'page' : undefined}
          // Link's slot merges styles itself and cannot take an array.
          style={
            navPlacement === 'bottom'
              ? styles.tab
              : StyleSheet.flatten([styles.sideItem, active ? { backgroundColor: colors.surfaceAlt } : null])
          }
        >
          {item.icon(tint)}
          <Text variant={navPlacement === 'bottom' ? 'caption' : 'label'} color={active ? colors.text : colors.textMuted}>
            {item.label}
          </Text>
        </Pressable>
      </Link>
    );
  });

  if (navPlacement === 'bottom') {
    return (
      <View style={[styles.fill, { backgroundColor: colors.bg, paddingTop: insets.top }]}>
        <View style={styles.fill}>{children}</View>
        <View
          role="navigation"
          aria-label="Main"
          onLayout={(e) => setBarHeight(Math.round(e.nativeEvent.layout.height))}
          style={[styles.bottomBar, { borderTopColor: colors.border, backgroundColor: colors.surface, paddingBottom: insets.bottom }]}
        >
          {links}
        </View>
      </View>
    );
  }
  return (
    <View style={[styles.fill, styles.row, { backgroundColor: colors.bg }]}>
      <View role="navigation" aria-label="Main" style={[styles.side, { borderRightColor: colors.border, backgroundColor: colors.surface }]}>
        <View style={styles.brand}>
          <Text variant="heading" color={colors.accent}>
            Bathynote
          </Text>
          {me ? (
            <Text variant="caption" muted numberOfLines={1}>
              {me.user.name}
            </Text>
          ) : null}
        </View>
        {links}
      </View>
      <View style={styles.fill}>{children}</View>
    </View>
  );
}

const styles = StyleSheet.create({
  fill: { flex: 1 },
  row: { flexDirection: 'row' },
  bottomBar: { flexDirection: 'row', borderTopWidth: StyleSheet.hairlineWidth },
  tab: { flex: 1, alignItems: 'center', justifyContent: 'center', paddingVertical: space.sm, minHeight: 56, gap: 2 },
  side: { width: 220, borderRightWidth: StyleSheet.hairlineWidth, padding: space.md, gap: space.xs },
  brand: { paddingHorizontal: space.sm, paddingVertical: space.lg, gap: 2 },
  sideItem: { flexDirection: 'row', alignItems: 'center', gap: space.md, paddingHorizontal: space.md, minHeight: 44, borderRadius: 8 },
});
