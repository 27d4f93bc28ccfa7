import { FontDisplay, useFonts } from 'expo-font';
import { Slot } from 'expo-router';
import { StatusBar } from 'expo-status-bar';
import { enableScreens } from 'react-native-screens';
import { useEffect } from 'react';
import { SWRConfig } from 'swr';
import { installFocusRing } from '@/theme/focus-ring';
import { installPrintStylesheet } from '@/theme/print';
import { registerServiceWorker } from '@/web/offline';
import { useSnapshotReplaced } from '@/web/snapshot';

installFocusRing();
installPrintStylesheet();
// On the web, react-native-screens hides inactive tabs with display:none only when enabled; otherwise they stay
// in the page behind the active one, aria-hidden yet focusable (axe: aria-hidden-focus).
enableScreens(true);

// Latin subsets in WOFF2 (`npm run fonts`, about 24 KB each instead of 340 KB TTF).
// `swap`: text paints at once in the fallback face instead of staying invisible while the fonts download.
const FONTS = {
  Inter_400Regular: { uri: require('../assets/fonts/Inter_400Regular.woff2'), display: FontDisplay.SWAP },
  Inter_600SemiBold: { uri: require('../assets/fonts/Inter_600SemiBold.woff2'), display: FontDisplay.SWAP },
};

// Rendering does not wait for the fonts. A leaf of its own, so their arrival re-renders nothing else (called in
// the root layout, it re-rendered the whole app).
function Fonts() {
  useFonts(FONTS);
  return null;
}

const SWR_OPTIONS = { shouldRetryOnError: false, revalidateOnFocus: true, dedupingInterval: 2000 };

export default function RootLayout() {
  useSnapshotReplaced();
  useEffect(registerServiceWorker, []);
  return (
    <SWRConfig value={SWR_OPTIONS}>
      <Fonts />
      <StatusBar style="auto" />
      <Slot />
    </SWRConfig>
  );
}
