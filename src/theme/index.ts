import { useColorScheme } from 'react-native';
import { dark, light, type Palette } from './colors';

export * from './tokens';
export * from './breakpoints';
export type { Palette };

/** The palette for the device's light or dark setting. */
export function useColors(): Palette {
  return useColorScheme() === 'dark' ? dark : light;
}
