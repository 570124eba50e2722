// Point markers in the band shapes of DESIGN.md §4 (ample ○, low ◇, poor ▲, forced ∿), so a
// chart's points carry the band by shape as well as colour.
import { Circle, Path } from 'react-native-svg';
import type { Band } from '@/shared/bands';
import { bands } from '../theme';

export type MarkerKind = 'circle' | 'diamond' | 'triangle' | 'wave' | 'dot';

export const BAND_MARKER: Record<Band, MarkerKind> = { ample: 'circle', low: 'diamond', poor: 'triangle', forced: 'wave' };

export function bandMarker(band: Band): { shape: MarkerKind; color: string } {
  return { shape: BAND_MARKER[band], color: bands[band].color };
}

/** One marker centred on (x, y); `size` is about its radius in px. */
export function MarkerShape({ kind, x, y, size, color }: { kind: MarkerKind; x: number; y: number; size: number; color: string }) {
  const r = size;
  switch (kind) {
    case 'dot':
      return <Circle cx={x} cy={y} r={r * 0.8} fill={color} />;
    case 'circle':
      return <Circle cx={x} cy={y} r={r} fill="#FFFFFF" stroke={color} strokeWidth={1.6} />;
    case 'diamond':
      return <Path d={`M${x} ${y - r * 1.25} L${x + r * 1.1} ${y} L${x} ${y + r * 1.25} L${x - r * 1.1} ${y} Z`} fill="#FFFFFF" stroke={color} strokeWidth={1.6} />;
    case 'triangle':
      return <Path d={`M${x} ${y - r * 1.25} L${x + r * 1.15} ${y + r * 0.85} L${x - r * 1.15} ${y + r * 0.85} Z`} fill={color} stroke={color} strokeWidth={1} />;
    case 'wave':
      return (
        <Path
          d={`M${x - r * 1.3} ${y} C ${x - r * 0.9} ${y - r * 1.3}, ${x - r * 0.2} ${y - r * 1.3}, ${x} ${y} S ${x + r * 0.9} ${y + r * 1.3}, ${x + r * 1.3} ${y}`}
          fill="none"
          stroke={color}
          strokeWidth={1.8}
          strokeLinecap="round"
        />
      );
  }
}
