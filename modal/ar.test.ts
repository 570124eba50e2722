import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import {
  arLeastSquares,
  arModes,
  arRoots,
  arSpectrum,
  autocovariance,
  levinsonDurbin,
  modifiedYuleWalker,
  poleToMode,
  pooledAutocorrelation,
  refineArRoot,
  selectArOrder,
  yuleWalker,
} from './ar';
import { ModalInputError } from './errors';
import { runReference } from '../tests/reference/run-reference';
import type { Complex } from './linalg';
import { createRng } from './random';

// Reference values: Debian's numpy/scipy (library), one call of tests/reference/ambient_ref.py.
// eslint-disable-next-line @typescript-eslint/no-explicit-any
function reference(cases: Record<string, unknown>[]): any[] {
  const script = path.resolve(__dirname, '../tests/reference/ambient_ref.py');
  const res = spawnSync('/usr/bin/python3', [script], { input: JSON.stringify({ cases }), encoding: 'utf8', maxBuffer: 1 << 28 });
  if (res.status !== 0) throw new Error(`ambient_ref.py failed: ${res.stderr}`);
  return JSON.parse(res.stdout).results;
}

const FS = 5;
/** AR(2) coefficients of a damped cosine (CHECKS.md §1): a1 = −2e^{−σT}cos ωT, a2 = e^{−2σT}. */
function ar2(f: number, zetaPct: number, fs = FS): [number, number, number] {
  const z = zetaPct / 100;
  const wd = 2 * Math.PI * f;
  const sigma = (z * wd) / Math.sqrt(1 - z * z);
  const T = 1 / fs;
  return [1, -2 * Math.exp(-sigma * T) * Math.cos(wd * T), Math.exp(-2 * sigma * T)];
}

/** AR process x[n] = −Σ a_k x[n−k] + e[n] (white N(0,1) e), after a burn-in. */
function arProcess(a: number[], n: number, seed: number): Float64Array {
  const rng = createRng(seed);
  const p = a.length - 1;
  const burn = 2000;
  const x = new Float64Array(n + burn);
  for (let t = 0; t < n + burn; t++) {
    let v = rng.normal();
    for (let k = 1; k <= p; k++) if (t - k >= 0) v -= a[k] * x[t - k];
    x[t] = v;
  }
  return x.slice(burn);
}

/** Product of AR(2) polynomials: an AR(4) with two known modes. */
function polyMul(p: number[], q: number[]): number[] {
  const out = new Array(p.length + q.length - 1).fill(0);
  p.forEach((a, i) => q.forEach((b, j) => (out[i + j] += a * b)));
  return out;
}

const twoModes = polyMul(ar2(0.3, 3), ar2(0.62, 8));
const x4 = arProcess(twoModes, 6000, 11);
const chanA = arProcess(ar2(0.3, 5), 3000, 12);
const chanB = Float64Array.from(arProcess(ar2(0.3, 5), 3000, 13), (v, i) => 0.3 * v + 0.5 * chanA[i]);
const rng = createRng(77);
const randomPolys = Array.from({ length: 30 }, (_, i) => [1, ...Array.from({ length: 2 + 2 * i }, () => rng.normal() * (i % 2 ? 0.3 : 1))]);

// eslint-disable-next-line @typescript-eslint/no-explicit-any
let ref: any[];
beforeAll(() => {
  ref = reference([
    { kind: 'autocov', x: Array.from(x4.subarray(0, 500)), maxlag: 20 },
    { kind: 'yw', channels: [Array.from(x4)], order: 4 },
    { kind: 'yw', channels: [Array.from(x4)], order: 30 },
    { kind: 'yw', channels: [Array.from(chanA), Array.from(chanB)], order: 12 },
    { kind: 'ls', channels: [Array.from(x4.subarray(0, 2000))], order: 6 },
    { kind: 'ls', channels: [Array.from(chanA), Array.from(chanB)], order: 8 },
    ...randomPolys.map((c) => ({ kind: 'roots', coeffs: c })),
  ]);
});

function closeCoeffs(a: ArrayLike<number>, b: number[], tol: number): void {
  expect(a.length).toBe(b.length);
  for (let i = 0; i < b.length; i++) expect(Math.abs(a[i] - b[i])).toBeLessThan(tol);
}

function sameRootSet(got: Complex[], want: { re: number[]; im: number[] }, tol: number): void {
  expect(got.length).toBe(want.re.length);
  const used = new Set<number>();
  for (const z of got) {
    let best = -1;
    let bd = Infinity;
    want.re.forEach((re, j) => {
      if (used.has(j)) return;
      const d = Math.hypot(z.re - re, z.im - want.im[j]);
      if (d < bd) {
        bd = d;
        best = j;
      }
    });
    used.add(best);
    expect(bd).toBeLessThan(tol * Math.max(1, Math.hypot(z.re, z.im)));
  }
}

