// Linear-algebra helpers on top of ml-matrix, with the guards ml-matrix lacks.
//
// Why these wrappers exist (measured against numpy/LAPACK, CHECKS.md §2):
//  - ml-matrix's EigenvalueDecomposition loops forever on NaN/Inf input, so every entry is checked
//    with Number.isFinite first;
//  - it does not balance before the Hessenberg QR iteration, so badly scaled matrices (companion
//    matrices of polynomials with spread-out coefficients) lose accuracy: we balance first, with the
//    Parlett–Reinsch scaling that LAPACK's dgebal uses (powers of 2, so no rounding is introduced);
//  - its SVD of a wide matrix needs autoTranspose;
//  - its SVD is 14–69× slower than LAPACK, so tall least-squares problems are first reduced by a
//    Householder QR (O(m·n²), allocation-light) and only the small n×n triangle goes through the SVD.
import { EigenvalueDecomposition, Matrix, SingularValueDecomposition } from 'ml-matrix';
import { ModalInputError } from './errors';

export interface Complex {
  re: number;
  im: number;
}

function assertFiniteMatrix(A: Matrix, what: string): void {
  const rows = A.rows;
  const cols = A.columns;
  for (let i = 0; i < rows; i++) {
    for (let j = 0; j < cols; j++) {
      const v = A.get(i, j);
      if (!Number.isFinite(v)) {
        throw new ModalInputError(`${what}: entry (${i}, ${j}) is ${v}; every entry must be a finite number`);
      }
    }
  }
}

/**
 * Balances a square matrix in place by a diagonal similarity D⁻¹·A·D with D = diag(2^k), the
 * scaling step of LAPACK dgebal (job 'S'; no permutation). Row and column 2-norms of each index
 * are brought within a factor of 2 of each other; eigenvalues are unchanged exactly (powers of 2).
 * Returns the scale factors d_i. `a` is row-major n×n.
 */
export function balanceInPlace(a: Float64Array, n: number): Float64Array {
  const RADIX = 2;
  const FACTOR = 0.95; // LAPACK: only accept a scaling that reduces c + r by at least 5 %
  const SFMIN = 2.2250738585072014e-308 / 2.220446049250313e-16;
  const SFMAX = 1 / SFMIN;
  const scale = new Float64Array(n).fill(1);
  // LAPACK iterates until no change; the cap only guards against pathological cycling.
  for (let sweep = 0; sweep < 200; sweep++) {
    let changed = false;
    for (let i = 0; i < n; i++) {
      let c = 0;
      let r = 0;
      let ca = 0;
      let ra = 0;
      for (let k = 0; k < n; k++) {
        const col = a[k * n + i];
        const row = a[i * n + k];
        c += col * col;
        r += row * row;
        if (Math.abs(col) > ca) ca = Math.abs(col);
        if (Math.abs(row) > ra) ra = Math.abs(row);
      }
      c = Math.sqrt(c);
      r = Math.sqrt(r);
      if (c === 0 || r === 0) continue;
      let g = r / RADIX;
      let f = 1;
      const s = c + r;
      while (c < g && Math.max(f, c, ca) < SFMAX && Math.min(r, g, ra) > SFMIN) {
        f *= RADIX;
        c *= RADIX;
        ca *= RADIX;
        r /= RADIX;
        g /= RADIX;
        ra /= RADIX;
      }
      g = c / RADIX;
      while (g >= r && Math.max(r, ra) < SFMAX && Math.min(f, c, g, ca) > SFMIN) {
        f /= RADIX;
        c /= RADIX;
        g /= RADIX;
        ca /= RADIX;
        r *= RADIX;
        ra *= RADIX;
      }
      if (c + r >= FACTOR * s) continue;
      if (f < 1 && scale[i] < 1 && f * scale[i] <= SFMIN) continue;
      if (f > 1 && scale[i] > 1 && scale[i] >= SFMAX / f) continue;
      scale[i] *= f;
      changed = true;
      const gInv = 1 / f;
      for (let k = 0; k < n; k++) a[i * n + k] *= gInv; // row i by 1/f
      for (let k = 0; k < n; k++) a[k * n + i] *= f; // column i by f
    }
    if (!changed) break;
  }
  return scale;
}

