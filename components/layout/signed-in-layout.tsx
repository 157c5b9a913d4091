import { Stack, useRouter } from 'expo-router';
import { useEffect } from 'react';

import { AppShell } from '@/components/layout/app-shell';
import { useSendQueueSender } from '@/hooks/send-queue';
import { takeReturnPath } from '@/hooks/session';
import { useTheme } from '@/hooks/theme';

/**
 * The frame of every signed-in screen. The router reads every layout file as the app starts, signed
 * in or not, so the `(app)` layout loads this file only when it is first drawn: the sign-in screen
 * does not pay for the navigation, the icons or the send queue.
 */
export default function SignedInLayout() {
  const { colors } = useTheme();
  useSendQueueSender();
  const router = useRouter();
  // Just signed in from a deep link: land where it pointed, not on the campaign list.
  useEffect(() => {
    const path = takeReturnPath();
    if (path) router.replace(path);
  }, [router]);
  return (
    <AppShell>
      <Stack screenOptions={{ headerShown: false, animation: 'none', contentStyle: { backgroundColor: colors.bg } }} />
    </AppShell>
  );
}
