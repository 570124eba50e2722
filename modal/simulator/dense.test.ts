import { describe, expect, it } from 'vitest';
import { createRng } from '../random';
import { expm, fromRows, psdFactor, toRows, vanLoan, matMul, transpose } from './dense';
import { buildTarrowModel } from './model';
import { runReference } from './reference.test-helper';

function maxRelDiff(a: number[][], b: number[][]): number {
  let num = 0;
  let den = 0;
  for (let i = 0; i < a.length; i++) {
    for (let j = 0; j < a[i].length; j++) {
      num = Math.max(num, Math.abs(a[i][j] - b[i][j]));
      den = Math.max(den, Math.abs(b[i][j]));
    }
  }
  return num / den;
}

const rng = createRng(7);
const randomMatrix = (n: number, scale: number) =>
  [...Array(n)].map(() => [...Array(n)].map(() => scale * rng.normal()));

// Matrices spanning every Padé degree (small norm) and the scaled-and-squared path (large norm).
const model = buildTarrowModel(2500);
const modelAT = model.A.map((r) => r.map((v) => v / 30));
const expmCases: number[][][] = [
  randomMatrix(4, 0.002),
  randomMatrix(5, 0.05),
  randomMatrix(6, 0.3),
  randomMatrix(6, 0.8),
  randomMatrix(8, 3),
  randomMatrix(12, 20),
  modelAT,
  model.A.map((r) => r.map((v) => v * 2)),
];
// A stable system for the Van Loan check (the Tarrow model has the rigid-body integrator).
const stableA = model.A.map((r, i) => r.map((v, j) => (i === j ? v - 0.05 : v)));
const n = stableA.length;
const bq = model.B;
const Q = [...Array(n)].map((_, i) => [...Array(n)].map((__, j) => bq[i].reduce((s, v, k) => s + v * bq[j][k] * 9, 0)));

const ref = runReference([
  ...expmCases.map((A) => ({ op: 'expm', A })),
  { op: 'vanloan', A: stableA, Q, T: 1 / 30 },
]);

describe('expm (Padé scaling and squaring)', () => {
  it('matches scipy.linalg.expm on matrices across all Padé degrees (library)', () => {
    expmCases.forEach((A, k) => {
      const { a, n: m } = fromRows(A);
      const mine = toRows(expm(a, m), m, m);
      expect(maxRelDiff(mine, ref[k].E)).toBeLessThan(1e-12);
    });
  });

  it('turns the generator of a rotation into the rotation (textbook: exp of a skew-symmetric 2×2)', () => {
    const w = 2 * Math.PI * 0.7;
    const t = 3.3;
    const e = expm(new Float64Array([0, w * t, -w * t, 0]), 2);
    expect(e[0]).toBeCloseTo(Math.cos(w * t), 13);
    expect(e[1]).toBeCloseTo(Math.sin(w * t), 13);
    expect(e[2]).toBeCloseTo(-Math.sin(w * t), 13);
  });

  it('refuses a matrix with a non-finite entry', () => {
    expect(() => expm(new Float64Array([1, NaN, 0, 1]), 2)).toThrow('expm: entry 1 is NaN; entries must be finite');
  });
});

describe('Van Loan discretisation', () => {
  it('gives Φ = expm(AT) and the noise covariance Qd = P − Φ P Φᵀ of the Lyapunov solution (library)', () => {
    const r = ref[expmCases.length];
    const { a } = fromRows(stableA);
    const { a: q } = fromRows(Q);
    const { phi, qd } = vanLoan(a, q, n, 1 / 30);
    expect(maxRelDiff(toRows(phi, n, n), r.phi)).toBeLessThan(1e-11);
    expect(maxRelDiff(toRows(qd, n, n), r.qd)).toBeLessThan(1e-6);
  });

  it('factor L of a PSD matrix reproduces it (L Lᵀ = Q)', () => {
    const { a } = fromRows(stableA);
    const { a: q } = fromRows(Q);
    const { qd } = vanLoan(a, q, n, 1 / 30);
    const { l, r } = psdFactor(qd, n);
    const back = matMul(l, transpose(l, n, r), n, r, n);
    expect(maxRelDiff(toRows(back, n, n), toRows(qd, n, n))).toBeLessThan(1e-10);
  });
});