/**
 * Eigenvalues of a real square matrix (complex conjugate pairs come out exactly conjugate).
 * Checks every entry is finite (ModalInputError otherwise), balances (dgebal-style scaling), then
 * runs ml-matrix's Hessenberg + shifted QR. Order is unspecified (compare as multisets).
 */
export function complexEigenvalues(A: Matrix): Complex[] {
  if (!A.isSquare()) {
    throw new ModalInputError(`complexEigenvalues: the matrix must be square, got ${A.rows}×${A.columns}`);
  }
  const n = A.rows;
  if (n === 0) return [];
  assertFiniteMatrix(A, 'complexEigenvalues');
  if (n === 1) return [{ re: A.get(0, 0), im: 0 }];
  const a = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) a[i * n + j] = A.get(i, j);
  return eigenvaluesOfArray(a, n);
}

/**
 * Eigenvalues of a row-major n×n array (consumed: scaled and balanced in place). Entries must be
 * finite. The matrix is first scaled by a power of two so its largest entry is near 1 (exact; the
 * eigenvalues scale back exactly): without it entries near 1e±300 under- or overflow inside the
 * QR iteration (measured: [[1, 2], [3, 1]]·1e−300 gave 1e−300 twice).
 */
export function eigenvaluesOfArray(a: Float64Array, n: number): Complex[] {
  if (n === 0) return [];
  if (n === 1) return [{ re: a[0], im: 0 }];
  let amax = 0;
  for (let i = 0; i < a.length; i++) amax = Math.max(amax, Math.abs(a[i]));
  if (amax === 0) return Array.from({ length: n }, () => ({ re: 0, im: 0 }));
  const e = Math.round(Math.log2(amax));
  // 2^−e in two steps so that neither factor over- or underflows
  const f1 = Math.pow(2, -Math.trunc(e / 2));
  const f2 = Math.pow(2, -(e - Math.trunc(e / 2)));
  for (let i = 0; i < a.length; i++) a[i] = a[i] * f1 * f2;
  const back = Math.pow(2, Math.trunc(e / 2)) * Math.pow(2, e - Math.trunc(e / 2));
  balanceInPlace(a, n);
  const rows: Float64Array[] = new Array(n);
  for (let i = 0; i < n; i++) rows[i] = a.subarray(i * n, (i + 1) * n);
  const evd = new EigenvalueDecomposition(new Matrix(rows));
  const re = evd.realEigenvalues;
  const im = evd.imaginaryEigenvalues;
  const out: Complex[] = new Array(n);
  for (let i = 0; i < n; i++) out[i] = { re: re[i] * back, im: im[i] * back };
  return out;
}

/**
 * Roots of a polynomial with real coefficients, highest power first (same convention and same
 * handling of leading/trailing zeros as numpy.roots): leading zeros are dropped, trailing zeros give
 * roots at 0, an all-zero or constant polynomial has no roots. The remaining roots are the
 * eigenvalues of the balanced companion matrix.
 */
