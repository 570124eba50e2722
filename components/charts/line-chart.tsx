// A general x–y chart over time (or any linear x): lines (min/max-decimated to the pixel width),
// bands (confidence intervals, min/max envelopes), point markers, labelled horizontal reference
// lines, shaded x spans (alert periods) and vertical markers. Zoom / pan by buttons, keys and
// drag, or brush an x interval. Everything is clipped to the plot rectangle.
import { area, line } from 'd3-shape';
import { useId, useMemo, type ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';
import { ClipPath, Defs, G, Line, Path, Rect } from 'react-native-svg';
import { Text } from '../text';
import { colors, space } from '../theme';
import { HaloText, RefLine, XAxis, YAxis, linear, type RefLineSpec, type Scale } from './axes';
import { ChartSurface, type BrushOptions, type Margins, type Plot } from './chart-surface';
import { clipToDomain, decimateMinMax, type XY } from './decimate';
import { MarkerShape, type MarkerKind } from './markers';
import { paddedExtent } from './ticks';
import { ZoomControls } from './zoom-controls';
import type { ChartZoom, Domain } from './zoom';

export interface BandPoint {
  x: number;
  lo: number;
  hi: number;
}

export interface MarkerPoint extends XY {
  /** Marker shape (band shapes: ample ○ circle, low ◇ diamond, poor ▲ triangle, forced ∿ wave). */
  shape?: MarkerKind;
  color?: string;
}

export type ChartSeries =
  | { kind: 'line'; id: string; label: string; points: XY[]; color: string; width?: number; dash?: string; maxGap?: number }
  | { kind: 'band'; id: string; label: string; points: BandPoint[]; color: string; opacity?: number; maxGap?: number }
  | { kind: 'points'; id: string; label: string; points: MarkerPoint[]; color: string; size?: number };

export interface ShadedSpan {
  from: number;
  to: number;
  color: string;
  /** Written at the top of the span when there is room, e.g. "alert". */
  label?: string;
  opacity?: number;
}

export interface XMarker {
  x: number;
  label?: string;
  color: string;
  dash?: string;
}

export interface LineChartProps {
  /** The accessible summary: what the chart shows, its span and its key values. */
  label: string;
  height?: number;
  x: { kind: 'time' } | { kind: 'linear'; title: string };
  y: {
    /** Quantity and unit, e.g. "Damping ratio, %". */
    title: string;
    /** A fixed domain; otherwise the data's, padded, widened to take in `include`. */
    domain?: Domain;
    include?: number[];
  };
  series: ChartSeries[];
  refLines?: RefLineSpec[];
  spans?: ShadedSpan[];
  markers?: XMarker[];
  /** The full x extent (defaults to the data's). */
  xExtent?: Domain;
  zoom?: ChartZoom;
  /** Show the zoom buttons under the chart (default: when `zoom` is given). */
  controls?: boolean;
  /** Describes the chart for the zoom buttons' names ("damping"). */
  what?: string;
  brush?: BrushOptions;
  /** Draw a key of the series under the chart (default true when more than one series). */
  legend?: boolean;
  testID?: string;
  margins?: Partial<Margins>;
}

const DEFAULT_MARGINS: Margins = { top: 26, right: 12, bottom: 46, left: 44 };

/** Inserts a break (NaN) between consecutive points more than `maxGap` apart. */
export function withGaps<T extends { x: number }>(points: readonly T[], maxGap: number | undefined, blank: (x: number) => T): T[] {
  if (!maxGap || points.length < 2) return points as T[];
  const out: T[] = [points[0]];
  for (let i = 1; i < points.length; i++) {
    if (points[i].x - points[i - 1].x > maxGap) out.push(blank((points[i].x + points[i - 1].x) / 2));
    out.push(points[i]);
  }
  return out;
}

export function dataExtentX(series: ChartSeries[]): Domain {
  let lo = Infinity;
  let hi = -Infinity;
  for (const s of series) {
    for (const p of s.points) {
      if (p.x < lo) lo = p.x;
      if (p.x > hi) hi = p.x;
    }
  }
  if (!(lo <= hi)) return [0, 1];
  if (lo === hi) return [lo - 1, hi + 1];
  return [lo, hi];
}

function yValues(series: ChartSeries[], domain: Domain): number[] {
  const out: number[] = [];
  for (const s of series) {
    if (s.kind === 'band') {
      for (const p of s.points) if (p.x >= domain[0] && p.x <= domain[1]) out.push(p.lo, p.hi);
    } else {
      for (const p of s.points) if (p.x >= domain[0] && p.x <= domain[1]) out.push(p.y);
    }
  }
  return out;
}

export function LineChart({
  label,
  height = 240,
  x,
  y,
  series,
  refLines = [],
  spans = [],
  markers = [],
  xExtent,
  zoom,
  controls,
  what,
  brush,
  legend,
  testID,
  margins,
}: LineChartProps) {
  const m = { ...DEFAULT_MARGINS, ...margins };
  if (x.kind === 'time') m.bottom = Math.max(m.bottom, 50);
  const extent = useMemo(() => xExtent ?? dataExtentX(series), [xExtent, series]);
  const clipId = `clip${useId().replace(/[^A-Za-z0-9]/g, '')}`;
  const showLegend = legend ?? series.length > 1;

  return (
    <View style={styles.wrap}>
      <ChartSurface label={label} height={height} margins={m} domain={extent} zoom={zoom} brush={brush} testID={testID}>
        {({ plot, domain }) => {
          const yDomain = y.domain ?? paddedExtent(yValues(series, domain), 0.08, [...(y.include ?? []), ...refLines.map((r) => r.y)]);
          const sx = linear(domain, [plot.x, plot.x + plot.w]);
          const sy = linear(yDomain, [plot.y + plot.h, plot.y]);
          return (
            <>
              <Defs>
                <ClipPath id={clipId}>
                  <Rect x={plot.x} y={plot.y - 1} width={plot.w} height={plot.h + 2} />
                </ClipPath>
              </Defs>
              <Rect x={plot.x} y={plot.y} width={plot.w} height={plot.h} fill={colors.surface} />
              <G clipPath={`url(#${clipId})`}>
                {spans.map((s, i) => (
                  <SpanRect key={`s${i}`} plot={plot} sx={sx} span={s} />
                ))}
              </G>
              <YAxis plot={plot} domain={yDomain} title={y.title} />
              <G clipPath={`url(#${clipId})`}>
                {series.map((s) => (s.kind === 'points' ? null : <SeriesShape key={s.id} s={s} sx={sx} sy={sy} plot={plot} domain={domain} />))}
                {markers.map((mk, i) => {
                  const px = sx(mk.x);
                  return <Line key={`m${i}`} x1={px} x2={px} y1={plot.y} y2={plot.y + plot.h} stroke={mk.color} strokeWidth={1.5} strokeDasharray={mk.dash ?? '2 3'} />;
                })}
              </G>
              {/* Marks are filtered to the domain, so they may stand a few px past the plot edge unclipped. */}
              {series.map((s) => (s.kind === 'points' ? <SeriesShape key={s.id} s={s} sx={sx} sy={sy} plot={plot} domain={domain} /> : null))}
              {refLines.map((r, i) => (
                <RefLine key={`r${i}`} plot={plot} scale={sy} spec={r} labelBelow={refLineLabelBelow(refLines, i, sy)} />
              ))}
              {spans.map((s, i) => (s.label ? <SpanLabel key={`sl${i}`} plot={plot} sx={sx} span={s} /> : null))}
              {markers.map((mk, i) => {
                const px = sx(mk.x);
                if (!mk.label || px < plot.x || px > plot.x + plot.w) return null;
                const anchor = px > plot.x + plot.w * 0.7 ? 'end' : 'start';
                return (
                  <HaloText key={`ml${i}`} x={anchor === 'end' ? px - 4 : px + 4} y={plot.y + 12} color={mk.color} anchor={anchor} bold>
                    {mk.label}
                  </HaloText>
                );
              })}
              <XAxis plot={plot} domain={domain} kind={x.kind} title={x.kind === 'linear' ? x.title : undefined} />
            </>
          );
        }}
      </ChartSurface>
      {showLegend || (zoom && controls !== false) ? (
        <View style={styles.under}>
          {showLegend ? <Legend series={series} /> : <View />}
          {zoom && controls !== false ? <ZoomControls zoom={zoom} what={what} /> : null}
        </View>
      ) : null}
    </View>
  );
}

/** Two reference lines close together: put the lower one's label under its line. */
function refLineLabelBelow(lines: RefLineSpec[], i: number, sy: Scale): boolean {
  const me = sy(lines[i].y);
  return lines.some((o, j) => j !== i && o.y > lines[i].y && Math.abs(sy(o.y) - me) < 16);
}

function SpanRect({ plot, sx, span }: { plot: Plot; sx: Scale; span: ShadedSpan }) {
  const a = Math.max(plot.x, sx(span.from));
  const b = Math.min(plot.x + plot.w, sx(span.to));
  if (b <= a) return null;
  return <Rect x={a} y={plot.y} width={Math.max(1.5, b - a)} height={plot.h} fill={span.color} opacity={span.opacity ?? 0.13} />;
}

function SpanLabel({ plot, sx, span }: { plot: Plot; sx: Scale; span: ShadedSpan }) {
  const a = Math.max(plot.x, sx(span.from));
  const b = Math.min(plot.x + plot.w, sx(span.to));
  if (b <= a || !span.label) return null;
  const room = b - a > span.label.length * 6.5 + 8;
  // When the span is narrow, the label goes beside it rather than over the data.
  const xPos = room ? a + 4 : b + 3 + span.label.length * 6.5 < plot.x + plot.w ? b + 3 : a - 3;
  const anchor = room || xPos === b + 3 ? 'start' : 'end';
  return (
    <HaloText x={xPos} y={plot.y + plot.h - 6} color={span.color} anchor={anchor} bold>
      {span.label}
    </HaloText>
  );
}

function SeriesShape({ s, sx, sy, plot, domain }: { s: ChartSeries; sx: Scale; sy: Scale; plot: Plot; domain: Domain }): ReactNode {
  const buckets = Math.max(50, Math.round(plot.w));
  if (s.kind === 'line') {
    const visible = decimateMinMax(clipToDomain(s.points, domain[0], domain[1]), buckets);
    const pts = withGaps(visible, s.maxGap, (px) => ({ x: px, y: Number.NaN }));
    const d = line<XY>()
      .defined((p) => Number.isFinite(p.y))
      .x((p) => sx(p.x))
      .y((p) => sy(p.y))(pts);
    if (!d) return null;
    return <Path d={d} fill="none" stroke={s.color} strokeWidth={s.width ?? 1.75} strokeDasharray={s.dash} strokeLinejoin="round" strokeLinecap="round" />;
  }
  if (s.kind === 'band') {
    let visible = clipToDomain(s.points, domain[0], domain[1]);
    if (visible.length > buckets * 4) {
      // Thin the envelope per pixel column: lowest lo and highest hi.
      visible = envelope(visible, domain, buckets);
    }
    const pts = withGaps(visible, s.maxGap, (px) => ({ x: px, lo: Number.NaN, hi: Number.NaN }));
    const d = area<BandPoint>()
      .defined((p) => Number.isFinite(p.lo) && Number.isFinite(p.hi))
      .x((p) => sx(p.x))
      .y0((p) => sy(p.lo))
      .y1((p) => sy(p.hi))(pts);
    if (!d) return null;
    return <Path d={d} fill={s.color} opacity={s.opacity ?? 0.18} stroke="none" />;
  }
  const visible = s.points.filter((p) => p.x >= domain[0] && p.x <= domain[1] && Number.isFinite(p.y));
  // Smaller marks when they crowd: about one mark per 6 px of plot width.
  const crowded = visible.length > plot.w / 6;
  const size = s.size ?? (crowded ? 2.6 : visible.length > plot.w / 14 ? 3.4 : 4.2);
  return (
    <G>
      {visible.map((p, i) => (
        <MarkerShape key={i} kind={p.shape ?? 'circle'} x={sx(p.x)} y={sy(p.y)} size={size} color={p.color ?? s.color} />
      ))}
    </G>
  );
}

function envelope(points: BandPoint[], domain: Domain, buckets: number): BandPoint[] {
  const out: BandPoint[] = [];
  const span = domain[1] - domain[0] || 1;
  let cur: BandPoint | null = null;
  let curB = -1;
  for (const p of points) {
    const b = Math.floor(((p.x - domain[0]) / span) * buckets);
    if (b !== curB || !cur) {
      if (cur) out.push(cur);
      cur = { ...p };
      curB = b;
    } else {
      if (p.lo < cur.lo) cur.lo = p.lo;
      if (p.hi > cur.hi) cur.hi = p.hi;
    }
  }
  if (cur) out.push(cur);
  return out;
}

/** The key: a swatch of each series' colour and form with its name. */
export function Legend({ series }: { series: { id: string; label: string; kind: ChartSeries['kind']; color: string; dash?: string }[] }) {
  return (
    <View style={styles.legend} aria-hidden>
      {series.map((s) => (
        <View key={s.id} style={styles.legendItem}>
          <View
            style={[
              s.kind === 'band' ? styles.swatchBand : s.kind === 'points' ? styles.swatchDot : styles.swatchLine,
              { backgroundColor: s.kind === 'band' ? `${s.color}40` : s.color },
            ]}
          />
          <Text variant="caption" muted>
            {s.label}
          </Text>
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { width: '100%' },
  under: { flexDirection: 'row', flexWrap: 'wrap', justifyContent: 'space-between', alignItems: 'center', gap: space.sm, marginTop: space.xs },
  legend: { flexDirection: 'row', flexWrap: 'wrap', columnGap: space.md, rowGap: space.xxs, flexShrink: 1 },
  legendItem: { flexDirection: 'row', alignItems: 'center', gap: space.xs },
  swatchLine: { width: 16, height: 3, borderRadius: 1.5 },
  swatchBand: { width: 16, height: 10, borderRadius: 2 },
  swatchDot: { width: 8, height: 8, borderRadius: 4 },
});
