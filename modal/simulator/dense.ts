// Small dense matrix helpers for the simulator: row-major Float64Array, n up to a few dozen.
// The matrix exponential is the scaling-and-squaring Padé algorithm (paper: N. J. Higham, "The
// scaling and squaring method for the matrix exponential revisited", SIAM J. Matrix Anal. Appl.
// 26(4), 2005), checked against scipy.linalg.expm in modal/simulator/dense.test.ts.
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { ModalInputError } from '../errors';

/** Row-major n×m matrix. */
export type Dense = Float64Array;

export function fromRows(rows: number[][]): { a: Dense; n: number; m: number } {
  const n = rows.length;
  const m = n === 0 ? 0 : rows[0].length;
  const a = new Float64Array(n * m);
  for (let i = 0; i < n; i++) {
    if (rows[i].length !== m) throw new ModalInputError(`Matrix row ${i} has ${rows[i].length} entries, expected ${m}`);
    for (let j = 0; j < m; j++) a[i * m + j] = rows[i][j];
  }
  return { a, n, m };
}

export function toRows(a: Dense, n: number, m: number): number[][] {
  const out: number[][] = [];
  for (let i = 0; i < n; i++) out.push(Array.from(a.subarray(i * m, i * m + m)));
  return out;
}

/** C = A (n×k) · B (k×m). */
export function matMul(a: Dense, b: Dense, n: number, k: number, m: number): Dense {
  const c = new Float64Array(n * m);
  for (let i = 0; i < n; i++) {
    for (let p = 0; p < k; p++) {
      const aip = a[i * k + p];
      if (aip === 0) continue;
      const bo = p * m;
      const co = i * m;
      for (let j = 0; j < m; j++) c[co + j] += aip * b[bo + j];
    }
  }
  return c;
}

export function transpose(a: Dense, n: number, m: number): Dense {
  const t = new Float64Array(n * m);
  for (let i = 0; i < n; i++) for (let j = 0; j < m; j++) t[j * n + i] = a[i * m + j];
  return t;
}

export function identity(n: number): Dense {
  const e = new Float64Array(n * n);
  for (let i = 0; i < n; i++) e[i * n + i] = 1;
  return e;
}

/** Solves A X = B (A n×n, B n×m) by LU with partial pivoting. A and B are not modified. */
export function solve(a: Dense, b: Dense, n: number, m: number): Dense {
  const lu = a.slice();
  const x = b.slice();
  for (let k = 0; k < n; k++) {
    let p = k;
    let best = Math.abs(lu[k * n + k]);
    for (let i = k + 1; i < n; i++) {
      const v = Math.abs(lu[i * n + k]);
      if (v > best) {
        best = v;
        p = i;
      }
    }
    if (best === 0 || !Number.isFinite(best)) throw new ModalInputError(`Singular matrix in solve (column ${k})`);
    if (p !== k) {
      for (let j = 0; j < n; j++) {
        const t = lu[k * n + j];
        lu[k * n + j] = lu[p * n + j];
        lu[p * n + j] = t;
      }
      for (let j = 0; j < m; j++) {
        const t = x[k * m + j];
        x[k * m + j] = x[p * m + j];
        x[p * m + j] = t;
      }
    }
    const piv = lu[k * n + k];
    for (let i = k + 1; i < n; i++) {
      const f = lu[i * n + k] / piv;
      if (f === 0) continue;
      lu[i * n + k] = f;
      for (let j = k + 1; j < n; j++) lu[i * n + j] -= f * lu[k * n + j];
      for (let j = 0; j < m; j++) x[i * m + j] -= f * x[k * m + j];
    }
  }
  for (let k = n - 1; k >= 0; k--) {
    const piv = lu[k * n + k];
    for (let j = 0; j < m; j++) {
      let s = x[k * m + j];
      for (let i = k + 1; i < n; i++) s -= lu[k * n + i] * x[i * m + j];
      x[k * m + j] = s / piv;
    }
  }
  return x;
}

function norm1(a: Dense, n: number): number {
  let best = 0;
  for (let j = 0; j < n; j++) {
    let s = 0;
    for (let i = 0; i < n; i++) s += Math.abs(a[i * n + j]);
    if (s > best) best = s;
  }
  return best;
}

// Padé coefficients b_k of degree 3, 5, 7, 9, 13 and the 1-norm limits θ_m below which that degree
// is accurate to double precision without scaling (paper: Higham 2005, Table 2.3 and eq. 2.10).
const PADE: Record<number, number[]> = {
  3: [120, 60, 12, 1],
  5: [30240, 15120, 3360, 420, 30, 1],
  7: [17297280, 8648640, 1995840, 277200, 25200, 1512, 56, 1],
  9: [17643225600, 8821612800, 2075673600, 302702400, 30270240, 2162160, 110880, 3960, 90, 1],
  13: [
    64764752532480000, 32382376266240000, 7771770303897600, 1187353796428800, 129060195264000, 10559470521600,
    670442572800, 33522128640, 1323241920, 40840800, 960960, 16380, 182, 1,
  ],
};
const THETA: [number, number][] = [
  [3, 1.495585217958292e-2],
  [5, 2.539398330063230e-1],
  [7, 9.504178996162932e-1],
  [9, 2.097847961257068],
];
const THETA13 = 5.371920351148152;

