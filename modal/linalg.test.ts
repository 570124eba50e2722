import { Matrix } from 'ml-matrix';
import { beforeAll, describe, expect, it } from 'vitest';
import { maxPairedDistance, runReference } from '../tests/reference/run-reference';
import { ModalInputError } from './errors';
import { balanceInPlace, complexEigenvalues, leadingGeneralizedEigenvector, lstsq, lstsqDetailed, polyRoots, svd } from './linalg';
import { createRng } from './random';

// Every reference value below comes from Debian's numpy (library), computed in one call of
// tests/reference/modal_ref.py on exactly the same inputs.

const rng = createRng(20240611);
const randMatrix = (r: number, c: number, scale = 1): number[][] =>
  Array.from({ length: r }, () => Array.from({ length: c }, () => scale * rng.normal()));

// Badly scaled: D·A·D⁻¹ with D spanning 12 decades (same eigenvalues as A, a trap without balancing).
const base = randMatrix(6, 6);
const badlyScaled = base.map((row, i) => row.map((v, j) => v * 10 ** (2 * i - 2 * j)));
// Polynomial with roots spread over 6 decades and a Prony-like cluster near the unit circle.
const spreadRoots = [1e-3, -2e-2, 0.5, 3, -40, 1000];
const polyFromRoots = (roots: { re: number; im: number }[]): number[] => {
  let c: { re: number; im: number }[] = [{ re: 1, im: 0 }];
  for (const r of roots) {
    const next = Array.from({ length: c.length + 1 }, () => ({ re: 0, im: 0 }));
    c.forEach((v, i) => {
      next[i].re += v.re;
      next[i].im += v.im;
      next[i + 1].re -= v.re * r.re - v.im * r.im;
      next[i + 1].im -= v.re * r.im + v.im * r.re;
    });
    c = next;
  }
  return c.map((v) => v.re);
};
const unitCircleRoots = [0.3, 0.62, 1.3].flatMap((f, k) => {
  const rho = Math.exp(-0.02 * (k + 1));
  const th = (2 * Math.PI * f) / 10;
  return [
    { re: rho * Math.cos(th), im: rho * Math.sin(th) },
    { re: rho * Math.cos(th), im: -rho * Math.sin(th) },
  ];
});

const eigCases: number[][][] = [
  randMatrix(8, 8),
  badlyScaled,
  randMatrix(5, 5).map((row, i, all) => row.map((v, j) => v + all[j][i])), // symmetric
  [
    [0, -2],
    [2, 0],
  ], // pure rotation: ±2j
  randMatrix(30, 30, 1e-3),
];
const rootCases: number[][] = [
  polyFromRoots(spreadRoots.map((re) => ({ re, im: 0 }))),
  polyFromRoots(unitCircleRoots),
  [0, 0, 2, -3, 1], // leading zeros dropped: roots 1, 0.5
  [1, -3, 2, 0, 0], // trailing zeros give roots at 0
  [1, 0, 0, 0, 0, 0, 0, 0, 0, 0, -1], // tenth roots of unity
  polyFromRoots(Array.from({ length: 12 }, (_, i) => ({ re: i + 1, im: 0 }))), // Wilkinson-like
];
const svdCases: number[][][] = [randMatrix(40, 7), randMatrix(5, 12), (() => {
  // rank 3, 9×6
  const a = new Matrix(randMatrix(9, 3)).mmul(new Matrix(randMatrix(3, 6)));
  return a.to2DArray();
})()];
const lstsqCases: { a: number[][]; b: number[][] }[] = [
  { a: randMatrix(50, 6), b: randMatrix(50, 2) },
  { a: svdCases[2], b: randMatrix(9, 1) }, // rank-deficient: minimum-norm solution
  { a: randMatrix(4, 9), b: randMatrix(4, 1) }, // under-determined
];

let ref: { results: Record<string, unknown>[] };

beforeAll(() => {
  ref = runReference([
    ...eigCases.map((a) => ({ kind: 'eigvals', a })),
    ...rootCases.map((p) => ({ kind: 'roots', p })),
    ...svdCases.map((a) => ({ kind: 'svd', a })),
    ...lstsqCases.map((c) => ({ kind: 'lstsq', a: c.a, b: c.b })),
  ]);
});

