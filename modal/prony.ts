// Prony analysis, low level: multi-channel least-squares linear prediction (all channels share one
// prediction polynomial, hence one set of poles), its roots, and per-channel residues by least
// squares on the Vandermonde system. Also the residue fit shared with the matrix pencil.
//
// Model (CHECKS.md §1): x_c[n] ≈ Σ_k R_ck · z_kⁿ, n = 0 … N−1, z_k = exp(s_k / rate).
// A sum of K real damped sinusoids, noise-free, is reproduced exactly (to rounding) at order 2K.
import { ModalInputError } from './errors';
import { type Complex, eigenvaluesOfArray, lstsqArrays } from './linalg';

/** Result of a low-level exponential fit (Prony or matrix pencil). */
export interface ExponentialFit {
  /** Samples per second of the fitted signals. */
  rate: number;
  /** Number of exponentials (poles) in the model, conjugates counted. */
  order: number;
  /** Discrete-time poles z_k (complex ones come in exact conjugate pairs). */
  poles: Complex[];
  /**
   * residues[c][k]: complex amplitude of pole k in channel c at the first sample, so that
   * x_c[n] ≈ Σ_k residues[c][k]·poles[k]ⁿ. Conjugate poles carry conjugate residues.
   */
  residues: Complex[][];
  /** Relative RMS misfit per channel: ‖x − x̂‖ / ‖x‖ (0 for an all-zero channel fitted exactly). */
  relativeResidual: number[];
}

export interface PronyOptions {
  /**
   * Rank of the least-squares linear-prediction solution (truncated SVD, the Kumaresan–Tufts
   * variant; paper: Kumaresan & Tufts, IEEE Trans. ASSP 30(6), 1982). Default: full numerical rank
   * (plain least-squares Prony).
   */
  rank?: number;
}

/** Checks the signals are non-empty, of equal length, finite and not all zero; returns the common length. */
export function checkSignals(signals: Float64Array[], fn: string): number {
  if (signals.length === 0) throw new ModalInputError(`${fn}: no signals given`);
  const n = signals[0].length;
  let anyNonZero = false;
  for (let c = 0; c < signals.length; c++) {
    const s = signals[c];
    if (s.length !== n) {
      throw new ModalInputError(`${fn}: signal ${c} has ${s.length} samples but signal 0 has ${n}; all signals must have the same length`);
    }
    for (let i = 0; i < s.length; i++) {
      if (!Number.isFinite(s[i])) throw new ModalInputError(`${fn}: signal ${c} sample ${i} is ${s[i]}`);
      if (s[i] !== 0) anyNonZero = true;
    }
  }
  if (!anyNonZero) throw new ModalInputError(`${fn}: the signals are all zero; there is nothing to fit`);
  return n;
}

/**
 * Multi-channel least-squares Prony fit of `order` exponentials. The forward linear-prediction
 * equations x_c[n] = −Σ_{k=1..p} a_k·x_c[n−k], n = p … N−1, of every channel are stacked and solved
 * together (QR, then SVD of R: rank-aware), the poles are the roots of 1 + a_1 z⁻¹ + … + a_p z⁻ᵖ,
 * and the residues come from fitResidues. Requires 1 ≤ order ≤ floor(N/2).
 */
export function pronyFit(signals: Float64Array[], rate: number, order: number, options: PronyOptions = {}): ExponentialFit {
  const n = checkSignals(signals, 'pronyFit');
  if (!Number.isFinite(rate) || rate <= 0) throw new ModalInputError(`pronyFit: rate must be a positive number, got ${rate}`);
  const maxOrder = Math.floor(n / 2);
  if (!Number.isInteger(order) || order < 1) {
    throw new ModalInputError(`pronyFit: order must be a positive integer, got ${order}`);
  }
  if (order > maxOrder) {
    throw new ModalInputError(`pronyFit: order ${order} is too large for ${n} samples per channel (at most ${maxOrder})`);
  }
  const p = order;
  const channels = signals.length;
  const rowsPer = n - p;
  const m = rowsPer * channels;
  const a = new Float64Array(m * p);
  const b = new Float64Array(m);
  for (let c = 0; c < channels; c++) {
    const x = signals[c];
    for (let r = 0; r < rowsPer; r++) {
      const row = c * rowsPer + r;
      const t = r + p;
      for (let k = 0; k < p; k++) a[row * p + k] = x[t - 1 - k];
      b[row] = -x[t];
    }
  }
  let coef: Float64Array;
  if (options.rank !== undefined) {
    if (!Number.isInteger(options.rank) || options.rank < 1 || options.rank > p) {
      throw new ModalInputError(`pronyFit: rank must be an integer from 1 to the order ${p}, got ${options.rank}`);
    }
    coef = truncatedSolve(a, m, p, b, options.rank);
  } else {
    const sol = lstsqArrays(a, m, p, b, 1, 2.220446049250313e-16 * Math.max(m, p), true);
    coef = new Float64Array(p);
    for (let k = 0; k < p; k++) coef[k] = sol.x.get(k, 0);
  }
  // Roots of z^p + a1 z^(p−1) + … + ap: companion matrix, balanced (polyRoots without the copy).
  const comp = new Float64Array(p * p);
  for (let j = 0; j < p; j++) comp[j] = -coef[j];
  for (let i = 1; i < p; i++) comp[i * p + i - 1] = 1;
  if (!comp.every(Number.isFinite)) {
    throw new ModalInputError('pronyFit: the linear-prediction solution is not finite (signals all zero or degenerate)');
  }
  const poles = eigenvaluesOfArray(comp, p);
  const { residues, relativeResidual } = fitResidues(signals, poles);
  return { rate, order: p, poles, residues, relativeResidual };
}