describe('poles and modes (mathematics, CHECKS.md §1)', () => {
  it('maps the AR(2) of a damped cosine back to its frequency and damping exactly', () => {
    for (const [f, z] of [
      [0.3, 3],
      [0.62, 8],
      [1.3, 10],
      [0.15, 0.5],
    ]) {
      const modes = arModes(ar2(f, z), FS);
      expect(modes).toHaveLength(1);
      expect(modes[0].frequencyHz).toBeCloseTo(f, 12);
      expect(modes[0].dampingPercent).toBeCloseTo(z, 10);
    }
  });

  it('s = fs·ln z: a pole inside the unit circle decays, on it is undamped', () => {
    const m = poleToMode({ re: Math.cos(0.4), im: Math.sin(0.4) }, 10);
    expect(m.sigma).toBeCloseTo(0, 14);
    expect(m.dampingRatio).toBeCloseTo(0, 14);
    expect(m.omega).toBeCloseTo(4, 12);
    const d = poleToMode({ re: 0.9 * Math.cos(0.4), im: 0.9 * Math.sin(0.4) }, 10);
    expect(d.sigma).toBeCloseTo(10 * Math.log(0.9), 12);
    expect(d.dampingRatio).toBeCloseTo(-d.sigma / Math.hypot(d.sigma, d.omega), 14);
  });

  it('least squares recovers a noise-free two-mode recursion exactly (mathematics: order 2K)', () => {
    const a = twoModes;
    const x = new Float64Array(400);
    x[0] = 1;
    x[1] = 0.3;
    x[2] = -0.2;
    x[3] = 0.5;
    for (let t = 4; t < x.length; t++) x[t] = -(a[1] * x[t - 1] + a[2] * x[t - 2] + a[3] * x[t - 3] + a[4] * x[t - 4]);
    const fit = arLeastSquares(x, 4, false);
    closeCoeffs(fit.a, a, 1e-9);
    const modes = arModes(fit.a, FS);
    expect(modes.map((m) => m.frequencyHz)).toEqual([expect.closeTo(0.3, 8), expect.closeTo(0.62, 8)]);
    expect(modes.map((m) => m.dampingPercent)).toEqual([expect.closeTo(3, 6), expect.closeTo(8, 6)]);
  });
});

describe('Yule-Walker and least squares against numpy/scipy', () => {
  it('autocovariance equals numpy.correlate(x−m, x−m)/N (library: numpy.correlate)', () => {
    closeCoeffs(autocovariance(x4.subarray(0, 500), 20), ref[0].r, 1e-12);
  });

  it('Levinson–Durbin equals scipy.linalg.solve_toeplitz on the same autocovariance (library: scipy.linalg.solve_toeplitz)', () => {
    closeCoeffs(yuleWalker(x4, 4).a, ref[1].a, 1e-10);
    closeCoeffs(yuleWalker(x4, 30).a, ref[2].a, 1e-8);
    expect(yuleWalker(x4, 4).noiseVariance).toBeCloseTo(ref[1].sigma2, 10);
    const lev = levinsonDurbin(ref[2].r, 30);
    closeCoeffs(lev.a, ref[2].a, 1e-8);
    expect(lev.reflection.every((k) => Math.abs(k) < 1)).toBe(true);
  });

  it('pools normalised autocorrelations of several channels as the reference does (library: numpy + solve_toeplitz)', () => {
    closeCoeffs(pooledAutocorrelation([chanA, chanB], 12), ref[3].r, 1e-12);
    closeCoeffs(yuleWalker([chanA, chanB], 12).a, ref[3].a, 1e-9);
  });

  it('covariance-method least squares equals numpy.linalg.lstsq on the stacked system (library: numpy.linalg.lstsq)', () => {
    const one = arLeastSquares(x4.subarray(0, 2000), 6);
    closeCoeffs(one.a, ref[4].a, 1e-9);
    expect(one.noiseVariance).toBeCloseTo(ref[4].sigma2, 9);
    closeCoeffs(arLeastSquares([chanA, chanB], 8).a, ref[5].a, 1e-9);
  });

  it('estimates the two modes of a simulated AR(4) process near their true values (from memory: N = 6000 gives ~±1 point)', () => {
    const ls = arModes(arLeastSquares(x4, 4).a, FS);
    expect(ls.map((m) => m.frequencyHz)).toEqual([expect.closeTo(0.3, 2), expect.closeTo(0.62, 2)]);
    expect(Math.abs(ls[0].dampingPercent - 3)).toBeLessThan(0.7);
    expect(Math.abs(ls[1].dampingPercent - 8)).toBeLessThan(1.5);
    // Yule-Walker at the true order is biased for such peaky spectra (textbook: Kay, Modern
    // Spectral Estimation, 1988, §7.8); at the high order the ambient estimator uses it is not
    const yw = arModes(yuleWalker(x4, 30).a, FS).filter((m) => m.dampingPercent < 20);
    const near = (f: number) => yw.reduce((b, m) => (Math.abs(m.frequencyHz - f) < Math.abs(b.frequencyHz - f) ? m : b));
    expect(near(0.3).frequencyHz).toBeCloseTo(0.3, 2);
    expect(Math.abs(near(0.3).dampingPercent - 3)).toBeLessThan(1);
    expect(Math.abs(near(0.62).dampingPercent - 8)).toBeLessThan(2);
    expect(arModes(yuleWalker(x4, 4).a, FS)[0].dampingPercent).toBeGreaterThan(3.5);
  });
});

