import { QueryClient, useQueryClient } from '@tanstack/react-query';
import { PersistQueryClientProvider } from '@tanstack/react-query-persist-client';
import { Stack } from 'expo-router';
import { StatusBar } from 'expo-status-bar';
import { useEffect, useState } from 'react';
import { View } from 'react-native';
import { SafeAreaProvider } from 'react-native-safe-area-context';

import { ShoreBanner } from '@/components/layout/shore-banner';
import { LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { ToastProvider } from '@/components/ui/toast';
import { ApiError } from '@/hooks/api';
import { useAppFonts, useOwnFaces } from '@/hooks/fonts';
import { afterRestore, lastAnswerAt, offlineCacheOptions, useForgetWhenSignedOut, useOnline } from '@/hooks/offline-cache';
import { registerServiceWorker } from '@/hooks/service-worker';
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

/** Says plainly that the screens show what this device last saw, and since when. */
function OfflineNotice() {
  const qc = useQueryClient();
  const { colors } = useTheme();
  const at = lastAnswerAt(qc);
  const time = at === null ? null : new Date(at).toISOString().slice(11, 16);
  return (
    <View testID="offline-notice" style={{ backgroundColor: colors.warning, paddingHorizontal: 12, paddingVertical: 4 }}>
      <Text variant="label" color={colors.bg}>
        {time ? `offline — showing what was here at ${time} UTC` : 'offline'}
      </Text>
    </View>
  );
}

function Gate() {
  const qc = useQueryClient();
  const me = useMe();
  const online = useOnline();
  const { scheme, colors } = useTheme();
  useForgetWhenSignedOut(qc);
  const signedIn = !!me.data;
  useOwnFaces(signedIn);
  // The offline copy is set up once someone is signed in: a cold sign-in screen over a thin link
  // then moves only what it shows, and the copy's downloads follow behind the dive log.
  useEffect(() => {
    if (signedIn) registerServiceWorker();
  }, [signedIn]);
  if (me.isPending) return <LoadingState label="Opening Bathynote…" />;
  return (
    <View style={{ flex: 1 }}>
      <StatusBar style={scheme === 'dark' ? 'light' : 'dark'} />
      <ShoreBanner />
      {!online && signedIn ? <OfflineNotice /> : null}
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
    </View>
  );
}

export default function RootLayout() {
  const [queryClient] = useState(makeQueryClient);
  const [cacheOptions] = useState(offlineCacheOptions);
  const fontsReady = useAppFonts();
  if (!fontsReady) return null;
  return (
    <SafeAreaProvider>
      <PersistQueryClientProvider client={queryClient} persistOptions={cacheOptions} onSuccess={() => afterRestore(queryClient)}>
        <ThemeProvider>
          <ToastProvider>
            <Gate />
          </ToastProvider>
        </ThemeProvider>
      </PersistQueryClientProvider>
    </SafeAreaProvider>
  );
}