/** Minimum-norm solution of A·x ≈ b restricted to the `rank` largest singular directions. */
function truncatedSolve(a: Float64Array, m: number, n: number, b: Float64Array, rank: number): Float64Array {
  // Reuse lstsqArrays with an rcond that keeps exactly `rank` singular values: compute them first.
  const a2 = a.slice();
  const b2 = b.slice();
  const probe = lstsqArrays(a2, m, n, b2, 1, 0);
  const s = probe.singularValues;
  const keep = Math.min(rank, s.length);
  const cutoff = keep < s.length ? (s[keep - 1] + s[keep]) / 2 : 0;
  const rcond = s[0] > 0 ? cutoff / s[0] : 0;
  const sol = lstsqArrays(a, m, n, b, 1, rcond);
  const x = new Float64Array(n);
  for (let k = 0; k < n; k++) x[k] = sol.x.get(k, 0);
  return x;
}

/** Distinct pole groups: a real pole, or the upper member of a conjugate pair (two basis columns). */
interface PoleGroup {
  /** Index in the pole list of the member with Im ≥ 0. */
  index: number;
  /** Index of its conjugate, or −1 for a real pole. */
  conjIndex: number;
}

function groupPoles(poles: Complex[]): PoleGroup[] {
  const groups: PoleGroup[] = [];
  const used = new Uint8Array(poles.length);
  for (let i = 0; i < poles.length; i++) {
    if (used[i]) continue;
    const z = poles[i];
    used[i] = 1;
    if (z.im === 0) {
      groups.push({ index: i, conjIndex: -1 });
      continue;
    }
    // Find the conjugate partner (exact for eigenvalues of a real matrix; nearest otherwise).
    let best = -1;
    let bestD = Infinity;
    for (let j = i + 1; j < poles.length; j++) {
      if (used[j]) continue;
      const d = Math.abs(poles[j].re - z.re) + Math.abs(poles[j].im + z.im);
      if (d < bestD) {
        bestD = d;
        best = j;
      }
    }
    const tol = 1e-8 * Math.max(1, Math.hypot(z.re, z.im));
    if (best >= 0 && bestD <= tol) {
      used[best] = 1;
      groups.push(z.im > 0 ? { index: i, conjIndex: best } : { index: best, conjIndex: i });
    } else {
      // An unpaired complex pole cannot come out of a real matrix's eigenvalues (they pair
      // exactly); if a caller passes one, it is fitted with the real basis of the pair it would
      // form with its conjugate and gets that pair member's residue.
      groups.push({ index: i, conjIndex: -2 });
    }
  }
  return groups;
}

/**
 * Per-channel residues of given discrete poles by least squares on the real Vandermonde basis
 * (one column for a real pole; Re(zⁿ) and Im(zⁿ) for a conjugate pair, so the model is real by
 * construction). Columns are normalised before the solve (poles outside the unit circle grow
 * fast), all channels are solved with one QR. Returns residues aligned with `poles`.
 * `polynomialDegree` ≥ 0 adds nuisance columns 1, t, …, t^degree, for what a detrend leaves
 * behind; their fitted sum per channel is returned as `polynomial` (empty arrays for −1, the
 * default, which adds none). The relative residual counts the polynomial as part of the model.
 */
