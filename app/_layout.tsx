import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { Stack } from 'expo-router';
import { StatusBar } from 'expo-status-bar';
import { useState } from 'react';
import { SafeAreaProvider } from 'react-native-safe-area-context';

import { LoadingState } from '@/components/ui/states';
import { ToastProvider } from '@/components/ui/toast';
import { ApiError } from '@/hooks/api';
import { useAppFonts } from '@/hooks/fonts';
import { useMe } from '@/hooks/session';
import { ThemeProvider, useTheme } from '@/hooks/theme';

function makeQueryClient() {
  return new QueryClient({
    defaultOptions: {
      queries: {
        staleTime: 15_000,
        // A 4xx will not get better by asking again; a dropped satellite link might.
        retry: (count, err) => !(err instanceof ApiError && err.status >= 400 && err.status < 500) && count < 3,
      },
    },
  });
}

function Gate() {
  const me = useMe();
  const { scheme, colors } = useTheme();
  if (me.isPending) return <LoadingState label="Opening Bathynote…" />;
  const signedIn = !!me.data;
  return (
    <>
      <StatusBar style={scheme === 'dark' ? 'light' : 'dark'} />
      <Stack screenOptions={{ headerShown: false, contentStyle: { backgroundColor: colors.bg } }}>
        <Stack.Protected guard={signedIn}>
          <Stack.Screen name="(app)" />
        </Stack.Protected>
        <Stack.Protected guard={!signedIn}>
          <Stack.Screen name="(auth)" />
        </Stack.Protected>
        {/* An invitation link can fail for someone signed in or not, so neither guard holds it. */}
        <Stack.Screen name="invitation-problem" />
        {/* A digest's unsubscribe link works without signing in. */}
        <Stack.Screen name="unsubscribe/[token]" />
        <Stack.Screen name="+not-found" />
      </Stack>
    </>
  );
}

export default function RootLayout() {
  const [queryClient] = useState(makeQueryClient);
  const fontsReady = useAppFonts();
  if (!fontsReady) return null;
  return (
    <SafeAreaProvider>
      <QueryClientProvider client={queryClient}>
        <ThemeProvider>
          <ToastProvider>
            <Gate />
          </ToastProvider>
        </ThemeProvider>
      </QueryClientProvider>
    </SafeAreaProvider>
  );
}
