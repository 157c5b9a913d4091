import { Stack } from 'expo-router';

import { AppShell } from '@/components/layout/app-shell';
import { useSendQueueSender } from '@/hooks/send-queue';
import { useTheme } from '@/hooks/theme';

export default function AppLayout() {
  const { colors } = useTheme();
  useSendQueueSender();
  return (
    <AppShell>
      <Stack screenOptions={{ headerShown: false, animation: 'none', contentStyle: { backgroundColor: colors.bg } }} />
    </AppShell>
  );
}
