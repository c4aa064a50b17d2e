// First: configures zod for the Content-Security-Policy before any schema is used.
import '@/lib/zod-config';
import { QueryClientProvider } from '@tanstack/react-query';
import { FontDisplay, useFonts } from 'expo-font';
import { Slot } from 'expo-router';
import { StatusBar } from 'expo-status-bar';
import { useEffect, useState } from 'react';
import { SafeAreaProvider } from 'react-native-safe-area-context';
import { createQueryClient } from '@/api/query-client';
import { fontFaces } from '@/theme';

export { ErrorBoundary } from 'expo-router';

/**
 * Latin subsets (WOFF2) of the @expo-google-fonts/source-sans-3 files, made by
 * scripts/fonts/subset.mjs. `swap`: text draws at once in the fallback and switches when a
 * file arrives, so the first screen does not wait for fonts.
 */
const FONT_FILES = {
  [fontFaces.regular]: { uri: require('../assets/fonts/SourceSans3_400Regular.latin.woff2'), display: FontDisplay.SWAP },
  [fontFaces.semibold]: { uri: require('../assets/fonts/SourceSans3_600SemiBold.latin.woff2'), display: FontDisplay.SWAP },
  [fontFaces.bold]: { uri: require('../assets/fonts/SourceSans3_700Bold.latin.woff2'), display: FontDisplay.SWAP },
};

export default function RootLayout() {
  const [queryClient] = useState(createQueryClient);
  // Starts loading the fonts; rendering does not wait for them.
  useFonts(FONT_FILES);
  // The page drawn on the server is now the browser's own: its controls respond.
  useEffect(() => {
    document.documentElement.dataset.ready = 'true';
  }, []);
  return (
    <SafeAreaProvider>
      <QueryClientProvider client={queryClient}>
        <StatusBar style="light" />
        <Slot />
      </QueryClientProvider>
    </SafeAreaProvider>
  );
}
