import { useWindowDimensions } from 'react-native';

/** Wide layout (sidebar + content, extra columns) from this width in px. */
export const WIDE_MIN_WIDTH = 1024;

export function useBreakpoint(): { isWide: boolean; width: number } {
  const { width } = useWindowDimensions();
  return { isWide: width >= WIDE_MIN_WIDTH, width };
}
