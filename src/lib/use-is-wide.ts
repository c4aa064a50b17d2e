import { useWindowDimensions } from 'react-native';
import { WIDE_BREAKPOINT } from '@/theme';

/** True from the width where the tabs become a side rail and screens use two columns. */
export function useIsWide(): boolean {
  return useWindowDimensions().width >= WIDE_BREAKPOINT;
}