const result = (i: number) => ref.results[i] as Record<string, unknown>;
const maxAbs = (zs: { re: number; im: number }[]) => Math.max(...zs.map((z) => Math.hypot(z.re, z.im)));

describe('complexEigenvalues', () => {
  eigCases.forEach((a, i) => {
    it(`matches numpy.linalg.eigvals on case ${i} (library: numpy.linalg.eigvals)`, () => {
      const ours = complexEigenvalues(new Matrix(a));
      const theirs = result(i).values as [number, number][];
      expect(ours).toHaveLength(a.length);
      expect(maxPairedDistance(ours, theirs)).toBeLessThan(1e-11 * Math.max(1, maxAbs(ours)));
    });
  });

  it('returns exact conjugate pairs for a real matrix (library: LAPACK dgeev behaviour)', () => {
    const ours = complexEigenvalues(new Matrix(eigCases[0]));
    for (const z of ours.filter((v) => v.im !== 0)) {
      expect(ours.some((w) => w.re === z.re && w.im === -z.im)).toBe(true);
    }
  });

  it('balancing keeps the eigenvalues and evens out row and column norms (textbook: Parlett & Reinsch 1969)', () => {
    const n = 6;
    const a = Float64Array.from(badlyScaled.flat());
    const before = complexEigenvalues(new Matrix(badlyScaled));
    const scale = balanceInPlace(a, n);
    for (const d of scale) expect(Number.isInteger(Math.log2(d))).toBe(true); // powers of two only: exact
    const rows = Array.from({ length: n }, (_, i) => Array.from(a.subarray(i * n, i * n + n)));
    const after = complexEigenvalues(new Matrix(rows));
    expect(maxPairedDistance(after, before.map((z) => [z.re, z.im]))).toBeLessThan(1e-12 * maxAbs(before));
    let worstRatio = 0;
    for (let i = 0; i < n; i++) {
      let r = 0;
      let c = 0;
      for (let k = 0; k < n; k++) {
        r += a[i * n + k] ** 2;
        c += a[k * n + i] ** 2;
      }
      worstRatio = Math.max(worstRatio, Math.sqrt(Math.max(r, c) / Math.min(r, c)));
    }
    // The input's row/column norms differ by up to ~1e10; balanced ones within a small factor.
    expect(worstRatio).toBeLessThan(8);
  });

  it('stays exact for entries near 1e±300 (scaled by a power of two first; known answer 1 ± √6)', () => {
    for (const scale of [1e-300, 1e-200, 1, 1e200, 1e300, 1e307]) {
      const ev = complexEigenvalues(
        new Matrix([
          [scale, 2 * scale],
          [3 * scale, scale],
        ]),
      )
        .map((z) => z.re / scale)
        .sort((x, y) => x - y);
      expect(ev[0]).toBeCloseTo(1 - Math.sqrt(6), 12);
      expect(ev[1]).toBeCloseTo(1 + Math.sqrt(6), 12);
    }
  });

  it('cyclic permutation matrices converge: eigenvalues are the roots of unity (textbook)', () => {
    for (const n of [3, 4, 7]) {
      const p = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === (j + 1) % n ? 1 : 0)));
      const ev = complexEigenvalues(new Matrix(p));
      const roots = Array.from({ length: n }, (_, k) => [Math.cos((2 * Math.PI * k) / n), Math.sin((2 * Math.PI * k) / n)] as [number, number]);
      expect(maxPairedDistance(ev, roots)).toBeLessThan(1e-12);
    }
  });

  it('refuses NaN and Inf instead of looping forever', () => {
    const a = new Matrix([
      [1, 2],
      [3, NaN],
    ]);
    expect(() => complexEigenvalues(a)).toThrow(ModalInputError);
    expect(() => complexEigenvalues(a)).toThrow('complexEigenvalues: entry (1, 1) is NaN; every entry must be a finite number');
    expect(() =>
      complexEigenvalues(
        new Matrix([
          [Infinity, 0],
          [0, 1],
        ]),
      ),
    ).toThrow('complexEigenvalues: entry (0, 0) is Infinity; every entry must be a finite number');
    expect(() => complexEigenvalues(new Matrix(2, 3))).toThrow('complexEigenvalues: the matrix must be square, got 2×3');
  });
});

