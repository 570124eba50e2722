// Regression, t quantiles and inverse prediction for the transfer study.
// Known-parameter data first, then checks against scipy/numpy from Debian (library) in ONE python
// call, then the statistical property the Fieller interval must have (coverage, textbook: Draper &
// Smith, "Applied Regression Analysis", §3.2) by Monte Carlo.
import { spawnSync } from 'node:child_process';
import { beforeAll, describe, expect, it } from 'vitest';
import { createRng } from '@/modal/random';
import { confidenceBand, fitLine, inversePrediction, meanSe, StudyInputError, type XY } from './regression';
import { incompleteBeta, studentTCdf, studentTQuantile } from '../../modal/student-t';

function line(n: number, a: number, b: number, noise: number, seed: number, x0 = 500, x1 = 1800): XY[] {
  const rng = createRng(seed);
  return Array.from({ length: n }, (_, i) => {
    const x = x0 + ((x1 - x0) * i) / (n - 1) + 5 * rng.normal();
    return { x, y: a + b * x + noise * rng.normal() };
  });
}

describe('fitLine on exact data', () => {
  it('recovers a noise-free line exactly', () => {
    const pts = line(20, 9, -0.004, 0, 1);
    const f = fitLine(pts);
    expect(f.intercept).toBeCloseTo(9, 10);
    expect(f.slope).toBeCloseTo(-0.004, 13);
    expect(f.residualSd).toBeLessThan(1e-10);
    expect(f.r2).toBeCloseTo(1, 12);
    const p = inversePrediction(f, 3);
    expect(p.x).toBeCloseTo(1500, 8);
    expect(p.hi! - p.lo!).toBeLessThan(1e-6);
  });

  it('refuses too few points, non-finite values, a single x and a bad nEffective, naming each', () => {
    const msg = (f: () => unknown) => {
      try {
        f();
        return 'ok';
      } catch (e) {
        expect(e).toBeInstanceOf(StudyInputError);
        return (e as Error).message;
      }
    };
    expect(msg(() => fitLine([{ x: 1, y: 1 }, { x: 2, y: 2 }]))).toBe('A regression line needs at least 3 points (got 2)');
    expect(msg(() => fitLine([{ x: 1, y: 1 }, { x: 2, y: NaN }, { x: 3, y: 3 }]))).toBe('Every point must be finite (got x=2, y=NaN)');
    expect(msg(() => fitLine([{ x: 700, y: 1 }, { x: 700, y: 2 }, { x: 700, y: 3 }]))).toBe(
      'All points have the same x (700); a line needs a spread of transfer levels',
    );
    expect(msg(() => fitLine(line(10, 1, 1, 1, 2), { nEffective: 2 }))).toBe('nEffective must be above 2 and at most the number of points 10 (got 2)');
    expect(msg(() => fitLine(line(10, 1, 1, 1, 2), { confidenceLevel: 1 }))).toBe('confidenceLevel must be between 0 and 1 (got 1)');
  });
});

// --- reference values from scipy / numpy (library) ---
const T_CASES: [number, number][] = [
  [0.975, 1],
  [0.975, 2],
  [0.975, 5],
  [0.975, 10.5],
  [0.975, 30],
  [0.975, 1000],
  [0.95, 3],
  [0.995, 7],
  [0.6, 4],
  [0.999, 2.5],
  [0.975, 38],
];
const CDF_CASES: [number, number][] = [
  [-3, 2],
  [0.5, 1],
  [1.96, 1e4],
  [2.5, 6.5],
  [10, 3],
];
const DATA = line(40, 8.7, -0.0041, 0.6, 7);
const BAND_X = [400, 900, 1500, 2100];
let ref: {
  ppf: number[];
  cdf: number[];
  betainc: number[];
  lr: { slope: number; intercept: number; stderr: number; intercept_stderr: number; r2: number };
  bandSe: number[];
};

