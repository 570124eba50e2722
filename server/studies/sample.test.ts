// The display sample of a transfer study (rule in shared/api/studies.ts), on windows generated from
// a known line (damping 9 − 0.002·MW % with scatter, transfers following a daily swing): bounded,
// deterministic, every bin's damping extremes kept, the whole cloud's shape kept, and the study's
// figures independent of it.
import { describe, expect, it } from 'vitest';
import { createRng } from '@/modal/random';
import { STUDY_MAX_POINTS, STUDY_SAMPLE_BINS } from '@/shared/api/studies';
import { checkDisplaySampleOptions, displaySampleIndices, sampleDisplayPoints, type DisplaySampleOptions } from './sample';
import { buildTransferStudy, type StudyPoint } from './transfer';

interface Window {
  id: number;
  transferMw: number;
  dampingPercent: number;
  forced: boolean;
}

/** n one-minute windows: transfer swinging daily between ~700 and ~2700 MW, damping on a known line. */
function windows(n: number, seed: number, opts: { forcedShare?: number; dampingDecimals?: number } = {}): Window[] {
  const rng = createRng(seed);
  return Array.from({ length: n }, (_, i) => {
    const transferMw = 1700 + 1000 * Math.sin((2 * Math.PI * i) / 1440) + 60 * rng.normal();
    let d = 9 - 0.002 * transferMw + 0.6 * rng.normal();
    if (opts.dampingDecimals !== undefined) d = Number(d.toFixed(opts.dampingDecimals));
    const forced = rng.uniform() < (opts.forcedShare ?? 0);
    return { id: i, transferMw, dampingPercent: forced ? 0.3 + 0.1 * rng.normal() : d, forced };
  });
}

/** The test's own binning: `bins` equal-width bins over [min, max] of the transfers. */
function binsOf(ws: readonly Window[], bins: number): Window[][] {
  const xs = ws.map((w) => w.transferMw);
  const lo = Math.min(...xs);
  const hi = Math.max(...xs);
  const out: Window[][] = Array.from({ length: bins }, () => []);
  for (const w of ws) out[Math.min(bins - 1, Math.floor(((w.transferMw - lo) / (hi - lo)) * bins))].push(w);
  return out;
}

/** The window with the lowest (or highest) damping among the bin's natural windows; ties: the earlier one. */
function extreme(bin: readonly Window[], kind: 'lowest' | 'highest'): Window | undefined {
  let best: Window | undefined;
  for (const w of bin) {
    if (w.forced) continue;
    if (!best || (kind === 'lowest' ? w.dampingPercent < best.dampingPercent : w.dampingPercent > best.dampingPercent)) best = w;
  }
  return best;
}

function quantile(sorted: readonly number[], p: number): number {
  return sorted[Math.min(sorted.length - 1, Math.floor(p * sorted.length))];
}

describe('checkDisplaySampleOptions', () => {
  it('has the documented defaults', () => {
    expect(checkDisplaySampleOptions()).toEqual({ maxPoints: STUDY_MAX_POINTS, bins: STUDY_SAMPLE_BINS });
    expect(STUDY_MAX_POINTS).toBe(2000);
  });
  it('says what is wrong', () => {
    const msg = (o: DisplaySampleOptions) => {
      try {
        checkDisplaySampleOptions(o);
        return 'no error';
      } catch (e) {
        return (e as Error).message;
      }
    };
    expect(msg({ bins: 0 })).toBe('bins must be a whole number of at least 1 (got 0)');
    expect(msg({ bins: 2.5 })).toBe('bins must be a whole number of at least 1 (got 2.5)');
    expect(msg({ maxPoints: 10 })).toBe('maxPoints must be a whole number of at least 2 × bins + 2 = 82 (got 10)');
    expect(msg({ maxPoints: 500.5, bins: 10 })).toBe('maxPoints must be a whole number of at least 2 × bins + 2 = 22 (got 500.5)');
    expect(msg({ maxPoints: 22, bins: 10 })).toBe('no error');
  });
});