export function polyRoots(coeffs: ArrayLike<number>): Complex[] {
  for (let i = 0; i < coeffs.length; i++) {
    if (!Number.isFinite(coeffs[i])) {
      throw new ModalInputError(`polyRoots: coefficient ${i} is ${coeffs[i]}; every coefficient must be a finite number`);
    }
  }
  let first = -1;
  let last = -1;
  for (let i = 0; i < coeffs.length; i++) {
    if (coeffs[i] !== 0) {
      if (first < 0) first = i;
      last = i;
    }
  }
  if (first < 0) return [];
  const trailingZeros = coeffs.length - 1 - last;
  const n = last - first; // degree after stripping
  const out: Complex[] = [];
  if (n > 0) {
    // numpy.roots' companion: ones on the sub-diagonal, first row −p[1:]/p[0].
    const a = new Float64Array(n * n);
    const lead = coeffs[first];
    for (let j = 0; j < n; j++) a[j] = -coeffs[first + 1 + j] / lead;
    for (let i = 1; i < n; i++) a[i * n + i - 1] = 1;
    if (!a.every(Number.isFinite)) {
      throw new ModalInputError('polyRoots: the coefficients overflow when divided by the leading coefficient');
    }
    out.push(...eigenvaluesOfArray(a, n));
  }
  for (let i = 0; i < trailingZeros; i++) out.push({ re: 0, im: 0 });
  return out;
}

export interface SvdOptions {
  /** Compute U (default true). */
  computeLeftSingularVectors?: boolean;
  /** Compute V (default true). */
  computeRightSingularVectors?: boolean;
}

/**
 * Thin SVD A = U·diag(s)·Vᵀ through ml-matrix with autoTranspose, so wide matrices are handled
 * (ml-matrix without it returns wrong factors for rows < columns). Checks entries are finite.
 * Singular values are in descending order.
 */
export function svd(A: Matrix, options: SvdOptions = {}): SingularValueDecomposition {
  if (A.rows === 0 || A.columns === 0) {
    throw new ModalInputError(`svd: the matrix is empty (${A.rows}×${A.columns})`);
  }
  assertFiniteMatrix(A, 'svd');
  return new SingularValueDecomposition(A, {
    computeLeftSingularVectors: options.computeLeftSingularVectors ?? true,
    computeRightSingularVectors: options.computeRightSingularVectors ?? true,
    autoTranspose: true,
  });
}

/**
 * Householder QR of a tall row-major m×n array `a` (m ≥ n), in place, applying the same
 * reflections to the row-major m×k array `b` (may be null). On return the upper n×n triangle of
 * `a` is R (zeros below) and the first n rows of `b` are (Qᵀb)[0..n). The work is done on a
 * column-major copy so that every inner loop runs over contiguous memory (about 2–3× faster than
 * strided access for the stacked Hankel matrices of the matrix pencil); O(m·n²) flops.
 */
export function householderInPlace(a: Float64Array, m: number, n: number, b: Float64Array | null, k: number): void {
  const col = new Float64Array(m * n);
  for (let i = 0; i < m; i++) {
    const row = i * n;
    for (let j = 0; j < n; j++) col[j * m + i] = a[row + j];
  }
  let bcol: Float64Array | null = null;
  if (b && k > 0) {
    bcol = new Float64Array(m * k);
    for (let i = 0; i < m; i++) for (let c = 0; c < k; c++) bcol[c * m + i] = b[i * k + c];
  }
  const v = new Float64Array(m);
  const steps = Math.min(m - 1, n);
  for (let j = 0; j < steps; j++) {
    const cj = j * m;
    let norm = 0;
    for (let i = j; i < m; i++) norm += col[cj + i] * col[cj + i];
    norm = Math.sqrt(norm);
    if (norm === 0) continue;
    const ajj = col[cj + j];
    const alpha = ajj > 0 ? -norm : norm;
    // v = x − alpha·e1 (from index j); H = I − β·v·vᵀ with β = 2/(vᵀv)
    v[j] = ajj - alpha;
    let vtv = v[j] * v[j];
    for (let i = j + 1; i < m; i++) {
      v[i] = col[cj + i];
      vtv += v[i] * v[i];
    }
    if (vtv === 0) continue;
    const beta = 2 / vtv;
    col[cj + j] = alpha;
    for (let i = j + 1; i < m; i++) col[cj + i] = 0;
    for (let c = j + 1; c < n; c++) {
      const cc = c * m;
      let dot = 0;
      for (let i = j; i < m; i++) dot += v[i] * col[cc + i];
      dot *= beta;
      if (dot === 0) continue;
      for (let i = j; i < m; i++) col[cc + i] -= dot * v[i];
    }
    if (bcol) {
      for (let c = 0; c < k; c++) {
        const cc = c * m;
        let dot = 0;
        for (let i = j; i < m; i++) dot += v[i] * bcol[cc + i];
        dot *= beta;
        if (dot === 0) continue;
        for (let i = j; i < m; i++) bcol[cc + i] -= dot * v[i];
      }
    }
  }
  for (let i = 0; i < m; i++) {
    const row = i * n;
    for (let j = 0; j < n; j++) a[row + j] = j >= i ? col[j * m + i] : 0;
  }
  if (b && bcol) for (let i = 0; i < m; i++) for (let c = 0; c < k; c++) b[i * k + c] = bcol[c * m + i];
}