describe('arRoots', () => {
  it('equals numpy.roots for random polynomials of degree 2 to 60 (library: numpy.roots)', () => {
    randomPolys.forEach((c, i) => sameRootSet(arRoots(c), ref[6 + i], 1e-8));
  });

  it('handles leading and trailing zeros as numpy.roots does', () => {
    expect(arRoots([0, 1, -3, 2, 0])).toEqual(
      expect.arrayContaining([expect.objectContaining({ re: expect.closeTo(1, 12) }), expect.objectContaining({ re: expect.closeTo(2, 12) }), { re: 0, im: 0 }]),
    );
    expect(arRoots([0, 0])).toEqual([]);
  });

  it('refuses non-finite coefficients', () => {
    expect(() => arRoots([1, NaN, 0.5])).toThrow(new ModalInputError('arRoots: coefficient 1 is NaN; every coefficient must be a finite number'));
  });
});

describe('order selection, refinement, spectrum', () => {
  it('BIC picks the true order of a well-damped AR(4) process; AIC does not pick fewer (textbook: Schwarz 1978 consistency; from memory)', () => {
    const x = arProcess(polyMul(ar2(0.3, 12), ar2(0.9, 15)), 8000, 21);
    const r = autocovariance(x, 40);
    expect(selectArOrder(r, 40, x.length, 'bic').order).toBe(4);
    const aic = selectArOrder(r, 40, x.length, 'aic').order;
    expect(aic).toBeGreaterThanOrEqual(4);
    expect(aic).toBeLessThanOrEqual(10);
    expect(selectArOrder(r, 40, x.length, 'fpe').order).toBeGreaterThanOrEqual(4);
  });

  it("Newton refinement lands on the perturbed polynomial's root (library: numpy.roots)", () => {
    const base = ref[2].a as number[];
    const z0 = arRoots(base).filter((z) => z.im > 0).sort((p, q) => Math.hypot(q.re, q.im) - Math.hypot(p.re, p.im))[0];
    const pert = base.map((v, i) => (i === 0 ? v : v * (1 + 1e-3 * Math.sin(i))));
    const z1 = refineArRoot(pert, z0)!;
    const all = arRoots(pert);
    const nearest = all.reduce((b, z) => (Math.hypot(z.re - z1.re, z.im - z1.im) < Math.hypot(b.re - z1.re, b.im - z1.im) ? z : b));
    expect(Math.hypot(nearest.re - z1.re, nearest.im - z1.im)).toBeLessThan(1e-10);
  });

  it('the AR spectrum peaks at the modal frequency (mathematics: |A(e^{iω})| is smallest at the pole angle)', () => {
    const a = ar2(0.4, 1);
    const f = Float64Array.from({ length: 2001 }, (_, i) => (i * 2.5) / 2000);
    const s = arSpectrum({ order: 2, a: Float64Array.from(a), noiseVariance: 1 }, FS, f);
    const k = s.indexOf(Math.max(...s));
    expect(f[k]).toBeCloseTo(0.4, 2);
  });
});