describe('polyRoots', () => {
  const off = eigCases.length;
  rootCases.forEach((p, i) => {
    it(`matches numpy.roots on case ${i} (library: numpy.roots)`, () => {
      const ours = polyRoots(p);
      const theirs = result(off + i).values as [number, number][];
      expect(ours).toHaveLength(theirs.length);
      // root-by-root relative agreement (roots spread over decades)
      const left = theirs.map(([re, im]) => ({ re, im }));
      for (const z of ours) {
        let best = 0;
        left.forEach((w, k) => {
          if (Math.hypot(z.re - w.re, z.im - w.im) < Math.hypot(z.re - left[best].re, z.im - left[best].im)) best = k;
        });
        const w = left.splice(best, 1)[0];
        // Wilkinson-like case: both implementations lose digits the same way; ~1e-7 relative.
        const tol = i === 5 ? 1e-6 : 1e-9;
        expect(Math.hypot(z.re - w.re, z.im - w.im)).toBeLessThanOrEqual(tol * Math.max(Math.hypot(w.re, w.im), 1e-12));
      }
    });
  });

  it('recovers roots spread over six decades to high relative accuracy thanks to balancing (known roots)', () => {
    const ours = polyRoots(polyFromRoots(spreadRoots.map((re) => ({ re, im: 0 }))))
      .map((z) => z.re)
      .sort((a, b) => a - b);
    const truth = [...spreadRoots].sort((a, b) => a - b);
    // Measured: without balancing the root at 1e-3 is off by ~3e-12 relative; balanced ~1e-15.
    ours.forEach((r, i) => expect(Math.abs(r - truth[i]) / Math.abs(truth[i])).toBeLessThan(1e-13));
  });

  it('handles degenerate polynomials like numpy.roots (library: numpy.roots conventions)', () => {
    expect(polyRoots([0, 0, 0])).toEqual([]);
    expect(polyRoots([5])).toEqual([]);
    expect(polyRoots([2, 0])).toEqual([{ re: 0, im: 0 }]);
    expect(() => polyRoots([1, NaN, 2])).toThrow('polyRoots: coefficient 1 is NaN; every coefficient must be a finite number');
  });
});

describe('svd', () => {
  const off = eigCases.length + rootCases.length;
  svdCases.forEach((a, i) => {
    it(`singular values match numpy.linalg.svd on case ${i} (${a.length}×${a[0].length}) (library: numpy.linalg.svd)`, () => {
      const dec = svd(new Matrix(a));
      const theirs = result(off + i).s as number[];
      const ours = dec.diagonal.slice(0, Math.min(a.length, a[0].length));
      expect(ours).toHaveLength(theirs.length);
      ours.forEach((s, k) => expect(Math.abs(s - theirs[k])).toBeLessThan(1e-12 * theirs[0]));
      // factors reproduce A (thin SVD, also for the wide case through autoTranspose)
      const U = dec.leftSingularVectors;
      const V = dec.rightSingularVectors;
      const k = ours.length;
      const rebuilt = U.subMatrix(0, U.rows - 1, 0, k - 1)
        .mmul(Matrix.diag(ours))
        .mmul(V.subMatrix(0, V.rows - 1, 0, k - 1).transpose());
      expect(Math.max(...rebuilt.sub(new Matrix(a)).abs().to2DArray().flat())).toBeLessThan(1e-12 * theirs[0]);
    });
  });

  it('refuses non-finite entries', () => {
    expect(() => svd(new Matrix([[1, Infinity]]))).toThrow('svd: entry (0, 1) is Infinity; every entry must be a finite number');
  });
});