describe('sampleDisplayPoints', () => {
  it('gives back every window, in order, when there are at most maxPoints', () => {
    for (const n of [0, 1, 5, 1999, 2000]) {
      const ws = windows(n, 1);
      const s = sampleDisplayPoints(ws);
      expect(s).toHaveLength(n);
      s.forEach((w, i) => expect(w).toBe(ws[i]));
    }
    expect(displaySampleIndices({ length: 3, transferMw: [1, 2, 3], dampingPercent: [3, 2, 1], forced: [0, 0, 0] }, { maxPoints: 22, bins: 10 })).toEqual([0, 1, 2]);
  });

  it('never gives more than maxPoints, and exactly that many over it, in input order', () => {
    const cases: [Window[], DisplaySampleOptions][] = [
      [windows(2001, 2), {}],
      [windows(10_080, 3), {}],
      [windows(60_000, 4, { forcedShare: 0.02 }), {}],
      [windows(5000, 5, { dampingDecimals: 1 }), {}], // many equal damping values
      [windows(5000, 6).map((w) => ({ ...w, transferMw: 1500 })), {}], // one transfer level: one bin
      [windows(3000, 7), { maxPoints: 82, bins: 40 }], // the budget is just the kept extremes
      [windows(3000, 8), { maxPoints: 500, bins: 3 }],
    ];
    for (const [ws, o] of cases) {
      const max = o.maxPoints ?? STUDY_MAX_POINTS;
      const s = sampleDisplayPoints(ws, o);
      expect(s).toHaveLength(max);
      expect(new Set(s).size).toBe(max);
      for (let i = 1; i < s.length; i++) expect(s[i].id).toBeGreaterThan(s[i - 1].id);
    }
  });

  it('is deterministic: the same windows give the same sample', () => {
    const ws = windows(12_000, 9, { forcedShare: 0.01 });
    const a = sampleDisplayPoints(ws).map((w) => w.id);
    const b = sampleDisplayPoints(ws.map((w) => ({ ...w }))).map((w) => w.id);
    const c = sampleDisplayPoints(windows(12_000, 9, { forcedShare: 0.01 })).map((w) => w.id);
    expect(b).toEqual(a);
    expect(c).toEqual(a);
  });

  it("keeps every transfer bin's lowest- and highest-damping natural window, and the transfer extremes", () => {
    // forced windows with the lowest damping of all must not take the natural minimum's place
    const ws = windows(40_000, 10, { forcedShare: 0.03 });
    const kept = new Set(sampleDisplayPoints(ws).map((w) => w.id));
    const bins = binsOf(ws, STUDY_SAMPLE_BINS);
    let checked = 0;
    for (const bin of bins) {
      const lo = extreme(bin, 'lowest');
      const hi = extreme(bin, 'highest');
      if (!lo || !hi) continue;
      expect(kept.has(lo.id), `bin of ${bin.length}: lowest ${lo.dampingPercent} %`).toBe(true);
      expect(kept.has(hi.id)).toBe(true);
      checked++;
    }
    expect(checked).toBe(STUDY_SAMPLE_BINS);
    const byMw = [...ws].sort((a, b) => a.transferMw - b.transferMw);
    expect(kept.has(byMw[0].id)).toBe(true);
    expect(kept.has(byMw.at(-1)!.id)).toBe(true);
    // so the lowest-damped natural window of the whole period is always drawn
    const natural = ws.filter((w) => !w.forced);
    expect(kept.has(extreme(natural, 'lowest')!.id)).toBe(true);
  });

  it('keeps the earlier of two windows with the same lowest damping', () => {
    const ws = windows(5000, 11);
    const bins = binsOf(ws, STUDY_SAMPLE_BINS);
    const bin = bins[20];
    const lo = extreme(bin, 'lowest')!;
    const later = bin.find((w) => w.id > lo.id && w !== extreme(bin, 'highest'))!;
    const tied = ws.map((w) => (w.id === later.id ? { ...w, dampingPercent: lo.dampingPercent } : w));
    const kept = new Set(sampleDisplayPoints(tied).map((w) => w.id));
    expect(kept.has(lo.id)).toBe(true);
  });

  it('looks like the whole cloud: each bin drawn in proportion, with its spread of damping', () => {
    const ws = windows(30_000, 12);
    const s = sampleDisplayPoints(ws);
    const all = binsOf(ws, STUDY_SAMPLE_BINS);
    const ids = new Set(s.map((w) => w.id));
    const share = STUDY_MAX_POINTS / ws.length;
    for (const bin of all) {
      const drawn = bin.filter((w) => ids.has(w.id));
      // its proportional share of the budget, give or take the two kept extremes and rounding
      expect(Math.abs(drawn.length - bin.length * share)).toBeLessThanOrEqual(3);
      if (drawn.length < 20) continue;
      const d = bin.map((w) => w.dampingPercent).sort((a, b) => a - b);
      const dd = drawn.map((w) => w.dampingPercent).sort((a, b) => a - b);
      // the drawn quartiles sit at the bin's own quartiles to within a rank step of the sample
      for (const p of [0.25, 0.5, 0.75]) {
        const q = quantile(dd, p);
        const rank = d.indexOf(q) / d.length;
        expect(Math.abs(rank - p), `bin of ${bin.length}, quantile ${p}`).toBeLessThanOrEqual(2 / drawn.length + 0.01);
      }
    }
  });

  it('puts windows without a finite transfer in a bin of their own and still keeps the budget', () => {
    const ws = windows(4000, 13).map((w, i) => (i % 100 === 0 ? { ...w, transferMw: NaN } : w));
    const s = sampleDisplayPoints(ws);
    expect(s).toHaveLength(STUDY_MAX_POINTS);
    expect(s.some((w) => Number.isNaN(w.transferMw))).toBe(true);
  });
});