/** True when the first `count` entries of `x` are finite. */
export function allFinite(x: Float64Array, count = x.length): boolean {
  for (let i = 0; i < count; i++) if (!Number.isFinite(x[i])) return false;
  return true;
}

/** The refusal for data whose squares overflow double precision. */
export function overflowError(fn: string): ModalInputError {
  return new ModalInputError(`${fn}: the computation overflowed double precision (values too large); rescale the data`);
}

/** R factor (n×n upper triangle, as a Matrix) of a tall row-major m×n array; `a` is consumed. */
export function rFactor(a: Float64Array, m: number, n: number): Matrix {
  householderInPlace(a, m, n, null, 0);
  if (!allFinite(a, Math.min(m, n) * n)) throw overflowError('rFactor');
  const p = Math.min(m, n);
  const R = new Matrix(p, n);
  for (let i = 0; i < p; i++) for (let j = i; j < n; j++) R.set(i, j, a[i * n + j]);
  return R;
}

export interface LstsqOptions {
  /**
   * Singular values below rcond·s_max are treated as zero (rank-deficient directions get the
   * minimum-norm solution). Default, as numpy.linalg.lstsq with rcond=None: eps·max(m, n).
   */
  rcond?: number;
}

export interface LstsqResult {
  x: Matrix;
  rank: number;
  singularValues: number[];
}

/**
 * Least-squares solution of A·x ≈ b (b may have several columns), minimum-norm when A is
 * rank-deficient — the same answer numpy.linalg.lstsq gives. Tall A is first reduced by a
 * Householder QR and only R goes through the SVD.
 */
export function lstsq(A: Matrix, b: Matrix, options: LstsqOptions = {}): Matrix {
  return lstsqDetailed(A, b, options).x;
}

/** lstsq returning also the numerical rank and the singular values of A. */
export function lstsqDetailed(A: Matrix, b: Matrix, options: LstsqOptions = {}): LstsqResult {
  const m = A.rows;
  const n = A.columns;
  if (b.rows !== m) {
    throw new ModalInputError(`lstsq: A has ${m} rows but b has ${b.rows}`);
  }
  if (m === 0 || n === 0) throw new ModalInputError(`lstsq: the matrix is empty (${m}×${n})`);
  assertFiniteMatrix(A, 'lstsq (A)');
  assertFiniteMatrix(b, 'lstsq (b)');
  const a = new Float64Array(m * n);
  for (let i = 0; i < m; i++) for (let j = 0; j < n; j++) a[i * n + j] = A.get(i, j);
  const k = b.columns;
  const bb = new Float64Array(m * k);
  for (let i = 0; i < m; i++) for (let j = 0; j < k; j++) bb[i * k + j] = b.get(i, j);
  return lstsqArrays(a, m, n, bb, k, options.rcond ?? 2.220446049250313e-16 * Math.max(m, n));
}

/**
 * Back substitution R·x = (Qᵀb)[0..n) when R's diagonal shows the problem is far from rank
 * deficiency: min|R_ii| > 1e-9·max|R_ii|. (A triangular matrix is singular exactly when a diagonal
 * entry is zero, so rank deficiency shows up there; the margin covers near-deficiency in all but
 * contrived cases.) Returns null otherwise.
 */
