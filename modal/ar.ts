// Autoregressive (AR) models for ambient mode estimation. Pure TypeScript.
//
// Convention (CHECKS.md §1): x[n] = −a1·x[n−1] − … − ap·x[n−p] + e[n], coefficient vector
// a = [1, a1, …, ap]. The poles are the roots of z^p + a1·z^{p−1} + … + ap (numpy.roots of a),
// and a discrete pole z maps to the continuous pole s = fs·ln z (exact, CHECKS.md §1):
// f = Im(s)/2π, ζ = −Re(s)/|s|.
//
// Estimators:
//  - Yule-Walker (autocorrelation method): biased autocovariances r[k] = (1/N)·Σ x[t]·x[t−k],
//    solved by the Levinson–Durbin recursion (textbook: Kay, Modern Spectral Estimation, 1988,
//    ch. 7). Always gives a stable (minimum-phase) model. Several channels share one AR
//    polynomial through the sum of their normalised autocorrelations (each channel's
//    autocovariance divided by its variance): the summed spectrum Σ|B_c|²/|A|² has the same poles.
//  - Least squares (covariance method): minimises Σ_c Σ_{t=p}^{N−1} (x_c[t] + Σ a_k x_c[t−k])²
//    over all channels at once (each channel scaled to unit variance), solved with lstsq.
//  - Model order by AIC / BIC / FPE from the Levinson prediction-error variances (Akaike 1974;
//    Schwarz 1978 — textbook criteria).
import { ModalInputError } from './errors';
import { balanceInPlace, lstsqArrays, polyRoots, type Complex } from './linalg';
import type { ModePole } from './types';

export interface ArModel {
  /** Model order p. */
  order: number;
  /** [1, a1, …, ap]. */
  a: Float64Array;
  /** Prediction-error (innovation) variance, in the units of the (normalised) input squared. */
  noiseVariance: number;
}

export interface LevinsonResult extends ArModel {
  /** Reflection coefficients k1…kp (|k| < 1 for a positive-definite autocovariance). */
  reflection: Float64Array;
  /** Prediction-error variance for orders 0…p (errorByOrder[0] = r[0]). */
  errorByOrder: Float64Array;
}

function checkSeries(x: ArrayLike<number>, what: string): void {
  if (x.length === 0) throw new ModalInputError(`${what} is empty`);
  for (let i = 0; i < x.length; i++) {
    if (!Number.isFinite(x[i])) throw new ModalInputError(`${what} has a non-finite sample at index ${i} (${x[i]})`);
  }
}

function checkOrder(order: number, fn: string): void {
  if (!Number.isInteger(order) || order < 1) throw new ModalInputError(`${fn}: order must be a positive integer, got ${order}`);
}

/**
 * Biased autocovariance r[k] = (1/N)·Σ_{t=k}^{N−1} (x[t] − m)(x[t−k] − m), k = 0…maxLag
 * (m = mean when `demean`, default true; else 0). Same as numpy.correlate(x−m, x−m, 'full')/N.
 */
export function autocovariance(x: ArrayLike<number>, maxLag: number, demean = true): Float64Array {
  checkSeries(x, 'autocovariance: the series');
  const n = x.length;
  if (!Number.isInteger(maxLag) || maxLag < 0 || maxLag >= n) {
    throw new ModalInputError(`autocovariance: maxLag must be an integer from 0 to ${n - 1} (series length − 1), got ${maxLag}`);
  }
  let m = 0;
  if (demean) {
    for (let i = 0; i < n; i++) m += x[i];
    m /= n;
  }
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) y[i] = x[i] - m;
  const r = new Float64Array(maxLag + 1);
  for (let k = 0; k <= maxLag; k++) {
    let s = 0;
    for (let t = k; t < n; t++) s += y[t] * y[t - k];
    r[k] = s / n;
  }
  return r;
}

/**
 * Levinson–Durbin recursion: solves the Yule-Walker equations Σ_j a_j·r[|k−j|] = −r[k],
 * k = 1…p, for a Toeplitz autocovariance r[0…p] (same solution as
 * scipy.linalg.solve_toeplitz(r[:p], −r[1:p+1])). Throws when r[0] ≤ 0 or the recursion breaks
 * down (|reflection| ≥ 1: the sequence is not positive definite).
 */