describe('lstsq', () => {
  const off = eigCases.length + rootCases.length + svdCases.length;
  lstsqCases.forEach((c, i) => {
    it(`matches numpy.linalg.lstsq on case ${i} (${c.a.length}×${c.a[0].length}) (library: numpy.linalg.lstsq)`, () => {
      const ours = lstsqDetailed(new Matrix(c.a), new Matrix(c.b));
      const theirs = result(off + i) as { x: number[][]; rank: number };
      expect(ours.rank).toBe(theirs.rank);
      const scale = Math.max(...theirs.x.flat().map(Math.abs));
      ours.x.to2DArray().forEach((row, r) => row.forEach((v, k) => expect(Math.abs(v - theirs.x[r][k])).toBeLessThan(1e-10 * scale)));
    });
  });

  it('solves an exactly consistent system exactly (known answer)', () => {
    const a = new Matrix(randMatrix(20, 4));
    const x = new Matrix([[1], [-2], [0.5], [3]]);
    const got = lstsq(a, a.mmul(x));
    got.to2DArray().forEach((row, r) => expect(row[0]).toBeCloseTo(x.get(r, 0), 12));
  });

  it('refuses mismatched shapes with a precise message', () => {
    expect(() => lstsq(new Matrix(3, 2), new Matrix(4, 1))).toThrow('lstsq: A has 3 rows but b has 4');
  });
});

describe('leadingGeneralizedEigenvector', () => {
  // A symmetric (indefinite), B symmetric positive definite and far from diagonal
  const n = 7;
  const G = randMatrix(n, n);
  const S = randMatrix(n, n);
  const A = S.map((row, i) => row.map((v, j) => v + S[j][i]));
  const B = G.map((row, i) => row.map((_, j) => G[i].reduce((s, g, k) => s + g * G[j][k], 0) + (i === j ? 0.5 : 0)));
  const flat = (m: number[][]) => Float64Array.from(m.flat());
  let pencil: [number, number][] = [];

  beforeAll(() => {
    // the pencil's eigenvalues are those of B⁻¹A: numpy.linalg.lstsq (square, full rank: B⁻¹A
    // exactly), then numpy.linalg.eigvals
    const inv = runReference([{ kind: 'lstsq', a: B, b: A }]).results[0] as { x: number[][] };
    pencil = (runReference([{ kind: 'eigvals', a: inv.x }]).results[0] as { values: [number, number][] }).values;
  });

  it('gives the largest eigenvalue of the pencil A·w = λ·B·w, as numpy finds it for B⁻¹A (library: numpy.linalg.eigvals)', () => {
    const { lambda } = leadingGeneralizedEigenvector(flat(A), flat(B), n);
    const top = Math.max(...pencil.map(([re]) => re));
    expect(Math.max(...pencil.map(([, im]) => Math.abs(im)))).toBeLessThan(1e-9); // symmetric-definite: real
    expect(Math.abs(lambda - top)).toBeLessThan(1e-10 * Math.max(1, Math.abs(top)));
  });

  it('returns w with A·w = λ·B·w and wᵀBw = 1, maximising the Rayleigh quotient wᵀAw / wᵀBw (textbook: Golub & Van Loan §8.7)', () => {
    const { lambda, w } = leadingGeneralizedEigenvector(flat(A), flat(B), n);
    const mul = (m: number[][], v: ArrayLike<number>) => m.map((row) => row.reduce((s, x, j) => s + x * v[j], 0));
    const Aw = mul(A, w);
    const Bw = mul(B, w);
    for (let i = 0; i < n; i++) expect(Math.abs(Aw[i] - lambda * Bw[i])).toBeLessThan(1e-9 * (1 + Math.abs(lambda)));
    expect(Bw.reduce((s, x, i) => s + x * w[i], 0)).toBeCloseTo(1, 10);
    const r = createRng(7);
    for (let t = 0; t < 50; t++) {
      const v = Array.from({ length: n }, () => r.normal());
      const q = mul(A, v).reduce((s, x, i) => s + x * v[i], 0) / mul(B, v).reduce((s, x, i) => s + x * v[i], 0);
      expect(q).toBeLessThanOrEqual(lambda + 1e-12);
    }
  });

  it('refuses a B that is not positive definite and non-finite entries', () => {
    const I = Float64Array.from({ length: 4 }, (_, k) => (k % 3 === 0 ? 1 : 0));
    expect(() => leadingGeneralizedEigenvector(I, Float64Array.from([1, 0, 0, -1]), 2)).toThrow(
      new ModalInputError('leadingGeneralizedEigenvector: B is not positive definite'),
    );
    expect(() => leadingGeneralizedEigenvector(Float64Array.from([1, NaN, NaN, 1]), I, 2)).toThrow(
      new ModalInputError('leadingGeneralizedEigenvector: every matrix entry must be a finite number'),
    );
  });
});
