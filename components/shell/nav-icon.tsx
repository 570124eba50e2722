import Svg, { Circle, Line, Path, Polyline, Rect } from 'react-native-svg';
import type { SectionKey } from './sections';

// Line icons drawn for Keel (24-unit grid, 1.75 stroke). Decorative: every nav item also shows its
// name in words, which is also its accessible name.
export function NavIcon({ name, color, size = 22 }: { name: SectionKey; color: string; size?: number }) {
  const common = { fill: 'none', stroke: color, strokeWidth: 1.75, strokeLinecap: 'round' as const, strokeLinejoin: 'round' as const };
  return (
    <Svg width={size} height={size} viewBox="0 0 24 24" aria-hidden>
      {name === 'watch' ? (
        <>
          <Path d="M2 12 C 4 4, 6 4, 8 12 S 11 18, 13 12 S 16 9, 17.5 12 S 20 14, 22 12" {...common} />
        </>
      ) : name === 'alerts' ? (
        <>
          <Path d="M12 3 L22 20 H2 Z" {...common} />
          <Line x1={12} y1={10} x2={12} y2={14} {...common} />
          <Circle cx={12} cy={17} r={0.6} {...common} />
        </>
      ) : name === 'recordings' ? (
        <>
          <Rect x={4} y={3} width={16} height={18} rx={2} {...common} />
          <Polyline points="7,14 9,10 11,15 13,9 15,13 17,12" {...common} />
        </>
      ) : name === 'trends' ? (
        <>
          <Polyline points="3,4 3,20 21,20" {...common} />
          <Polyline points="6,9 10,12 14,10 19,16" {...common} />
        </>
      ) : name === 'transfer' ? (
        <>
          <Line x1={4} y1={8} x2={20} y2={8} {...common} />
          <Polyline points="16,4 20,8 16,12" {...common} />
          <Line x1={20} y1={16} x2={4} y2={16} {...common} />
          <Polyline points="8,12 4,16 8,20" {...common} />
        </>
      ) : name === 'network' ? (
        <>
          <Circle cx={5} cy={6} r={2.2} {...common} />
          <Circle cx={19} cy={6} r={2.2} {...common} />
          <Circle cx={12} cy={18} r={2.2} {...common} />
          <Line x1={7.2} y1={6} x2={16.8} y2={6} {...common} />
          <Line x1={6.2} y1={7.9} x2={10.8} y2={16.1} {...common} />
          <Line x1={17.8} y1={7.9} x2={13.2} y2={16.1} {...common} />
        </>
      ) : name === 'people' ? (
        <>
          <Circle cx={9} cy={8} r={3.2} {...common} />
          <Path d="M3 20 C 3 15, 15 15, 15 20" {...common} />
          <Circle cx={17} cy={9} r={2.4} {...common} />
          <Path d="M16 14.5 C 19 14.2, 21.5 15.8, 21.5 19" {...common} />
        </>
      ) : (
        <>
          <Rect x={3} y={5} width={18} height={14} rx={2} {...common} />
          <Polyline points="3.5,6 12,13 20.5,6" {...common} />
        </>
      )}
    </Svg>
  );
}
