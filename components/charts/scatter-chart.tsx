// Scatter of one quantity against another (transfer study: damping % or corridor angle ° against
// corridor MW) with a fitted line and its confidence band, labelled horizontal reference lines
// (thresholds, a practical limit) and projections: where the line reaches a reference value,
// drawn as a marker on the line with its interval as a bar along x and a drop line to the axis.
import { area, line } from 'd3-shape';
import { useId } from 'react';
import { StyleSheet, View } from 'react-native';
import { ClipPath, Defs, G, Line, Path, Rect } from 'react-native-svg';
import { colors } from '../theme';
import { HaloText, RefLine, XAxis, YAxis, linear, type RefLineSpec } from './axes';
import { ChartSurface, type Margins } from './chart-surface';
import { Legend } from './line-chart';
import { MarkerShape, type MarkerKind } from './markers';
import { paddedExtent } from './ticks';
import type { Domain } from './zoom';

export interface ScatterPoint {
  x: number;
  y: number;
  /** Interval of y (drawn as a thin whisker when given). */
  lo?: number | null;
  hi?: number | null;
  shape?: MarkerKind;
  color?: string;
}

export interface FitLinePoint {
  x: number;
  y: number;
  lo: number;
  hi: number;
}

export interface Projection {
  /** Where the line reaches `y`, x units; null: not reached. */
  x: number | null;
  y: number;
  /** Interval of x (null: unbounded). */
  lo: number | null;
  hi: number | null;
  /** Short label at the marker, e.g. "3 % at 2 480 MW". */
  label: string;
  color: string;
}

export interface ScatterChartProps {
  label: string;
  height?: number;
  x: { title: string; domain?: Domain };
  y: { title: string; include?: number[]; domain?: Domain };
  points: ScatterPoint[];
  pointsLabel?: string;
  pointColor?: string;
  /**
   * The fitted line with its band over the data's range; with `intercept` and `slope` the line is
   * continued, dashed, across the rest of the chart (to reach projections beyond the data).
   */
  fit?: { points: FitLinePoint[]; color?: string; label?: string; bandLabel?: string; intercept?: number; slope?: number };
  refLines?: RefLineSpec[];
  projections?: Projection[];
  testID?: string;
}

const MARGINS: Margins = { top: 26, right: 14, bottom: 44, left: 46 };

