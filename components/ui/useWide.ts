import { useWindowDimensions } from 'react-native';

/** Wide enough for tables and side-by-side forms (a small laptop and up). */
export const WIDE_BREAKPOINT = 760;

export function useWide(): boolean {
  const { width } = useWindowDimensions();
  return width >= WIDE_BREAKPOINT;
}