/** Matrix exponential exp(A) of a square n×n matrix (Higham 2005 scaling and squaring). */
export function expm(a: Dense, n: number): Dense {
  for (let i = 0; i < a.length; i++) {
    if (!Number.isFinite(a[i])) throw new ModalInputError(`expm: entry ${i} is ${a[i]}; entries must be finite`);
  }
  const nrm = norm1(a, n);
  for (const [m, theta] of THETA) {
    if (nrm <= theta) return padeApprox(a, n, m);
  }
  let s = 0;
  if (nrm > THETA13) s = Math.max(0, Math.ceil(Math.log2(nrm / THETA13)));
  const scaled = a.slice();
  const f = Math.pow(2, -s);
  for (let i = 0; i < scaled.length; i++) scaled[i] *= f;
  let r = padeApprox(scaled, n, 13);
  for (let k = 0; k < s; k++) r = matMul(r, r, n, n, n);
  return r;
}

function padeApprox(a: Dense, n: number, m: number): Dense {
  const b = PADE[m];
  const I = identity(n);
  const a2 = matMul(a, a, n, n, n);
  let u: Dense;
  let v: Dense;
  if (m < 13) {
    // U = A · Σ b_{2k+1} A^{2k}, V = Σ b_{2k} A^{2k}
    const powers: Dense[] = [I, a2];
    for (let k = 2; 2 * k <= m; k++) powers.push(matMul(powers[k - 1], a2, n, n, n));
    const uu = new Float64Array(n * n);
    const vv = new Float64Array(n * n);
    for (let k = 0; 2 * k <= m; k++) {
      const p = powers[k];
      const bo = b[2 * k + 1] ?? 0;
      const be = b[2 * k];
      for (let i = 0; i < n * n; i++) {
        uu[i] += bo * p[i];
        vv[i] += be * p[i];
      }
    }
    u = matMul(a, uu, n, n, n);
    v = vv;
  } else {
    const a4 = matMul(a2, a2, n, n, n);
    const a6 = matMul(a4, a2, n, n, n);
    const t1 = new Float64Array(n * n);
    const t2 = new Float64Array(n * n);
    const uu = new Float64Array(n * n);
    const vv = new Float64Array(n * n);
    for (let i = 0; i < n * n; i++) {
      t1[i] = b[13] * a6[i] + b[11] * a4[i] + b[9] * a2[i];
      t2[i] = b[12] * a6[i] + b[10] * a4[i] + b[8] * a2[i];
    }
    const w1 = matMul(a6, t1, n, n, n);
    const w2 = matMul(a6, t2, n, n, n);
    for (let i = 0; i < n * n; i++) {
      uu[i] = w1[i] + b[7] * a6[i] + b[5] * a4[i] + b[3] * a2[i] + b[1] * I[i];
      vv[i] = w2[i] + b[6] * a6[i] + b[4] * a4[i] + b[2] * a2[i] + b[0] * I[i];
    }
    u = matMul(a, uu, n, n, n);
    v = vv;
  }
  // exp(A) ≈ (V − U)⁻¹ (V + U)
  const p = new Float64Array(n * n);
  const q = new Float64Array(n * n);
  for (let i = 0; i < n * n; i++) {
    p[i] = v[i] + u[i];
    q[i] = v[i] - u[i];
  }
  return solve(q, p, n, n);
}

/**
 * Discretisation of dx = A x dt + B dw (E[dw dwᵀ] = W dt) for a step T by Van Loan's method
 * (paper: C. F. Van Loan, "Computing integrals involving the matrix exponential", IEEE Trans.
 * Automatic Control 23(3), 1978): Φ = exp(A T) and Qd = ∫₀ᵀ e^{Aτ} B W Bᵀ e^{Aᵀτ} dτ.
 * `bwb` is B W Bᵀ (n×n).
 */
export function vanLoan(a: Dense, bwb: Dense, n: number, T: number): { phi: Dense; qd: Dense } {
  const N = 2 * n;
  const c = new Float64Array(N * N);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      c[i * N + j] = -a[i * n + j] * T;
      c[i * N + n + j] = bwb[i * n + j] * T;
      c[(n + i) * N + n + j] = a[j * n + i] * T;
    }
  }
  const f = expm(c, N);
  const f12 = new Float64Array(n * n);
  const f22t = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      f12[i * n + j] = f[i * N + n + j];
      f22t[j * n + i] = f[(n + i) * N + n + j];
    }
  }
  const phi = f22t;
  const qd = matMul(phi, f12, n, n, n);
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      const s = 0.5 * (qd[i * n + j] + qd[j * n + i]);
      qd[i * n + j] = s;
      qd[j * n + i] = s;
    }
  }
  return { phi, qd };
}

/**
 * A factor L (n×r) with L Lᵀ = Q for a symmetric positive semi-definite Q, from its eigenvalue
 * decomposition; eigenvalues below 1e-13 of the largest (rounding) are dropped, so r ≤ n.
 */
export function psdFactor(q: Dense, n: number): { l: Dense; r: number } {
  const rows: number[][] = [];
  for (let i = 0; i < n; i++) rows.push(Array.from(q.subarray(i * n, i * n + n)));
  const evd = new EigenvalueDecomposition(new Matrix(rows), { assumeSymmetric: true });
  const lam = evd.realEigenvalues;
  const vec = evd.eigenvectorMatrix;
  const top = Math.max(0, ...lam);
  const keep: number[] = [];
  for (let k = 0; k < n; k++) if (lam[k] > 1e-13 * top && lam[k] > 0) keep.push(k);
  const r = keep.length;
  const l = new Float64Array(n * r);
  for (let c = 0; c < r; c++) {
    const s = Math.sqrt(lam[keep[c]]);
    for (let i = 0; i < n; i++) l[i * r + c] = vec.get(i, keep[c]) * s;
  }
  return { l, r };
}
