/**
 * Root layout: providers (react-query, safe area), the shipped fonts, and the session bootstrap.
 * It never redirects: each route group guards itself in its own _layout.
 */
import { QueryClientProvider } from '@tanstack/react-query';
import { useFonts } from 'expo-font';
import { Stack } from 'expo-router';
import { StatusBar } from 'expo-status-bar';
import { useEffect, useState } from 'react';
import { SafeAreaProvider } from 'react-native-safe-area-context';

import { Loading, colors, fonts } from '../components/ui';
import { registerOfflineShell } from '../store/offline-shell';
import { createQueryClient } from '../store/query-client';
import { useSession } from '../store/session';

export default function RootLayout() {
  const [queryClient] = useState(createQueryClient);
  const bootstrap = useSession((s) => s.bootstrap);
  const [fontsLoaded, fontError] = useFonts({
    [fonts.regular]: require('../assets/fonts/AtkinsonHyperlegible_400Regular.ttf'),
    [fonts.bold]: require('../assets/fonts/AtkinsonHyperlegible_700Bold.ttf'),
    [fonts.numbers]: require('../assets/fonts/BarlowCondensed_600SemiBold.ttf'),
  });

  useEffect(() => {
    void bootstrap();
    registerOfflineShell();
  }, [bootstrap]);

  return (
    <SafeAreaProvider>
      <QueryClientProvider client={queryClient}>
        <StatusBar style="dark" />
        {/* A font that fails to load must not lock anyone out: fall back to system fonts. */}
        {fontsLoaded || fontError ? (
          <Stack screenOptions={{ headerShown: false, contentStyle: { backgroundColor: colors.background } }} />
        ) : (
          <Loading label="Starting Boardside…" />
        )}
      </QueryClientProvider>
    </SafeAreaProvider>
  );
}