describe('bad input', () => {
  it('refuses with precise messages', () => {
    expect(() => levinsonDurbin([0, 0.1], 1)).toThrow(new ModalInputError('levinsonDurbin: r[0] must be a positive finite variance, got 0'));
    expect(() => levinsonDurbin([1, 0.5], 2)).toThrow(
      new ModalInputError('levinsonDurbin: order 2 needs autocovariances up to lag 2, got 1'),
    );
    expect(() => levinsonDurbin([1, 1.5], 1)).toThrow(
      new ModalInputError('levinsonDurbin: the autocovariance is not positive definite at order 1 (reflection coefficient -1.5)'),
    );
    expect(() => yuleWalker(new Float64Array(10).fill(3), 2)).toThrow(new ModalInputError('yuleWalker: the series is constant (zero variance)'));
    expect(() => yuleWalker(x4, 0)).toThrow(new ModalInputError('yuleWalker: order must be a positive integer, got 0'));
    expect(() => autocovariance([1, 2, 3], 3)).toThrow(
      new ModalInputError('autocovariance: maxLag must be an integer from 0 to 2 (series length − 1), got 3'),
    );
    expect(() => autocovariance([1, NaN], 0)).toThrow(new ModalInputError('autocovariance: the series has a non-finite sample at index 1 (NaN)'));
    expect(() => arLeastSquares([chanA, chanB.subarray(0, 100)], 2)).toThrow(
      new ModalInputError('arLeastSquares: channels differ in length (3000 and 100 samples)'),
    );
  });
});

describe('modifiedYuleWalker', () => {
  it("recovers a damped cosine's AR(2) exactly from the lags above the noise, whatever lag 0 holds (mathematics, CHECKS.md §1)", () => {
    // r[k] = A·ρ^k·cos(ωk + φ) for k ≥ 1 obeys r[k] = −a1·r[k−1] − a2·r[k−2]; white measurement
    // noise adds to r[0] only, which equations from lag 3 never touch
    const [, a1, a2] = ar2(0.56, 7.5);
    const rho = Math.sqrt(a2);
    const w = Math.acos(-a1 / (2 * rho));
    const r = Array.from({ length: 14 }, (_, k) => 2.3 * rho ** k * Math.cos(w * k + 0.4));
    r[0] += 5; // noise variance
    const a = modifiedYuleWalker(r, 2, 3, 10);
    expect(a[0]).toBe(1);
    expect(a[1]).toBeCloseTo(a1, 12);
    expect(a[2]).toBeCloseTo(a2, 12);
    const m = poleToMode(arRoots(a).find((z) => z.im > 0)!, FS);
    expect(m.frequencyHz).toBeCloseTo(0.56, 10);
    expect(m.dampingPercent).toBeCloseTo(7.5, 8);
  });

  it('solves the extended equations as numpy.linalg.lstsq does on the same system (library)', () => {
    const r = Array.from(autocovariance(x4, 20));
    const cases = [
      { p: 3, first: 3, eq: 9 },
      { p: 5, first: 2, eq: 12 },
    ];
    const ref = runReference(
      cases.map(({ p, first, eq }) => ({
        kind: 'lstsq',
        a: Array.from({ length: eq }, (_, e) => Array.from({ length: p }, (__, j) => r[Math.abs(first + e - j - 1)])),
        b: Array.from({ length: eq }, (_, e) => [-r[first + e]]),
      })),
    );
    cases.forEach(({ p, first, eq }, i) => {
      const ours = modifiedYuleWalker(r, p, first, eq);
      const theirs = (ref.results[i] as { x: number[][] }).x.map((row) => row[0]);
      theirs.forEach((v, j) => expect(Math.abs(ours[j + 1] - v)).toBeLessThan(1e-10 * (1 + Math.abs(v))));
    });
  });

  it('refuses bad arguments with precise messages', () => {
    expect(() => modifiedYuleWalker([1, 0.5, 0.2], 0, 1, 2)).toThrow(new ModalInputError('modifiedYuleWalker: order must be a positive integer, got 0'));
    expect(() => modifiedYuleWalker([1, 0.5, 0.2], 1, 0, 2)).toThrow(new ModalInputError('modifiedYuleWalker: firstLag must be a positive integer, got 0'));
    expect(() => modifiedYuleWalker([1, 0.5, 0.2], 2, 1, 1)).toThrow(new ModalInputError('modifiedYuleWalker: equations must be an integer ≥ order 2, got 1'));
    expect(() => modifiedYuleWalker([1, 0.5, 0.2], 1, 2, 2)).toThrow(
      new ModalInputError('modifiedYuleWalker: the equations need autocovariances up to lag 3, got 2'),
    );
    expect(() => modifiedYuleWalker([1, NaN, 0.2, 0.1], 1, 2, 2)).toThrow(new ModalInputError('modifiedYuleWalker: r[1] is NaN; every lag must be finite'));
  });
});