export function levinsonDurbin(r: ArrayLike<number>, order: number): LevinsonResult {
  checkOrder(order, 'levinsonDurbin');
  if (r.length < order + 1) {
    throw new ModalInputError(`levinsonDurbin: order ${order} needs autocovariances up to lag ${order}, got ${r.length - 1}`);
  }
  if (!(r[0] > 0) || !Number.isFinite(r[0])) {
    throw new ModalInputError(`levinsonDurbin: r[0] must be a positive finite variance, got ${r[0]}`);
  }
  const a = new Float64Array(order + 1);
  const tmp = new Float64Array(order + 1);
  const refl = new Float64Array(order);
  const errs = new Float64Array(order + 1);
  a[0] = 1;
  let err = r[0];
  errs[0] = err;
  for (let m = 1; m <= order; m++) {
    let acc = r[m];
    for (let j = 1; j < m; j++) acc += a[j] * r[m - j];
    const k = -acc / err;
    if (!Number.isFinite(k) || Math.abs(k) >= 1) {
      throw new ModalInputError(
        `levinsonDurbin: the autocovariance is not positive definite at order ${m} (reflection coefficient ${k})`,
      );
    }
    refl[m - 1] = k;
    tmp.set(a);
    for (let j = 1; j < m; j++) a[j] = tmp[j] + k * tmp[m - j];
    a[m] = k;
    err *= 1 - k * k;
    errs[m] = err;
  }
  return { order, a, noiseVariance: err, reflection: refl, errorByOrder: errs };
}

/** One channel or several channels of equal length (sharing one AR polynomial). */
export type ArInput = ArrayLike<number> | ArrayLike<number>[];

function asChannels(x: ArInput): ArrayLike<number>[] {
  if (x.length > 0 && typeof (x as ArrayLike<unknown>)[0] !== 'number') return x as ArrayLike<number>[];
  return [x as ArrayLike<number>];
}

/**
 * Sum of the normalised biased autocovariances of several channels: Σ_c r_c[k]/r_c[0], divided
 * by the number of channels (so lag 0 is 1). A single channel gives its autocorrelation.
 */
export function pooledAutocorrelation(channels: ArrayLike<number>[], maxLag: number, demean = true): Float64Array {
  if (channels.length === 0) throw new ModalInputError('pooledAutocorrelation: no channels given');
  const out = new Float64Array(maxLag + 1);
  channels.forEach((x, c) => {
    const r = autocovariance(x, maxLag, demean);
    if (!(r[0] > 0)) throw new ModalInputError(`pooledAutocorrelation: channel ${c} is constant (zero variance)`);
    for (let k = 0; k <= maxLag; k++) out[k] += r[k] / r[0];
  });
  for (let k = 0; k <= maxLag; k++) out[k] /= channels.length;
  return out;
}

/**
 * Yule-Walker AR(p) estimate of one channel, or of several channels sharing one polynomial
 * (pooled normalised autocorrelations; noiseVariance is then relative to unit channel variance).
 */
export function yuleWalker(x: ArInput, order: number, demean = true): ArModel {
  checkOrder(order, 'yuleWalker');
  const channels = asChannels(x);
  const n = channels[0].length;
  for (const c of channels) {
    if (c.length !== n) throw new ModalInputError(`yuleWalker: channels differ in length (${n} and ${c.length} samples)`);
  }
  if (n <= order) throw new ModalInputError(`yuleWalker: order ${order} needs more than ${order} samples, got ${n}`);
  const r = channels.length === 1 ? autocovariance(channels[0], order, demean) : pooledAutocorrelation(channels, order, demean);
  if (!(r[0] > 0)) throw new ModalInputError('yuleWalker: the series is constant (zero variance)');
  const { a, noiseVariance } = levinsonDurbin(r, order);
  return { order, a, noiseVariance };
}

/**
 * Least-squares (covariance-method) AR(p): rows t = p…N−1 of every channel, x[t] regressed on
 * −x[t−1…t−p]. Several channels are each scaled to unit variance and stacked, sharing one
 * polynomial. Same solution as numpy.linalg.lstsq on the stacked system.
 */