beforeAll(() => {
  const script = `
import json, sys
import numpy as np
from scipy import stats, special
d = json.load(sys.stdin)
out = {}
out['ppf'] = [float(stats.t.ppf(p, v)) for p, v in d['t']]
out['cdf'] = [float(stats.t.cdf(t, v)) for t, v in d['cdf']]
out['betainc'] = [float(special.betainc(a, b, x)) for x, a, b in d['beta']]
x = np.array([p['x'] for p in d['data']]); y = np.array([p['y'] for p in d['data']])
r = stats.linregress(x, y)
out['lr'] = dict(slope=float(r.slope), intercept=float(r.intercept), stderr=float(r.stderr), intercept_stderr=float(r.intercept_stderr), r2=float(r.rvalue**2))
# standard error of the mean response from the coefficient covariance s^2 (X'X)^-1 (matrix form)
X = np.column_stack([np.ones_like(x), x])
beta, res, rank, sv = np.linalg.lstsq(X, y, rcond=None)
s2 = float(np.sum((y - X @ beta)**2) / (len(x) - 2))
C = s2 * np.linalg.inv(X.T @ X)
out['bandSe'] = [float(np.sqrt(np.array([1, xx]) @ C @ np.array([1, xx]))) for xx in d['bandX']]
print(json.dumps(out))
`;
  const input = JSON.stringify({
    t: T_CASES,
    cdf: CDF_CASES,
    beta: [
      [0.3, 2, 3],
      [0.9, 0.5, 7],
      [0.01, 10, 0.5],
    ],
    data: DATA,
    bandX: BAND_X,
  });
  const r = spawnSync('/usr/bin/python3', ['-c', script], { input, encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`python reference failed: ${r.stderr}`);
  ref = JSON.parse(r.stdout);
});

describe('Student t against scipy.stats (library)', () => {
  it('quantiles agree to 1e-8 relative', () => {
    // scipy's ppf itself is good to a few 1e-10 here (its cdf of its own ppf(0.975, 5) is 0.97500000003).
    T_CASES.forEach(([p, v], i) => {
      expect(Math.abs(studentTQuantile(p, v) - ref.ppf[i]) / Math.abs(ref.ppf[i])).toBeLessThan(1e-8);
    });
    expect(studentTQuantile(0.025, 5)).toBe(-studentTQuantile(0.975, 5)); // symmetry
  });
  it('CDF and the incomplete beta agree to 1e-12', () => {
    CDF_CASES.forEach(([t, v], i) => expect(studentTCdf(t, v)).toBeCloseTo(ref.cdf[i], 12));
    expect(incompleteBeta(0.3, 2, 3)).toBeCloseTo(ref.betainc[0], 12);
    expect(incompleteBeta(0.9, 0.5, 7)).toBeCloseTo(ref.betainc[1], 12);
    expect(incompleteBeta(0.01, 10, 0.5)).toBeCloseTo(ref.betainc[2], 14);
  });
});

describe('fitLine against scipy.stats.linregress and numpy lstsq (library)', () => {
  it('coefficients, standard errors and r² agree', () => {
    const f = fitLine(DATA);
    expect(f.slope).toBeCloseTo(ref.lr.slope, 12);
    expect(f.intercept).toBeCloseTo(ref.lr.intercept, 9);
    expect(f.slopeSe / ref.lr.stderr).toBeCloseTo(1, 10);
    expect(f.interceptSe / ref.lr.intercept_stderr).toBeCloseTo(1, 10);
    expect(f.r2).toBeCloseTo(ref.lr.r2, 12);
  });
  it('the band half-width is t · SE of the mean response from the coefficient covariance', () => {
    const f = fitLine(DATA);
    const band = confidenceBand(f, BAND_X);
    BAND_X.forEach((x, i) => {
      expect(meanSe(f, x) / ref.bandSe[i]).toBeCloseTo(1, 10);
      expect((band[i].hi - band[i].lo) / 2 / (f.tCrit * ref.bandSe[i])).toBeCloseTo(1, 10);
    });
    expect(f.tCrit / ref.ppf[T_CASES.findIndex(([p, v]) => p === 0.975 && v === 38)]).toBeCloseTo(1, 8);
  });
  it('nEffective inflates the variances by n/nEffective and lowers the degrees of freedom', () => {
    const full = fitLine(DATA);
    const eff = fitLine(DATA, { nEffective: 10 });
    expect(eff.slope).toBe(full.slope);
    expect(eff.slopeSe / full.slopeSe).toBeCloseTo(Math.sqrt(40 / 10), 12);
    expect(eff.dof).toBe(8);
    expect(eff.tCrit).toBeCloseTo(studentTQuantile(0.975, 8), 12);
  });
});

describe('inversePrediction (Fieller interval)', () => {
  it('the interval ends are where the confidence band crosses the target', () => {
    const f = fitLine(DATA);
    const p = inversePrediction(f, 3);
    expect(p.x).toBeCloseTo((3 - f.intercept) / f.slope, 10);
    const [lo, hi] = confidenceBand(f, [p.lo!, p.hi!]);
    // a falling line: at the low-MW end the band's lower edge reaches 3 %, at the high end its upper edge
    expect(lo.lo).toBeCloseTo(3, 9);
    expect(hi.hi).toBeCloseTo(3, 9);
    expect(p.lo!).toBeLessThan(p.x!);
    expect(p.hi!).toBeGreaterThan(p.x!);
    expect(p.extrapolated).toBe(false);
    expect(inversePrediction(f, 0).extrapolated).toBe(true);
  });

  it('is unbounded, with a note, when the slope is not significant', () => {
    // pure noise around a flat line: the slope fails the test
    const g = fitLine([{ x: 0, y: 1 }, { x: 1, y: -1 }, { x: 2, y: 1.2 }, { x: 3, y: -0.9 }]);
    const q = inversePrediction(g, 50);
    expect(q.lo).toBeNull();
    expect(q.hi).toBeNull();
    expect(q.note).toBe('The slope is not significantly different from zero at the 95 % level, so the interval is unbounded');
  });

  it('covers the true crossing in about 95 % of noisy data sets (textbook property, Monte Carlo)', () => {
    // y = 9 − 0.004·x reaches 3 % at x = 1500 MW (known parameters).
    const trials = 2000;
    let covered = 0;
    let unbounded = 0;
    for (let k = 0; k < trials; k++) {
      const f = fitLine(line(25, 9, -0.004, 0.8, 1000 + k));
      const p = inversePrediction(f, 3);
      if (p.lo === null) {
        unbounded++;
        covered++;
        continue;
      }
      if (p.lo <= 1500 && 1500 <= p.hi!) covered++;
    }
    const rate = covered / trials;
    // binomial standard deviation √(0.95·0.05/2000) ≈ 0.005: ±3σ
    expect(rate).toBeGreaterThan(0.935);
    expect(rate).toBeLessThan(0.965);
    expect(unbounded).toBe(0);
  });
});
