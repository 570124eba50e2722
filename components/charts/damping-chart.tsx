// The damping chart: damping ratio (%) over time with its confidence band, and ALWAYS the track's
// two threshold lines (poor, default 3 %, and low, default 5 % — the common 3–5 % rule) with their
// labels, whatever the data's range. Long spans arrive bucketed (min / mean / max per bucket) and
// are drawn as a min–max envelope with the mean line.
import type { Band } from '@/shared/bands';
import { formatDateTime, formatPercent } from '../format';
import { bands, colors } from '../theme';
import type { RefLineSpec } from './axes';
import type { BrushOptions } from './chart-surface';
import { LineChart, type ChartSeries, type ShadedSpan, type XMarker } from './line-chart';
import { bandMarker } from './markers';
import type { ChartZoom, Domain } from './zoom';

export interface DampingPoint {
  /** Epoch ms. */
  x: number;
  /** Damping ratio, %. */
  y: number;
  lo?: number | null;
  hi?: number | null;
  band?: Band;
  forced?: boolean;
}

export interface DampingBucket {
  /** Bucket start, epoch ms. */
  x: number;
  min: number;
  mean: number;
  max: number;
  loMean?: number | null;
  hiMean?: number | null;
}

export interface DampingChartProps {
  poorBelow: number;
  lowBelow: number;
  points?: DampingPoint[];
  buckets?: DampingBucket[];
  /** Width of a bucket, ms (to draw each bucket across its width). */
  bucketMs?: number;
  spans?: ShadedSpan[];
  markers?: XMarker[];
  xExtent?: Domain;
  zoom?: ChartZoom;
  brush?: BrushOptions;
  height?: number;
  /** Overrides the generated accessible summary. */
  label?: string;
  /** Break the line across gaps longer than this, ms (default: 4 × the median spacing). */
  maxGap?: number;
  testID?: string;
}

/** The two threshold lines every damping chart carries (labels name the value and the band). */
export function thresholdLines(poorBelow: number, lowBelow: number): RefLineSpec[] {
  return [
    { y: lowBelow, label: `${formatPercent(lowBelow)} low`, color: bands.low.color },
    { y: poorBelow, label: `${formatPercent(poorBelow)} poor`, color: bands.poor.color },
  ];
}

export function medianSpacing(xs: number[]): number {
  if (xs.length < 2) return 0;
  const d: number[] = [];
  for (let i = 1; i < xs.length; i++) d.push(xs[i] - xs[i - 1]);
  d.sort((a, b) => a - b);
  return d[Math.floor(d.length / 2)];
}

/** A one-sentence summary of a damping series for screen readers. */
export function describeDamping(p: { points?: DampingPoint[]; buckets?: DampingBucket[]; poorBelow: number; lowBelow: number; what?: string }): string {
  const what = p.what ?? 'Damping ratio';
  const lines = `Threshold lines at ${formatPercent(p.poorBelow)} (poor) and ${formatPercent(p.lowBelow)} (low).`;
  const natural = (p.points ?? []).filter((q) => !q.forced && Number.isFinite(q.y));
  if (natural.length > 0) {
    const first = natural[0];
    const last = natural[natural.length - 1];
    let lo = natural[0];
    for (const q of natural) if (q.y < lo.y) lo = q;
    const below = natural.filter((q) => q.y < p.poorBelow).length;
    return `${what} chart: ${natural.length} estimates from ${formatDateTime(new Date(first.x).toISOString())} to ${formatDateTime(new Date(last.x).toISOString())}; latest ${formatPercent(last.y)}, lowest ${formatPercent(lo.y)} at ${formatDateTime(new Date(lo.x).toISOString())}; ${below} under ${formatPercent(p.poorBelow)}. ${lines}`;
  }
  const b = p.buckets ?? [];
  if (b.length > 0) {
    let lo = b[0];
    for (const q of b) if (q.min < lo.min) lo = q;
    return `${what} chart, grouped in ${b.length} intervals from ${formatDateTime(new Date(b[0].x).toISOString())} to ${formatDateTime(new Date(b[b.length - 1].x).toISOString())}; latest mean ${formatPercent(b[b.length - 1].mean)}, lowest ${formatPercent(lo.min)}. ${lines}`;
  }
  return `${what} chart with no estimates in this period. ${lines}`;
}

export function DampingChart({
  poorBelow,
  lowBelow,
  points = [],
  buckets = [],
  bucketMs,
  spans,
  markers,
  xExtent,
  zoom,
  brush,
  height = 240,
  label,
  maxGap,
  testID,
}: DampingChartProps) {
  const series: ChartSeries[] = [];
  if (buckets.length > 0) {
    const gap = maxGap ?? Math.max((bucketMs ?? 0) * 1.5, medianSpacing(buckets.map((b) => b.x)) * 4);
    const half = (bucketMs ?? 0) / 2;
    const ci = buckets.filter((b) => b.loMean != null && b.hiMean != null);
    if (ci.length > 0) {
      series.push({ kind: 'band', id: 'ci', label: 'Mean confidence interval', color: colors.accent, opacity: 0.16, maxGap: gap, points: ci.map((b) => ({ x: b.x + half, lo: b.loMean!, hi: b.hiMean! })) });
    }
    series.push({ kind: 'band', id: 'range', label: 'Lowest to highest', color: colors.ink, opacity: 0.1, maxGap: gap, points: buckets.map((b) => ({ x: b.x + half, lo: b.min, hi: b.max })) });
    series.push({ kind: 'line', id: 'mean', label: 'Mean damping', color: colors.accent, width: 2, maxGap: gap, points: buckets.map((b) => ({ x: b.x + half, y: b.mean })) });
  } else {
    const natural = points.filter((p) => !p.forced);
    const gap = maxGap ?? medianSpacing(natural.map((p) => p.x)) * 4;
    const ci = natural.filter((p) => p.lo != null && p.hi != null);
    if (ci.length > 0) {
      series.push({ kind: 'band', id: 'ci', label: 'Confidence interval', color: colors.accent, opacity: 0.16, maxGap: gap, points: ci.map((p) => ({ x: p.x, lo: p.lo!, hi: p.hi! })) });
    }
    series.push({ kind: 'line', id: 'damping', label: 'Damping ratio', color: colors.accent, width: 2, maxGap: gap, points: natural.map((p) => ({ x: p.x, y: p.y })) });
    // Band shapes on the points while they are few enough to tell apart.
    if (points.length <= 240) {
      series.push({
        kind: 'points',
        id: 'marks',
        label: 'Estimate (shape and colour: band)',
        color: colors.accent,
        points: points.map((p) => {
          const band: Band = p.forced ? 'forced' : (p.band ?? (p.y < poorBelow ? 'poor' : p.y < lowBelow ? 'low' : 'ample'));
          return { x: p.x, y: p.y, ...bandMarker(band) };
        }),
      });
    }
  }
  return (
    <LineChart
      label={label ?? describeDamping({ points, buckets, poorBelow, lowBelow })}
      height={height}
      x={{ kind: 'time' }}
      y={{ title: 'Damping ratio, %', include: [0, lowBelow * 1.4] }}
      series={series}
      refLines={thresholdLines(poorBelow, lowBelow)}
      spans={spans}
      markers={markers}
      xExtent={xExtent}
      zoom={zoom}
      what="damping"
      brush={brush}
      testID={testID}
    />
  );
}
