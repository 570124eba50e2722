import { useMemo } from 'react';
import Svg, { Line, Path } from 'react-native-svg';

/**
 * Decoration for the signed-out screens: a ring-down (a damped oscillation settling) drawn from
 * its formula, with its decay envelope. Aria-hidden: it carries no information.
 */
export function RingdownArt({ width = 420, height = 140, color = '#5FA8A3' }: { width?: number; height?: number; color?: string }) {
  const { trace, upper, lower } = useMemo(() => {
    const n = 240;
    const mid = height / 2;
    const amp = height * 0.42;
    // About 5 cycles over the width with ζ ≈ 6 %: e^{-ζ ω t}, the envelope of a lightly damped mode.
    const cycles = 5.5;
    const zeta = 0.06;
    const pts: string[] = [];
    const up: string[] = [];
    const lo: string[] = [];
    for (let i = 0; i <= n; i++) {
      const t = i / n;
      const w = 2 * Math.PI * cycles;
      const env = Math.exp(-zeta * w * t);
      const x = (t * width).toFixed(1);
      pts.push(`${i === 0 ? 'M' : 'L'}${x} ${(mid - amp * env * Math.cos(w * t)).toFixed(1)}`);
      up.push(`${i === 0 ? 'M' : 'L'}${x} ${(mid - amp * env).toFixed(1)}`);
      lo.push(`${i === 0 ? 'M' : 'L'}${x} ${(mid + amp * env).toFixed(1)}`);
    }
    return { trace: pts.join(' '), upper: up.join(' '), lower: lo.join(' ') };
  }, [width, height]);
  return (
    <Svg width={width} height={height} viewBox={`0 0 ${width} ${height}`} aria-hidden>
      <Line x1={0} y1={height / 2} x2={width} y2={height / 2} stroke={color} strokeOpacity={0.25} strokeWidth={1} />
      <Path d={upper} fill="none" stroke={color} strokeOpacity={0.35} strokeWidth={1} strokeDasharray="3 4" />
      <Path d={lower} fill="none" stroke={color} strokeOpacity={0.35} strokeWidth={1} strokeDasharray="3 4" />
      <Path d={trace} fill="none" stroke={color} strokeWidth={2} strokeLinejoin="round" />
    </Svg>
  );
}
