import { useFonts } from 'expo-font';
import { Slot } from 'expo-router';
import { StatusBar } from 'expo-status-bar';
import { SWRConfig } from 'swr';
import { installFocusRing } from '@/theme/focus-ring';

installFocusRing();

const FONTS = {
  Inter_400Regular: require('../assets/fonts/Inter_400Regular.ttf'),
  Inter_600SemiBold: require('../assets/fonts/Inter_600SemiBold.ttf'),
  Inter_700Bold: require('../assets/fonts/Inter_700Bold.ttf'),
};

export default function RootLayout() {
  // Rendering does not wait for the fonts: text shows at once in the fallback face and swaps when they load.
  useFonts(FONTS);
  return (
    <SWRConfig value={{ shouldRetryOnError: false, revalidateOnFocus: true, dedupingInterval: 2000 }}>
      <StatusBar style="auto" />
      <Slot />
    </SWRConfig>
  );
}