export function ScatterChart({ label, height = 280, x, y, points, pointsLabel = 'Estimate', pointColor = colors.inkMuted, fit, refLines = [], projections = [], testID }: ScatterChartProps) {
  const clipId = `clip${useId().replace(/[^A-Za-z0-9]/g, '')}`;
  const fitColor = fit?.color ?? colors.accent;
  const xs = points.map((p) => p.x);
  for (const pr of projections) for (const v of [pr.x, pr.lo, pr.hi]) if (v != null && Number.isFinite(v)) xs.push(v);
  const xDomain = x.domain ?? paddedExtent(xs, 0.05);
  const ys = points.flatMap((p) => [p.y, p.lo ?? p.y, p.hi ?? p.y]);
  if (fit) for (const f of fit.points) if (f.x >= xDomain[0] && f.x <= xDomain[1]) ys.push(f.lo, f.hi);
  const yDomain = y.domain ?? paddedExtent(ys, 0.06, [...(y.include ?? []), ...refLines.map((r) => r.y)]);
  const legend = [
    { id: 'pts', label: pointsLabel, kind: 'points' as const, color: pointColor },
    ...(fit ? [{ id: 'fit', label: fit.label ?? 'Fitted line', kind: 'line' as const, color: fitColor }, { id: 'band', label: fit.bandLabel ?? 'Confidence band', kind: 'band' as const, color: fitColor }] : []),
  ];
  return (
    <View style={styles.wrap}>
      <ChartSurface label={label} height={height} margins={MARGINS} domain={xDomain} testID={testID}>
        {({ plot }) => {
          const sx = linear(xDomain, [plot.x, plot.x + plot.w]);
          const sy = linear(yDomain, [plot.y + plot.h, plot.y]);
          const bandPath = fit ? area<FitLinePoint>().x((p) => sx(p.x)).y0((p) => sy(p.lo)).y1((p) => sy(p.hi))(fit.points) : null;
          const linePath = fit ? line<FitLinePoint>().x((p) => sx(p.x)).y((p) => sy(p.y))(fit.points) : null;
          const size = points.length > 200 ? 2.6 : 3.6;
          return (
            <>
              <Defs>
                <ClipPath id={clipId}>
                  <Rect x={plot.x} y={plot.y} width={plot.w} height={plot.h} />
                </ClipPath>
              </Defs>
              <Rect x={plot.x} y={plot.y} width={plot.w} height={plot.h} fill={colors.surface} />
              <YAxis plot={plot} domain={yDomain} title={y.title} />
              <G clipPath={`url(#${clipId})`}>
                {bandPath ? <Path d={bandPath} fill={fitColor} opacity={0.16} /> : null}
                {points.map((p, i) =>
                  p.lo != null && p.hi != null && points.length <= 200 ? (
                    <Line key={`w${i}`} x1={sx(p.x)} x2={sx(p.x)} y1={sy(p.lo)} y2={sy(p.hi)} stroke={p.color ?? pointColor} strokeWidth={0.8} opacity={0.45} />
                  ) : null,
                )}
                {points.map((p, i) => (
                  <MarkerShape key={`p${i}`} kind={p.shape ?? 'circle'} x={sx(p.x)} y={sy(p.y)} size={size} color={p.color ?? pointColor} />
                ))}
                {fit && fit.intercept != null && fit.slope != null && fit.points.length > 1 ? (
                  <>
                    <Line x1={sx(xDomain[0])} y1={sy(fit.intercept + fit.slope * xDomain[0])} x2={sx(fit.points[0].x)} y2={sy(fit.intercept + fit.slope * fit.points[0].x)} stroke={fitColor} strokeWidth={1.5} strokeDasharray="5 4" />
                    <Line x1={sx(fit.points[fit.points.length - 1].x)} y1={sy(fit.intercept + fit.slope * fit.points[fit.points.length - 1].x)} x2={sx(xDomain[1])} y2={sy(fit.intercept + fit.slope * xDomain[1])} stroke={fitColor} strokeWidth={1.5} strokeDasharray="5 4" />
                  </>
                ) : null}
                {linePath ? <Path d={linePath} fill="none" stroke={fitColor} strokeWidth={2.25} /> : null}
                {projections.map((pr, i) => {
                  if (pr.x == null) return null;
                  const px = sx(pr.x);
                  const py = sy(pr.y);
                  const lo = pr.lo != null ? sx(pr.lo) : plot.x;
                  const hi = pr.hi != null ? sx(pr.hi) : plot.x + plot.w;
                  return (
                    <G key={`pr${i}`}>
                      <Line x1={px} x2={px} y1={py} y2={plot.y + plot.h} stroke={pr.color} strokeWidth={1.25} strokeDasharray="2 3" />
                      <Line x1={lo} x2={hi} y1={py} y2={py} stroke={pr.color} strokeWidth={4} strokeLinecap="round" opacity={0.45} />
                      <Line x1={lo} x2={lo} y1={py - 6} y2={py + 6} stroke={pr.color} strokeWidth={1.5} />
                      <Line x1={hi} x2={hi} y1={py - 6} y2={py + 6} stroke={pr.color} strokeWidth={1.5} />
                      <Path d={`M${px} ${py - 6} L${px + 6} ${py} L${px} ${py + 6} L${px - 6} ${py} Z`} fill={colors.surface} stroke={pr.color} strokeWidth={2} />
                    </G>
                  );
                })}
              </G>
              {refLines.map((r, i) => (
                <RefLine key={`r${i}`} plot={plot} scale={sy} spec={r} labelBelow={refLines.some((o, j) => j !== i && o.y > r.y && Math.abs(sy(o.y) - sy(r.y)) < 16)} />
              ))}
              {projections.map((pr, i) => {
                if (pr.x == null) return null;
                const px = sx(pr.x);
                if (px < plot.x || px > plot.x + plot.w) return null;
                const right = px < plot.x + plot.w * 0.55;
                return (
                  <HaloText key={`pl${i}`} x={right ? px + 9 : px - 9} y={sy(pr.y) + 16} color={pr.color} anchor={right ? 'start' : 'end'} bold>
                    {pr.label}
                  </HaloText>
                );
              })}
              <XAxis plot={plot} domain={xDomain} kind="linear" title={x.title} />
            </>
          );
        }}
      </ChartSurface>
      <View style={styles.legend}>
        <Legend series={legend} />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { width: '100%' },
  legend: { marginTop: 4 },
});
