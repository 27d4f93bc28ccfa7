import { useWindowDimensions } from 'react-native';
import { WIDE_MIN_WIDTH } from './tokens';

export function useBreakpoint(): { isWide: boolean; width: number } {
  const { width } = useWindowDimensions();
  return { isWide: width >= WIDE_MIN_WIDTH, width };
}