function solveTriangularIfWellConditioned(r: Float64Array, n: number, b: Float64Array, k: number): Matrix | null {
  let dmax = 0;
  let dmin = Infinity;
  for (let i = 0; i < n; i++) {
    const d = Math.abs(r[i * n + i]);
    if (d > dmax) dmax = d;
    if (d < dmin) dmin = d;
  }
  if (!(dmax > 0) || dmin <= 1e-9 * dmax) return null;
  const x = new Matrix(n, k);
  const col = new Float64Array(n);
  for (let c = 0; c < k; c++) {
    for (let i = n - 1; i >= 0; i--) {
      let s = b[i * k + c];
      for (let j = i + 1; j < n; j++) s -= r[i * n + j] * col[j];
      col[i] = s / r[i * n + i];
    }
    for (let i = 0; i < n; i++) x.set(i, c, col[i]);
  }
  return x;
}

/**
 * Core of lstsq on row-major arrays (both consumed). x is n×k.
 * For m > n: QR, then SVD of the n×n R: x = V·S⁺·Uᵀ·(Qᵀb)[0..n). With `triangularFastPath`, a
 * well-conditioned R is solved by back substitution instead (same answer to rounding, no SVD;
 * `singularValues` is then empty and rank = n) — for internal callers in hot loops.
 * For m ≤ n: SVD of A directly (autoTranspose).
 */
export function lstsqArrays(
  a: Float64Array,
  m: number,
  n: number,
  b: Float64Array,
  k: number,
  rcond: number,
  triangularFastPath = false,
): LstsqResult {
  let core: Matrix;
  let rhs: Matrix;
  if (m > n) {
    householderInPlace(a, m, n, b, k);
    // Squared norms inside the QR overflow for data near 1e154 and beyond; a non-finite R would
    // make the SVD below iterate forever, so refuse instead.
    if (!allFinite(a, n * n) || !allFinite(b, n * k)) throw overflowError('lstsq');
    if (triangularFastPath) {
      const x = solveTriangularIfWellConditioned(a, n, b, k);
      if (x) return { x, rank: n, singularValues: [] };
    }
    core = new Matrix(n, n);
    for (let i = 0; i < n; i++) for (let j = i; j < n; j++) core.set(i, j, a[i * n + j]);
    rhs = new Matrix(n, k);
    for (let i = 0; i < n; i++) for (let j = 0; j < k; j++) rhs.set(i, j, b[i * k + j]);
  } else {
    core = new Matrix(m, n);
    for (let i = 0; i < m; i++) for (let j = 0; j < n; j++) core.set(i, j, a[i * n + j]);
    rhs = new Matrix(m, k);
    for (let i = 0; i < m; i++) for (let j = 0; j < k; j++) rhs.set(i, j, b[i * k + j]);
  }
  const dec = new SingularValueDecomposition(core, { autoTranspose: true });
  const s = dec.diagonal;
  const U = dec.leftSingularVectors;
  const V = dec.rightSingularVectors;
  const smax = s.length > 0 ? s[0] : 0;
  const cutoff = rcond * smax;
  let rank = 0;
  for (const sv of s) if (sv > cutoff && sv > 0) rank++;
  const x = new Matrix(n, k);
  const r = U.rows;
  for (let c = 0; c < k; c++) {
    for (let t = 0; t < rank; t++) {
      let dot = 0;
      for (let i = 0; i < r; i++) dot += U.get(i, t) * rhs.get(i, c);
      const w = dot / s[t];
      for (let j = 0; j < n; j++) x.set(j, c, x.get(j, c) + V.get(j, t) * w);
    }
  }
  return { x, rank, singularValues: s.slice() };
}

