import { Stack } from 'expo-router';

import { AppShell } from '@/components/layout/app-shell';
import { useOutboxSender } from '@/hooks/outbox';
import { useTheme } from '@/hooks/theme';

export default function AppLayout() {
  const { colors } = useTheme();
  useOutboxSender();
  return (
    <AppShell>
      <Stack screenOptions={{ headerShown: false, animation: 'none', contentStyle: { backgroundColor: colors.bg } }} />
    </AppShell>
  );
}
