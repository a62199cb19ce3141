import { useWindowDimensions } from 'react-native';
import { WIDE_BREAKPOINT } from '../theme';

/** Phone first: everything below the breakpoint gets the bottom tab bar and single panes. */
export function useIsWide(): boolean {
  const { width } = useWindowDimensions();
  return width >= WIDE_BREAKPOINT;
}