export function arLeastSquares(x: ArInput, order: number, demean = true): ArModel {
  checkOrder(order, 'arLeastSquares');
  const channels = asChannels(x);
  const n = channels[0].length;
  if (n <= 2 * order) throw new ModalInputError(`arLeastSquares: order ${order} needs more than ${2 * order} samples, got ${n}`);
  const rowsPer = n - order;
  const m = rowsPer * channels.length;
  const A = new Float64Array(m * order);
  const b = new Float64Array(m);
  channels.forEach((xc, c) => {
    if (xc.length !== n) throw new ModalInputError(`arLeastSquares: channels differ in length (${n} and ${xc.length} samples)`);
    checkSeries(xc, `arLeastSquares: channel ${c}`);
    let mean = 0;
    if (demean) {
      for (let i = 0; i < n; i++) mean += xc[i];
      mean /= n;
    }
    let v = 0;
    for (let i = 0; i < n; i++) v += (xc[i] - mean) ** 2;
    const scale = channels.length > 1 ? (v > 0 ? 1 / Math.sqrt(v / n) : 0) : 1;
    if (v === 0) throw new ModalInputError(`arLeastSquares: channel ${c} is constant (zero variance)`);
    for (let t = order; t < n; t++) {
      const row = c * rowsPer + (t - order);
      b[row] = (xc[t] - mean) * scale;
      for (let k = 1; k <= order; k++) A[row * order + k - 1] = -(xc[t - k] - mean) * scale;
    }
  });
  const bCopy = b.slice();
  const Acopy = A.slice();
  const res = lstsqArrays(A, m, order, b, 1, 2.220446049250313e-16 * Math.max(m, order));
  const a = new Float64Array(order + 1);
  a[0] = 1;
  for (let k = 1; k <= order; k++) a[k] = res.x.get(k - 1, 0);
  let sse = 0;
  for (let row = 0; row < m; row++) {
    let pred = 0;
    for (let k = 0; k < order; k++) pred += Acopy[row * order + k] * a[k + 1];
    sse += (bCopy[row] - pred) ** 2;
  }
  return { order, a, noiseVariance: sse / m };
}

export type OrderCriterion = 'aic' | 'bic' | 'fpe';

/**
 * Chooses the AR order in 1…maxOrder minimising the criterion over the Levinson prediction-error
 * variances σ²_p of autocovariance r, for N samples:
 *   AIC = N·ln σ²_p + 2p;  BIC = N·ln σ²_p + p·ln N;  FPE = σ²_p·(N + p + 1)/(N − p − 1).
 */
export function selectArOrder(
  r: ArrayLike<number>,
  maxOrder: number,
  n: number,
  criterion: OrderCriterion = 'aic',
): { order: number; scores: Float64Array } {
  checkOrder(maxOrder, 'selectArOrder');
  if (!Number.isInteger(n) || n <= maxOrder + 1) {
    throw new ModalInputError(`selectArOrder: the sample count must be an integer above maxOrder + 1 (${maxOrder + 1}), got ${n}`);
  }
  const lev = levinsonDurbin(r, maxOrder);
  const scores = new Float64Array(maxOrder);
  let best = 1;
  for (let p = 1; p <= maxOrder; p++) {
    const e = lev.errorByOrder[p];
    let s: number;
    if (criterion === 'aic') s = n * Math.log(e) + 2 * p;
    else if (criterion === 'bic') s = n * Math.log(e) + p * Math.log(n);
    else s = (e * (n + p + 1)) / (n - p - 1);
    scores[p - 1] = s;
    if (s < scores[best - 1]) best = p;
  }
  return { order: best, scores };
}

/**
 * Eigenvalues of a real upper Hessenberg matrix (1-based (n+1)×(n+1) row arrays, consumed) by the
 * Francis double-shift QR iteration — the EISPACK hqr algorithm (textbook: Press et al.,
 * Numerical Recipes, 2nd ed., §11.6). Returns null if an eigenvalue fails to converge.
 */
