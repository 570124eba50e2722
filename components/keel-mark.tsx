import Svg, { Path, Rect } from 'react-native-svg';
import { colors } from './theme';

// Keel's mark: a damped swing settling to rest, our own drawing. Decorative (aria-hidden): the
// word "Keel" next to it carries the name.
export function KeelMark({ size = 28, color = colors.accent, background = 'transparent' }: { size?: number; color?: string; background?: string }) {
  return (
    <Svg width={size} height={size} viewBox="0 0 32 32" aria-hidden>
      <Rect x={0.75} y={0.75} width={30.5} height={30.5} rx={7} fill={background} stroke={color} strokeWidth={1.5} />
      <Path
        d="M4 16 C 6 4, 8 4, 10 16 S 14 25, 16 16 S 19 11, 20.5 16 S 23 19, 24.5 16 S 26.5 14.5, 28 16"
        fill="none"
        stroke={color}
        strokeWidth={2}
        strokeLinecap="round"
        strokeLinejoin="round"
      />
    </Svg>
  );
}
