// The chart library's arithmetic (components/charts): min/max decimation keeps every pixel
// column's extremes, value ticks fall on 1-2-5 steps (the usual "nice numbers" rule, common
// practice), time ticks align to UTC, and zoom / pan keep their centre and bounds.
import { scaleLinear } from 'd3-scale';
import { describe, expect, it } from 'vitest';
import { clipToDomain, decimateMinMax } from '../../components/charts/decimate';
import { timeTickLabel, timeTicks, valueTicks } from '../../components/charts/ticks';
import { clampDomain, panDomain, zoomDomain } from '../../components/charts/zoom';

describe('decimateMinMax', () => {
  // A long noisy sine with one narrow spike: what a plain every-n-th thinning would lose.
  const n = 100_000;
  const pts = Array.from({ length: n }, (_, i) => ({ x: i * 0.01, y: Math.sin(i / 500) + 0.1 * Math.sin(i * 1.7) }));
  pts[54_321] = { x: pts[54_321].x, y: 9 };

  it('keeps each bucket’s first, lowest, highest and last point, in x order', () => {
    const buckets = 400;
    const out = decimateMinMax(pts, buckets);
    expect(out.length).toBeLessThanOrEqual(buckets * 4);
    expect(out.length).toBeGreaterThanOrEqual(buckets * 2);
    for (let i = 1; i < out.length; i++) expect(out[i].x).toBeGreaterThan(out[i - 1].x);
    expect(out[0]).toBe(pts[0]);
    expect(out[out.length - 1]).toBe(pts[n - 1]);
    expect(out.some((p) => p.y === 9)).toBe(true);
    // per bucket, the extremes of the kept points equal those of the original
    const span = pts[n - 1].x - pts[0].x;
    const bucketOf = (x: number) => Math.min(buckets - 1, Math.floor(((x - pts[0].x) / span) * buckets));
    const ext = (list: { x: number; y: number }[]) => {
      const m = new Map<number, [number, number]>();
      for (const p of list) {
        const b = bucketOf(p.x);
        const e = m.get(b) ?? [Infinity, -Infinity];
        m.set(b, [Math.min(e[0], p.y), Math.max(e[1], p.y)]);
      }
      return m;
    };
    expect(ext(out)).toEqual(ext(pts));
  });

  it('returns short series unchanged and keeps gaps (NaN) as breaks', () => {
    const short = pts.slice(0, 100);
    expect(decimateMinMax(short, 50)).toEqual(short);
    const gappy = pts.slice(0, 10_000).map((p, i) => (i === 5000 ? { x: p.x, y: Number.NaN } : p));
    const out = decimateMinMax(gappy, 100);
    expect(out.filter((p) => Number.isNaN(p.y))).toHaveLength(1);
  });

  it('clips to a domain with one neighbour either side', () => {
    const c = clipToDomain(pts.slice(0, 1000), 2, 3);
    expect(c[0].x).toBeLessThan(2);
    expect(c[1].x).toBeGreaterThanOrEqual(2);
    expect(c[c.length - 1].x).toBeGreaterThan(3);
    expect(c[c.length - 2].x).toBeLessThanOrEqual(3);
  });
});

describe('valueTicks', () => {
  it('puts ticks on 1-2-5 steps inside the range', () => {
    expect(valueTicks(0, 10, 5)).toEqual({ ticks: [0, 2, 4, 6, 8, 10], decimals: 0 });
    const f = valueTicks(0.2813, 0.3466, 4);
    expect(f.ticks).toEqual([0.3, 0.32, 0.34]);
    const g = valueTicks(0.2813, 0.3466, 6);
    expect(g.ticks).toEqual([0.29, 0.3, 0.31, 0.32, 0.33, 0.34]);
    expect(g.decimals).toBe(2);
    for (const [lo, hi, c] of [[-3.2, 11.7, 5], [1200, 3050, 6], [0, 0.004, 4]] as const) {
      const t = valueTicks(lo, hi, c);
      const step = t.ticks[1] - t.ticks[0];
      const mant = step / 10 ** Math.floor(Math.log10(step) + 1e-9);
      expect([1, 2, 5].some((m) => Math.abs(mant - m) < 1e-9)).toBe(true);
      expect(t.ticks[0]).toBeGreaterThanOrEqual(lo);
      expect(t.ticks[t.ticks.length - 1]).toBeLessThanOrEqual(hi);
      expect(t.ticks.length).toBeGreaterThanOrEqual(2);
    }
  });

  it('matches d3-scale’s linear ticks (library) over many ranges', () => {
    let seed = 7;
    const rnd = () => ((seed = (seed * 16807) % 2147483647) / 2147483647);
    for (let i = 0; i < 500; i++) {
      const lo = (rnd() - 0.5) * 10 ** Math.floor(rnd() * 8 - 3);
      const hi = lo + rnd() * 10 ** Math.floor(rnd() * 8 - 3) + 1e-6;
      const count = 2 + Math.floor(rnd() * 6);
      const ref = scaleLinear().domain([lo, hi]).ticks(count);
      const mine = valueTicks(lo, hi, count).ticks;
      expect(mine.length, `${lo}..${hi} (${count})`).toBe(ref.length);
      mine.forEach((v, k) => expect(v).toBeCloseTo(ref[k], 9));
    }
  });
});

describe('timeTicks', () => {
  it('aligns sub-day steps to UTC midnight and labels the day where it begins', () => {
    const from = Date.UTC(2031, 4, 4, 13, 20);
    const to = from + 24 * 3600_000;
    const { ticks, step } = timeTicks(from, to, 5);
    expect(step).toBe(6 * 3600_000);
    expect(ticks.map((t) => new Date(t).getUTCHours())).toEqual([18, 0, 6, 12]);
    expect(timeTickLabel(ticks[1], step)).toEqual({ main: '00:00', sub: '05-05' });
    expect(timeTickLabel(ticks[0], step)).toEqual({ main: '18:00', sub: null });
    expect(timeTickLabel(Date.UTC(2031, 4, 6), 7 * 24 * 3600_000)).toEqual({ main: '05-06', sub: null });
  });
});

describe('zoom and pan', () => {
  it('zooms about the centre, pans by a share of the span, and stays in bounds', () => {
    expect(zoomDomain([0, 100], 0.5)).toEqual([25, 75]);
    expect(zoomDomain([0, 100], 2, 100)).toEqual([-100, 100]);
    expect(panDomain([10, 20], -0.5)).toEqual([5, 15]);
    expect(clampDomain([-10, 40], [0, 100], 1)).toEqual([0, 50]);
    expect(clampDomain([-10, 400], [0, 100], 1)).toEqual([0, 100]);
    expect(clampDomain([50, 50.2], [0, 100], 2)).toEqual([49.1, 51.1]);
    expect(clampDomain([-10, 40], null, 1)).toEqual([-10, 40]);
  });
});