function hqr(a: Float64Array[], n: number): Complex[] | null {
  const wr = new Float64Array(n + 1);
  const wi = new Float64Array(n + 1);
  let anorm = 0;
  for (let i = 1; i <= n; i++) for (let j = Math.max(i - 1, 1); j <= n; j++) anorm += Math.abs(a[i][j]);
  let nn = n;
  let t = 0;
  let p = 0, q = 0, r = 0, s = 0, w = 0, x = 0, y = 0, z = 0;
  while (nn >= 1) {
    let its = 0;
    let l: number;
    do {
      for (l = nn; l >= 2; l--) {
        s = Math.abs(a[l - 1][l - 1]) + Math.abs(a[l][l]);
        if (s === 0) s = anorm;
        if (Math.abs(a[l][l - 1]) + s === s) {
          a[l][l - 1] = 0;
          break;
        }
      }
      x = a[nn][nn];
      if (l === nn) {
        wr[nn] = x + t;
        wi[nn--] = 0;
      } else {
        y = a[nn - 1][nn - 1];
        w = a[nn][nn - 1] * a[nn - 1][nn];
        if (l === nn - 1) {
          p = 0.5 * (y - x);
          q = p * p + w;
          z = Math.sqrt(Math.abs(q));
          x += t;
          if (q >= 0) {
            z = p + (p >= 0 ? Math.abs(z) : -Math.abs(z));
            wr[nn - 1] = wr[nn] = x + z;
            if (z) wr[nn] = x - w / z;
            wi[nn - 1] = wi[nn] = 0;
          } else {
            wr[nn - 1] = wr[nn] = x + p;
            wi[nn - 1] = -(wi[nn] = z);
          }
          nn -= 2;
        } else {
          if (its === 60) return null;
          if (its === 10 || its === 20 || its === 40) {
            // exceptional shift
            t += x;
            for (let i = 1; i <= nn; i++) a[i][i] -= x;
            s = Math.abs(a[nn][nn - 1]) + Math.abs(a[nn - 1][nn - 2]);
            y = x = 0.75 * s;
            w = -0.4375 * s * s;
          }
          ++its;
          let m: number;
          for (m = nn - 2; m >= l; m--) {
            z = a[m][m];
            r = x - z;
            s = y - z;
            p = (r * s - w) / a[m + 1][m] + a[m][m + 1];
            q = a[m + 1][m + 1] - z - r - s;
            r = a[m + 2][m + 1];
            s = Math.abs(p) + Math.abs(q) + Math.abs(r);
            p /= s;
            q /= s;
            r /= s;
            if (m === l) break;
            const u = Math.abs(a[m][m - 1]) * (Math.abs(q) + Math.abs(r));
            const v = Math.abs(p) * (Math.abs(a[m - 1][m - 1]) + Math.abs(z) + Math.abs(a[m + 1][m + 1]));
            if (u + v === v) break;
          }
          for (let i = m + 2; i <= nn; i++) {
            a[i][i - 2] = 0;
            if (i !== m + 2) a[i][i - 3] = 0;
          }
          for (let k = m; k <= nn - 1; k++) {
            if (k !== m) {
              p = a[k][k - 1];
              q = a[k + 1][k - 1];
              r = 0;
              if (k !== nn - 1) r = a[k + 2][k - 1];
              if ((x = Math.abs(p) + Math.abs(q) + Math.abs(r)) !== 0) {
                p /= x;
                q /= x;
                r /= x;
              }
            }
            const sq = Math.sqrt(p * p + q * q + r * r);
            s = p >= 0 ? sq : -sq;
            if (s !== 0) {
              if (k === m) {
                if (l !== m) a[k][k - 1] = -a[k][k - 1];
              } else a[k][k - 1] = -s * x;
              p += s;
              x = p / s;
              y = q / s;
              z = r / s;
              q /= p;
              r /= p;
              for (let j = k; j <= nn; j++) {
                p = a[k][j] + q * a[k + 1][j];
                if (k !== nn - 1) {
                  p += r * a[k + 2][j];
                  a[k + 2][j] -= p * z;
                }
                a[k + 1][j] -= p * y;
                a[k][j] -= p * x;
              }
              const mmin = nn < k + 3 ? nn : k + 3;
              for (let i = l; i <= mmin; i++) {
                p = x * a[i][k] + y * a[i][k + 1];
                if (k !== nn - 1) {
                  p += z * a[i][k + 2];
                  a[i][k + 2] -= p * r;
                }
                a[i][k + 1] -= p * q;
                a[i][k] -= p;
              }
            }
          }
        }
      }
    } while (l < nn - 1);
  }
  const out: Complex[] = new Array(n);
  for (let i = 1; i <= n; i++) out[i - 1] = { re: wr[i], im: wi[i] };
  return out;
}

