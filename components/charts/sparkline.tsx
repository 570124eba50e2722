// A small damping sparkline for a card: the min–max envelope and mean of each bucket over a fixed
// span (Watch: 24 hours), with the poor and low threshold lines (3 % and 5 % by default) always
// drawn and labelled at the right edge. No axes: the card says the span in words.
import { area, line } from 'd3-shape';
import { useState } from 'react';
import { StyleSheet, View, type LayoutChangeEvent } from 'react-native';
import Svg, { Circle, G, Line, Path, Text as SvgText } from 'react-native-svg';
import { formatPercent } from '../format';
import { bands, colors, fonts } from '../theme';
import { linear } from './axes';
import { bandMarker, MarkerShape } from './markers';
import { paddedExtent } from './ticks';

export interface SparkPoint {
  /** Epoch ms (bucket start). */
  t: number;
  min: number;
  mean: number;
  max: number;
}

export interface SparklineProps {
  points: SparkPoint[];
  poorBelow: number;
  lowBelow: number;
  /** The span drawn, epoch ms. */
  from: number;
  to: number;
  /** Bucket width, ms (points are drawn at the bucket middle). */
  bucketMs?: number;
  height?: number;
  /** Accessible summary. */
  label: string;
  testID?: string;
}

const LABEL_W = 40;

export function Sparkline({ points, poorBelow, lowBelow, from, to, bucketMs = 0, height = 64, label, testID }: SparklineProps) {
  const [width, setWidth] = useState(0);
  const onLayout = (e: LayoutChangeEvent) => {
    const w = Math.round(e.nativeEvent.layout.width);
    if (Math.abs(w - width) > 1) setWidth(w);
  };
  const top = 6;
  const bottom = height - 6;
  const left = 2;
  const right = Math.max(left + 20, width - LABEL_W);
  const yDomain = paddedExtent(points.flatMap((p) => [p.min, p.max]), 0.05, [0, poorBelow, lowBelow * 1.3]);
  const sx = linear([from, to], [left, right]);
  const sy = linear(yDomain, [bottom, top]);
  const half = bucketMs / 2;
  // Break the line where buckets are missing (no estimate in them).
  const gap = Math.max(bucketMs * 1.5, 1);
  const withBreaks: (SparkPoint | null)[] = [];
  points.forEach((p, i) => {
    if (i > 0 && p.t - points[i - 1].t > gap) withBreaks.push(null);
    withBreaks.push(p);
  });
  const mean = line<SparkPoint | null>()
    .defined((p) => p !== null)
    .x((p) => sx(p!.t + half))
    .y((p) => sy(p!.mean))(withBreaks);
  const env = area<SparkPoint | null>()
    .defined((p) => p !== null)
    .x((p) => sx(p!.t + half))
    .y0((p) => sy(p!.min))
    .y1((p) => sy(p!.max))(withBreaks);
  const last = points[points.length - 1];
  const lastBand = last ? (last.mean < poorBelow ? 'poor' : last.mean < lowBelow ? 'low' : 'ample') : null;
  const lowY = sy(lowBelow);
  const poorY = sy(poorBelow);
  // Keep the two labels apart when the lines are close.
  const labelGap = Math.max(0, 11 - (poorY - lowY));
  return (
    <View onLayout={onLayout} style={[styles.wrap, { height }]} role="img" aria-label={label} testID={testID}>
      {width > 0 ? (
        <Svg width={width} height={height} aria-hidden>
          <Line x1={left} x2={right} y1={bottom} y2={bottom} stroke={colors.rule} strokeWidth={1} />
          {env ? <Path d={env} fill={colors.ink} opacity={0.1} /> : null}
          <Line x1={left} x2={right} y1={lowY} y2={lowY} stroke={bands.low.color} strokeWidth={1.25} strokeDasharray="4 3" />
          <Line x1={left} x2={right} y1={poorY} y2={poorY} stroke={bands.poor.color} strokeWidth={1.25} strokeDasharray="4 3" />
          {mean ? <Path d={mean} fill="none" stroke={colors.accent} strokeWidth={1.75} strokeLinejoin="round" /> : null}
          {/* A bucket with no neighbour draws no line: mark its mean with a dot. */}
          {withBreaks.map((p, i) =>
            p && !withBreaks[i - 1] && !withBreaks[i + 1] ? <Circle key={i} cx={sx(p.t + half)} cy={sy(p.mean)} r={1.75} fill={colors.accent} /> : null,
          )}
          {last && lastBand ? <MarkerShape kind={bandMarker(lastBand).shape} x={sx(last.t + half)} y={sy(last.mean)} size={3.5} color={bandMarker(lastBand).color} /> : null}
          <G>
            <SvgText x={right + 7} y={lowY + 4 - labelGap / 2} fontSize={10} fontFamily={fonts.mono} fill={bands.low.color}>
              {formatPercent(lowBelow)}
            </SvgText>
            <SvgText x={right + 7} y={poorY + 4 + labelGap / 2} fontSize={10} fontFamily={fonts.mono} fill={bands.poor.color}>
              {formatPercent(poorBelow)}
            </SvgText>
          </G>
        </Svg>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { width: '100%' },
});