describe('buildTransferStudy with a display sample', () => {
  function studyPoints(n: number, seed: number): StudyPoint[] {
    return windows(n, seed, { forcedShare: 0.01 }).map((w, i) => ({
      analysisId: 1 + Math.floor(i / 1440),
      windowStart: 1_750_000_000 + 60 * i,
      windowSeconds: 1200,
      dampingPercent: w.dampingPercent,
      transferMw: w.transferMw,
      angleDeg: 10 + 0.02 * w.transferMw,
      forced: w.forced,
    }));
  }

  it('counts every window and computes every figure over all of them', () => {
    const points = studyPoints(10_080, 14);
    const s = buildTransferStudy(points, { poorBelow: 3, lowBelow: 5 });
    const forced = points.filter((p) => p.forced).length;
    expect(s.pointsTotal).toBe(10_080);
    expect(s.pointsShown).toBe(STUDY_MAX_POINTS);
    expect(s.points).toHaveLength(STUDY_MAX_POINTS);
    expect(s.pointsSampled).toBe(true);
    expect(s.pointsForced).toBe(forced);
    expect(s.pointsUsed).toBe(10_080 - forced);
    expect(s.damping.fit!.n).toBe(10_080 - forced);
    // the same figures as with a sample large enough to hold every window
    const whole = buildTransferStudy(points, { poorBelow: 3, lowBelow: 5 }, { sample: { maxPoints: 20_000 } });
    expect(whole.pointsSampled).toBe(false);
    expect(whole.points).toHaveLength(10_080);
    const { points: _a, pointsShown: _b, pointsSampled: _c, ...figures } = s;
    const { points: _d, pointsShown: _e, pointsSampled: _f, ...wholeFigures } = whole;
    expect(figures).toEqual(wholeFigures);
    // and the known line (damping 9 − 0.002·MW) comes out of them: 5 % at 2000 MW, 3 % at 3000 MW
    expect(s.damping.fit!.slope).toBeCloseTo(-0.002, 4);
    expect(Math.abs(s.damping.projections[0].x! - 2000)).toBeLessThan(25);
  });

  it('sends every window when the period has at most maxPoints', () => {
    const points = studyPoints(1500, 15);
    const s = buildTransferStudy(points, { poorBelow: 3, lowBelow: 5 });
    expect(s.pointsTotal).toBe(1500);
    expect(s.pointsShown).toBe(1500);
    expect(s.pointsSampled).toBe(false);
    s.points.forEach((p, i) => expect(p).toBe(points[i]));
  });
});