/**
 * Roots of the AR polynomial z^p + a1·z^{p−1} + … + ap (same roots as numpy.roots(a)): eigenvalues
 * of the balanced companion matrix — already upper Hessenberg, so the QR iteration runs on it
 * directly (about 20× faster than a general eigen-solver at p = 30). Falls back to the general
 * solver (modal/linalg.ts polyRoots) in the rare case the iteration does not converge.
 */
export function arRoots(a: ArrayLike<number>): Complex[] {
  for (let i = 0; i < a.length; i++) {
    if (!Number.isFinite(a[i])) throw new ModalInputError(`arRoots: coefficient ${i} is ${a[i]}; every coefficient must be a finite number`);
  }
  let first = 0;
  while (first < a.length && a[first] === 0) first++;
  let last = a.length - 1;
  while (last >= first && a[last] === 0) last--;
  if (first > last) return [];
  const n = last - first;
  const zeros = a.length - 1 - last;
  const out: Complex[] = [];
  if (n > 0) {
    const flat = new Float64Array(n * n);
    for (let j = 0; j < n; j++) flat[j] = -a[first + 1 + j] / a[first];
    for (let i = 1; i < n; i++) flat[i * n + i - 1] = 1;
    balanceInPlace(flat, n);
    const rows: Float64Array[] = [new Float64Array(n + 1)];
    for (let i = 0; i < n; i++) {
      const row = new Float64Array(n + 1);
      for (let j = 0; j < n; j++) row[j + 1] = flat[i * n + j];
      rows.push(row);
    }
    const ev = hqr(rows, n);
    if (ev) out.push(...ev);
    else out.push(...polyRoots(Array.from(a).slice(first, last + 1)));
  }
  for (let i = 0; i < zeros; i++) out.push({ re: 0, im: 0 });
  return out;
}

/** Continuous-time modal quantities of a discrete pole z at sampling rate fs (s = fs·ln z). */
export function poleToMode(z: Complex, fs: number): ModePole {
  const sigma = fs * Math.log(Math.hypot(z.re, z.im));
  const omega = fs * Math.atan2(z.im, z.re);
  const mag = Math.hypot(sigma, omega);
  const zeta = mag > 0 ? -sigma / mag : 0;
  return { frequencyHz: omega / (2 * Math.PI), dampingRatio: zeta, dampingPercent: 100 * zeta, sigma, omega };
}

export interface ArModeOptions {
  /** Keep poles with frequency in [minHz, maxHz]. Default 0 … fs/2. */
  minHz?: number;
  maxHz?: number;
}

/** Upper-half-plane poles of an AR model as modes (with their discrete pole z), by frequency. */
export function arModes(a: ArrayLike<number>, fs: number, opts: ArModeOptions = {}): (ModePole & { z: Complex })[] {
  const { minHz = 0, maxHz = fs / 2 } = opts;
  const out: (ModePole & { z: Complex })[] = [];
  for (const z of arRoots(a)) {
    if (!(z.im > 0)) continue;
    const m = poleToMode(z, fs);
    if (m.frequencyHz >= minHz && m.frequencyHz <= maxHz) out.push({ ...m, z });
  }
  out.sort((p, q) => p.frequencyHz - q.frequencyHz);
  return out;
}

/**
 * Newton refinement of a root of the AR polynomial z^p + a1·z^{p−1} + … + ap from a starting
 * point z0 (e.g. the same pole of a neighbouring model). Returns null when it does not converge
 * within maxIter steps or wanders more than `maxMove` (in |z|) from z0.
 */
