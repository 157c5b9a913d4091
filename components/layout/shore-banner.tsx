import { useQuery } from '@tanstack/react-query';
import { View } from 'react-native';

import { Text } from '@/components/ui/text';
import { request } from '@/hooks/api';
import { sessionKeys } from '@/hooks/query-keys';
import { useTheme } from '@/hooks/theme';
import { healthSchema, type Health } from '@/lib/schemas/mirror';

/** How far behind, in words a reader takes in at a glance. */
export function lagWords(seconds: number): string {
  if (seconds < 90) return `${seconds} s`;
  if (seconds < 90 * 60) return `${Math.round(seconds / 60)} min`;
  return `${Math.round(seconds / 3600)} h`;
}

export function shoreText(mirror: NonNullable<Health['mirror']>): string {
  const behind = `${lagWords(mirror.lagSeconds)} behind the ship`;
  return mirror.link === 'down'
    ? `shore copy, link to the ship down: ${behind} and growing; changes cannot be sent`
    : `shore copy, ${behind}`;
}

/**
 * On a shore mirror, every screen says that it shows the shore copy and how far behind the ship
 * it is, and when the link is down. On the ship the first answer has no mirror and the banner
 * never asks again.
 */
export function ShoreBanner() {
  const { colors } = useTheme();
  const health = useQuery({
    // Under the session's key, which signing out keeps: the banner shows on the sign-in screen too.
    queryKey: [...sessionKeys.root, 'server'],
    queryFn: ({ signal }) => request('/api/health', healthSchema, { signal }),
    refetchInterval: (query) => (query.state.data?.mirror ? 10_000 : false),
    staleTime: 5_000,
  });
  const mirror = health.data?.mirror;
  if (!mirror) return null;
  const down = mirror.link === 'down';
  return (
    <View
      testID="shore-banner"
      accessibilityRole="summary"
      style={{ backgroundColor: down ? colors.warning : colors.accent, paddingHorizontal: 12, paddingVertical: 4 }}
    >
      <Text variant="label" color={colors.bg}>
        {shoreText(mirror)}
      </Text>
    </View>
  );
}