/** Complex helpers used by the estimators (kept tiny; no allocation-heavy class). */
export function cabs(z: Complex): number {
  return Math.hypot(z.re, z.im);
}

export function clog(z: Complex): Complex {
  return { re: Math.log(Math.hypot(z.re, z.im)), im: Math.atan2(z.im, z.re) };
}

export function cexp(z: Complex): Complex {
  const r = Math.exp(z.re);
  return { re: r * Math.cos(z.im), im: r * Math.sin(z.im) };
}

/**
 * Leading eigenpair of the symmetric-definite pencil A·w = λ·B·w (A symmetric, B symmetric
 * positive definite; row-major n×n): the w maximising the Rayleigh quotient wᵀAw / wᵀBw.
 * Cholesky B = L·Lᵀ, the symmetric eigenproblem of L⁻¹·A·L⁻ᵀ, back-substitution w = L⁻ᵀ·u
 * (textbook: Golub & Van Loan, Matrix Computations, §8.7). w is scaled so that wᵀBw = 1.
 * Throws ModalInputError when B is not positive definite or an entry is not finite.
 */
export function leadingGeneralizedEigenvector(A: Float64Array, B: Float64Array, n: number): { lambda: number; w: Float64Array } {
  if (!allFinite(A, n * n) || !allFinite(B, n * n)) {
    throw new ModalInputError('leadingGeneralizedEigenvector: every matrix entry must be a finite number');
  }
  // Cholesky, lower triangle, row-major
  const L = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = B[i * n + j];
      for (let k = 0; k < j; k++) s -= L[i * n + k] * L[j * n + k];
      if (i === j) {
        if (!(s > 0)) throw new ModalInputError('leadingGeneralizedEigenvector: B is not positive definite');
        L[i * n + i] = Math.sqrt(s);
      } else {
        L[i * n + j] = s / L[j * n + j];
      }
    }
  }
  // C = L⁻¹ A L⁻ᵀ: first X = L⁻¹ A (forward substitution per column), then C = X L⁻ᵀ = (L⁻¹ Xᵀ)ᵀ
  const X = new Float64Array(n * n);
  for (let c = 0; c < n; c++) {
    for (let i = 0; i < n; i++) {
      let s = A[i * n + c];
      for (let k = 0; k < i; k++) s -= L[i * n + k] * X[k * n + c];
      X[i * n + c] = s / L[i * n + i];
    }
  }
  const C = new Matrix(n, n);
  for (let r = 0; r < n; r++) {
    // row r of C = L⁻¹ applied to row r of X (as a column)
    const y = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      let s = X[r * n + i];
      for (let k = 0; k < i; k++) s -= L[i * n + k] * y[k];
      y[i] = s / L[i * n + i];
    }
    for (let i = 0; i < n; i++) C.set(r, i, y[i]);
  }
  // symmetrise against rounding before the symmetric solver
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < i; j++) {
      const v = 0.5 * (C.get(i, j) + C.get(j, i));
      C.set(i, j, v);
      C.set(j, i, v);
    }
  }
  const evd = new EigenvalueDecomposition(C, { assumeSymmetric: true });
  const ev = evd.realEigenvalues;
  let top = 0;
  for (let i = 1; i < n; i++) if (ev[i] > ev[top]) top = i;
  const V = evd.eigenvectorMatrix;
  const u = new Float64Array(n);
  let nu = 0;
  for (let i = 0; i < n; i++) {
    u[i] = V.get(i, top);
    nu += u[i] * u[i];
  }
  nu = Math.sqrt(nu) || 1;
  for (let i = 0; i < n; i++) u[i] /= nu;
  // w = L⁻ᵀ u (back substitution on Lᵀ)
  const w = new Float64Array(n);
  for (let i = n - 1; i >= 0; i--) {
    let s = u[i];
    for (let k = i + 1; k < n; k++) s -= L[k * n + i] * w[k];
    w[i] = s / L[i * n + i];
  }
  return { lambda: ev[top], w };
}