export function refineArRoot(a: ArrayLike<number>, z0: Complex, maxIter = 30, maxMove = 0.2): Complex | null {
  let zr = z0.re;
  let zi = z0.im;
  const p = a.length - 1;
  for (let it = 0; it < maxIter; it++) {
    // Horner for P(z) and P'(z)
    let pr = a[0];
    let pi = 0;
    let dr = 0;
    let di = 0;
    for (let k = 1; k <= p; k++) {
      // d = d·z + P
      const ndr = dr * zr - di * zi + pr;
      const ndi = dr * zi + di * zr + pi;
      dr = ndr;
      di = ndi;
      // P = P·z + a_k
      const npr = pr * zr - pi * zi + a[k];
      const npi = pr * zi + pi * zr;
      pr = npr;
      pi = npi;
    }
    const den = dr * dr + di * di;
    if (!(den > 0)) return null;
    const stepR = (pr * dr + pi * di) / den;
    const stepI = (pi * dr - pr * di) / den;
    zr -= stepR;
    zi -= stepI;
    if (!Number.isFinite(zr) || !Number.isFinite(zi) || Math.hypot(zr - z0.re, zi - z0.im) > maxMove) return null;
    if (Math.hypot(stepR, stepI) <= 1e-13 * Math.max(1, Math.hypot(zr, zi))) return { re: zr, im: zi };
  }
  return null;
}

/**
 * Modified (high-lag) Yule-Walker: the AR part a = [1, a1, …, ap] of an ARMA(p, q) process from its
 * autocovariance, by least squares on the extended Yule-Walker equations
 *     r[k] + a1·r[k−1] + … + ap·r[k−p] = 0,   k = firstLag … firstLag + equations − 1,
 * which hold exactly for k > q (textbook: Stoica & Moses, Spectral Analysis of Signals, 2005, §3.7;
 * paper: Pierre, Trudnowski & Donnelly, IEEE Trans. Power Systems 12(3), 1997, for ambient modes).
 * Lags at or below the MA order — where white measurement noise and the moving-average part of a
 * sampled mode sit — never enter, so a low order p describes a mode without the surplus poles an
 * all-pole fit needs for them. Same solution as numpy.linalg.lstsq on the same equations.
 */
export function modifiedYuleWalker(r: ArrayLike<number>, order: number, firstLag: number, equations: number): Float64Array {
  checkOrder(order, 'modifiedYuleWalker');
  if (!Number.isInteger(firstLag) || firstLag < 1) {
    throw new ModalInputError(`modifiedYuleWalker: firstLag must be a positive integer, got ${firstLag}`);
  }
  if (!Number.isInteger(equations) || equations < order) {
    throw new ModalInputError(`modifiedYuleWalker: equations must be an integer ≥ order ${order}, got ${equations}`);
  }
  const last = firstLag + equations - 1;
  if (r.length < last + 1) {
    throw new ModalInputError(`modifiedYuleWalker: the equations need autocovariances up to lag ${last}, got ${r.length - 1}`);
  }
  for (let k = 0; k <= last; k++) {
    if (!Number.isFinite(r[k])) throw new ModalInputError(`modifiedYuleWalker: r[${k}] is ${r[k]}; every lag must be finite`);
  }
  const A = new Float64Array(equations * order);
  const b = new Float64Array(equations);
  for (let e = 0; e < equations; e++) {
    const k = firstLag + e;
    for (let j = 1; j <= order; j++) A[e * order + j - 1] = r[Math.abs(k - j)];
    b[e] = -r[k];
  }
  const x = lstsqArrays(A, equations, order, b, 1, 2.220446049250313e-16 * equations, true).x;
  const a = new Float64Array(order + 1);
  a[0] = 1;
  for (let j = 0; j < order; j++) a[j + 1] = x.get(j, 0);
  return a;
}

/** AR power spectral density σ²/(fs·|A(e^{iω/fs})|²) (two-sided density per Hz) at frequencies f. */
export function arSpectrum(model: ArModel, fs: number, frequencies: ArrayLike<number>): Float64Array {
  const out = new Float64Array(frequencies.length);
  for (let i = 0; i < frequencies.length; i++) {
    const w = (2 * Math.PI * frequencies[i]) / fs;
    let re = 0;
    let im = 0;
    for (let k = 0; k <= model.order; k++) {
      re += model.a[k] * Math.cos(w * k);
      im -= model.a[k] * Math.sin(w * k);
    }
    out[i] = model.noiseVariance / (fs * (re * re + im * im));
  }
  return out;
}
