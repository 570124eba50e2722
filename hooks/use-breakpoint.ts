import { useWindowDimensions } from 'react-native';
import { breakpointFor, type BreakpointName } from '@/components/theme';

export interface BreakpointInfo {
  name: BreakpointName;
  width: number;
  /** ≥ 800 px: side rail instead of the bottom tab bar, multi-column content. */
  isWide: boolean;
  /** < 500 px: the primary phone layout. */
  isCompact: boolean;
  /** How many content columns a screen may use: 1 (compact/medium), 2 (wide), 3 (xwide). */
  columns: 1 | 2 | 3;
}

export function useBreakpoint(): BreakpointInfo {
  const { width } = useWindowDimensions();
  const name = breakpointFor(width);
  const isWide = name === 'wide' || name === 'xwide';
  return {
    name,
    width,
    isWide,
    isCompact: name === 'compact',
    columns: name === 'xwide' ? 3 : isWide ? 2 : 1,
  };
}