export function fitResidues(
  signals: Float64Array[],
  poles: Complex[],
  polynomialDegree = -1,
): { residues: Complex[][]; relativeResidual: number[]; polynomial: Float64Array[] } {
  const n = signals[0].length;
  const channels = signals.length;
  const groups = groupPoles(poles);
  let cols = 0;
  for (const g of groups) cols += g.conjIndex === -1 ? 1 : 2;
  const poleCols = cols;
  cols += polynomialDegree + 1;
  const residues: Complex[][] = signals.map(() => poles.map(() => ({ re: 0, im: 0 })));
  const relativeResidual: number[] = new Array(channels).fill(0);
  const polynomial: Float64Array[] = signals.map(() => new Float64Array(polynomialDegree >= 0 ? n : 0));
  if (cols === 0) {
    for (let c = 0; c < channels; c++) relativeResidual[c] = norm(signals[c]) > 0 ? 1 : 0;
    return { residues, relativeResidual, polynomial };
  }
  const basis = new Float64Array(n * cols);
  const colNorm = new Float64Array(cols);
  let col = 0;
  for (const g of groups) {
    const z = poles[g.index];
    const mag = Math.hypot(z.re, z.im);
    const logMag = Math.log(mag);
    const th = Math.atan2(z.im, z.re);
    if (g.conjIndex === -1) {
      for (let t = 0; t < n; t++) basis[t * cols + col] = mag === 0 ? (t === 0 ? 1 : 0) : Math.sign(z.re) ** t * Math.exp(t * logMag);
      col += 1;
    } else {
      for (let t = 0; t < n; t++) {
        const r = Math.exp(t * logMag);
        basis[t * cols + col] = r * Math.cos(t * th);
        basis[t * cols + col + 1] = r * Math.sin(t * th);
      }
      col += 2;
    }
  }
  for (let d = 0; d <= polynomialDegree; d++) {
    for (let t = 0; t < n; t++) basis[t * cols + poleCols + d] = (t / Math.max(1, n - 1)) ** d;
  }
  for (let j = 0; j < cols; j++) {
    let s = 0;
    for (let t = 0; t < n; t++) s += basis[t * cols + j] * basis[t * cols + j];
    colNorm[j] = Math.sqrt(s) || 1;
    for (let t = 0; t < n; t++) basis[t * cols + j] /= colNorm[j];
  }
  const rhs = new Float64Array(n * channels);
  for (let c = 0; c < channels; c++) for (let t = 0; t < n; t++) rhs[t * channels + c] = signals[c][t];
  const basisCopy = basis.slice();
  const sol = lstsqArrays(basis, n, cols, rhs, channels, 2.220446049250313e-16 * Math.max(n, cols), true);
  for (let c = 0; c < channels; c++) {
    // residual with the normalised basis copy
    let res2 = 0;
    let sig2 = 0;
    for (let t = 0; t < n; t++) {
      let fit = 0;
      for (let j = 0; j < cols; j++) fit += basisCopy[t * cols + j] * sol.x.get(j, c);
      const e = signals[c][t] - fit;
      res2 += e * e;
      sig2 += signals[c][t] * signals[c][t];
    }
    relativeResidual[c] = sig2 > 0 ? Math.sqrt(res2 / sig2) : Math.sqrt(res2);
    for (let j = poleCols; j < cols; j++) {
      const w = sol.x.get(j, c);
      for (let t = 0; t < n; t++) polynomial[c][t] += basisCopy[t * cols + j] * w;
    }
    col = 0;
    for (const g of groups) {
      if (g.conjIndex === -1) {
        residues[c][g.index] = { re: sol.x.get(col, c) / colNorm[col], im: 0 };
        col += 1;
      } else {
        // a·Re(zⁿ) + b·Im(zⁿ) = Re((a − jb)·zⁿ) = ((a − jb)/2)·zⁿ + ((a + jb)/2)·z̄ⁿ
        const av = sol.x.get(col, c) / colNorm[col];
        const bv = sol.x.get(col + 1, c) / colNorm[col + 1];
        // (the basis was built from poles[g.index], so this holds whichever half-plane it is in)
        residues[c][g.index] = { re: av / 2, im: -bv / 2 };
        if (g.conjIndex >= 0) residues[c][g.conjIndex] = { re: av / 2, im: bv / 2 };
        col += 2;
      }
    }
  }
  return { residues, relativeResidual, polynomial };
}

function norm(x: Float64Array): number {
  let s = 0;
  for (let i = 0; i < x.length; i++) s += x[i] * x[i];
  return Math.sqrt(s);
}
