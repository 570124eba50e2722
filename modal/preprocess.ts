// Preprocessing of PMU channels before modal estimation: angle unwrapping, angle differences,
// detrending, zero-phase Butterworth band-pass, anti-alias decimation, gap handling, data-quality
// flags, reporting-rate and timestamp checks. Pure TypeScript.
//
// The filter design and zero-phase filtering reproduce scipy.signal (library: scipy 1.10,
// butter / cheby1 with output='sos', zpk2sos pairing 'nearest', sosfiltfilt with its default odd
// padding, decimate ftype='iir' zero_phase=True) step by step, so results agree with scipy to
// rounding; the tests check that against Debian's scipy.
import { ModalInputError } from './errors';
import type { WindowQuality } from './types';

// ---------------------------------------------------------------------------------------------
// Angles

/**
 * Unwraps an angle series in degrees: whenever the step between consecutive samples exceeds
 * 180° in magnitude, multiples of 360° are added so that the step lies in [−180°, 180°] — the
 * rule of numpy.unwrap(x, period=360) (library). Unlike numpy, NaN samples (dropouts) stay NaN and
 * do not poison the rest: the unwrapping continues from the last finite sample.
 */
export function unwrapDeg(x: Float64Array): Float64Array {
  const out = new Float64Array(x.length);
  let offset = 0;
  let prev = NaN;
  for (let i = 0; i < x.length; i++) {
    const v = x[i];
    if (!Number.isFinite(v)) {
      out[i] = NaN;
      continue;
    }
    if (Number.isFinite(prev)) {
      const dd = v - prev;
      // numpy: ddmod = mod(dd + 180, 360) − 180, with −180 mapped to +180 when dd > 0
      let ddmod = floorMod(dd + 180, 360) - 180;
      if (ddmod === -180 && dd > 0) ddmod = 180;
      if (Math.abs(dd) >= 180) offset += ddmod - dd;
    }
    out[i] = v + offset;
    prev = v;
  }
  return out;
}

function floorMod(a: number, m: number): number {
  const r = a % m;
  return r < 0 ? r + m : r;
}

/** Wraps degrees to (−180, 180]. */
export function wrapDeg(a: number): number {
  const w = floorMod(a + 180, 360) - 180; // [−180, 180)
  return w === -180 ? 180 : w;
}

/**
 * Angle difference a − ref in degrees for two angle series of equal length (e.g. a PMU's voltage
 * angle against the reference PMU): each sample's difference is wrapped to (−180°, 180°], then the
 * series is unwrapped, so the result is continuous even when either input wraps. NaN in either
 * input gives NaN at that sample.
 */
export function angleDifferenceDeg(a: Float64Array, ref: Float64Array): Float64Array {
  if (a.length !== ref.length) {
    throw new ModalInputError(`angleDifferenceDeg: the channel has ${a.length} samples but the reference has ${ref.length}`);
  }
  const d = new Float64Array(a.length);
  for (let i = 0; i < a.length; i++) {
    const v = a[i] - ref[i];
    d[i] = Number.isFinite(v) ? wrapDeg(v) : NaN;
  }
  return unwrapDeg(d);
}

// ---------------------------------------------------------------------------------------------
// Detrending

export type DetrendKind = 'none' | 'constant' | 'linear';

/**
 * Removes the mean ('constant') or the least-squares straight line ('linear') as
 * scipy.signal.detrend does (library); 'none' returns a copy. The fit uses only the finite samples;
 * NaN samples stay NaN.
 */
export function detrend(x: Float64Array, kind: DetrendKind = 'linear'): Float64Array {
  const n = x.length;
  const out = new Float64Array(n);
  if (kind === 'none') {
    out.set(x);
    return out;
  }
  let count = 0;
  let sumX = 0;
  let sumT = 0;
  for (let i = 0; i < n; i++) {
    if (Number.isFinite(x[i])) {
      count++;
      sumX += x[i];
      sumT += i;
    }
  }
  if (count === 0) {
    out.fill(NaN);
    return out;
  }
  const meanX = sumX / count;
  if (kind === 'constant' || count < 2) {
    for (let i = 0; i < n; i++) out[i] = x[i] - meanX;
    return out;
  }
  // Centred normal equations (numerically benign: t is centred before squaring).
  const meanT = sumT / count;
  let stt = 0;
  let stx = 0;
  for (let i = 0; i < n; i++) {
    if (Number.isFinite(x[i])) {
      const dt = i - meanT;
      stt += dt * dt;
      stx += dt * (x[i] - meanX);
    }
  }
  const slope = stt > 0 ? stx / stt : 0;
  for (let i = 0; i < n; i++) out[i] = x[i] - meanX - slope * (i - meanT);
  return out;
}

// ---------------------------------------------------------------------------------------------
// IIR filter design (scipy.signal.iirfilter pipeline, digital, output='sos')

/** Second-order sections, each [b0, b1, b2, a0, a1, a2] (a0 = 1), applied in order. */
export type Sos = number[][];

interface C {
  re: number;
  im: number;
}
const cx = (re: number, im = 0): C => ({ re, im });
const cadd = (a: C, b: C): C => cx(a.re + b.re, a.im + b.im);
const csub = (a: C, b: C): C => cx(a.re - b.re, a.im - b.im);
const cmul = (a: C, b: C): C => cx(a.re * b.re - a.im * b.im, a.re * b.im + a.im * b.re);
const cscale = (a: C, s: number): C => cx(a.re * s, a.im * s);
const cdiv = (a: C, b: C): C => {
  const d = b.re * b.re + b.im * b.im;
  return cx((a.re * b.re + a.im * b.im) / d, (a.im * b.re - a.re * b.im) / d);
};
const cabs = (a: C): number => Math.hypot(a.re, a.im);
const cconj = (a: C): C => cx(a.re, -a.im);
/** Principal square root (as numpy.sqrt on complex). */
const csqrt = (a: C): C => {
  if (a.re === 0 && a.im === 0) return cx(0, 0);
  const r = cabs(a);
  const re = Math.sqrt((r + Math.abs(a.re)) / 2);
  if (a.re >= 0) return cx(re, a.im / (2 * re));
  const im = a.im < 0 || (a.im === 0 && Object.is(a.im, -0)) ? -re : re;
  return cx(Math.abs(a.im) / (2 * re), im);
};

interface Zpk {
  z: C[];
  p: C[];
  k: number;
}

function buttap(n: number): Zpk {
  const p: C[] = [];
  for (let m = -n + 1; m < n; m += 2) {
    const th = (Math.PI * m) / (2 * n);
    p.push(cx(-Math.cos(th), -Math.sin(th)));
  }
  return { z: [], p, k: 1 };
}

function cheb1ap(n: number, rp: number): Zpk {
  const eps = Math.sqrt(Math.pow(10, 0.1 * rp) - 1);
  const mu = Math.asinh(1 / eps) / n;
  const p: C[] = [];
  for (let m = -n + 1; m < n; m += 2) {
    const th = (Math.PI * m) / (2 * n);
    // −sinh(mu + j·th) = −(sinh mu cos th + j cosh mu sin th)
    p.push(cx(-Math.sinh(mu) * Math.cos(th), -Math.cosh(mu) * Math.sin(th)));
  }
  let prod = cx(1, 0);
  for (const q of p) prod = cmul(prod, cscale(q, -1));
  let k = prod.re;
  if (n % 2 === 0) k /= Math.sqrt(1 + eps * eps);
  return { z: [], p, k };
}

function lp2lp(f: Zpk, wo: number): Zpk {
  const degree = f.p.length - f.z.length;
  return { z: f.z.map((q) => cscale(q, wo)), p: f.p.map((q) => cscale(q, wo)), k: f.k * Math.pow(wo, degree) };
}

function lp2bp(f: Zpk, wo: number, bw: number): Zpk {
  const degree = f.p.length - f.z.length;
  const shift = (arr: C[]): C[] => {
    const lp = arr.map((q) => cscale(q, bw / 2));
    const plus = lp.map((q) => cadd(q, csqrt(csub(cmul(q, q), cx(wo * wo)))));
    const minus = lp.map((q) => csub(q, csqrt(csub(cmul(q, q), cx(wo * wo)))));
    return [...plus, ...minus];
  };
  const z = shift(f.z);
  for (let i = 0; i < degree; i++) z.push(cx(0, 0));
  return { z, p: shift(f.p), k: f.k * Math.pow(bw, degree) };
}

function bilinear(f: Zpk, fs: number): Zpk {
  const degree = f.p.length - f.z.length;
  const fs2 = cx(2 * fs);
  const z = f.z.map((q) => cdiv(cadd(fs2, q), csub(fs2, q)));
  const p = f.p.map((q) => cdiv(cadd(fs2, q), csub(fs2, q)));
  for (let i = 0; i < degree; i++) z.push(cx(-1));
  let num = cx(1);
  for (const q of f.z) num = cmul(num, csub(fs2, q));
  let den = cx(1);
  for (const q of f.p) den = cmul(den, csub(fs2, q));
  return { z, p, k: f.k * cdiv(num, den).re };
}

/** scipy's _cplxreal: one member (positive imaginary part) per conjugate pair, then the reals. */
function cplxreal(arr: C[]): { c: C[]; r: number[] } {
  const tol = 100 * 2.220446049250313e-16;
  const sorted = [...arr].sort((a, b) => a.re - b.re || Math.abs(a.im) - Math.abs(b.im));
  const r: number[] = [];
  const pos: C[] = [];
  const neg: C[] = [];
  for (const q of sorted) {
    if (Math.abs(q.im) <= tol * cabs(q)) r.push(q.re);
    else if (q.im > 0) pos.push(q);
    else neg.push(q);
  }
  if (pos.length !== neg.length) throw new Error('filter design: a complex value has no matching conjugate');
  // Runs of equal real part are sorted by |imag| (already so by the sort above).
  const c = pos.map((q, i) => cscale(cadd(q, cconj(neg[i])), 0.5));
  r.sort((a, b) => a - b);
  return { c, r };
}

interface Root {
  v: C;
  real: boolean;
}

function polyOf(roots: Root[]): number[] {
  // numpy.poly: successive convolution with [1, −root], then the real part (roots come in pairs)
  let a: C[] = [cx(1)];
  for (const root of roots) {
    const next: C[] = new Array(a.length + 1).fill(null).map(() => cx(0));
    for (let i = 0; i < a.length; i++) {
      next[i] = cadd(next[i], a[i]);
      next[i + 1] = csub(next[i + 1], cmul(a[i], root.v));
    }
    a = next;
  }
  return a.map((q) => q.re);
}

function singleSection(z: Root[], p: Root[]): number[] {
  const sos = [0, 0, 0, 0, 0, 0];
  const b = polyOf(z);
  const a = polyOf(p);
  for (let i = 0; i < b.length; i++) sos[3 - b.length + i] = b[i];
  for (let i = 0; i < a.length; i++) sos[6 - a.length + i] = a[i];
  return sos;
}

/** scipy.signal.zpk2sos, digital, pairing 'nearest' (the default for digital filters). */
function zpk2sos(f: Zpk): Sos {
  let p = [...f.p];
  let z = [...f.z];
  if (z.length === 0 && p.length === 0) return [[f.k, 0, 0, 1, 0, 0]];
  while (p.length < z.length) p.push(cx(0));
  while (z.length < p.length) z.push(cx(0));
  const nSections = Math.floor((Math.max(p.length, z.length) + 1) / 2);
  if (p.length % 2 === 1) {
    p.push(cx(0));
    z.push(cx(0));
  }
  const toRoots = (arr: C[]): Root[] => {
    const { c, r } = cplxreal(arr);
    return [...c.map((v) => ({ v, real: false })), ...r.map((v) => ({ v: cx(v), real: true }))];
  };
  let P = toRoots(p);
  let Z = toRoots(z);
  const idxWorst = (arr: Root[]): number => {
    let best = 0;
    let bestD = Infinity;
    arr.forEach((q, i) => {
      const d = Math.abs(1 - cabs(q.v));
      if (d < bestD) {
        bestD = d;
        best = i;
      }
    });
    return best;
  };
  const nearest = (arr: Root[], to: C, which: 'real' | 'complex' | 'any'): number => {
    const order = arr.map((q, i) => ({ i, d: cabs(csub(q.v, to)) })).sort((a, b) => a.d - b.d || a.i - b.i);
    for (const o of order) {
      if (which === 'any' || (which === 'real') === arr[o.i].real) return o.i;
    }
    throw new Error('filter design: no zero to pair');
  };
  const take = (arr: Root[], i: number): [Root, Root[]] => [arr[i], [...arr.slice(0, i), ...arr.slice(i + 1)]];
  const sos: Sos = new Array(nSections);
  for (let si = nSections - 1; si >= 0; si--) {
    let p1: Root;
    [p1, P] = take(P, idxWorst(P));
    const realLeft = P.filter((q) => q.real).length;
    if (p1.real && realLeft === 0) {
      let z1: Root;
      [z1, Z] = take(Z, nearest(Z, p1.v, 'real'));
      sos[si] = singleSection([z1, { v: cx(0), real: true }], [p1, { v: cx(0), real: true }]);
    } else if (P.length + 1 === Z.length && !p1.real && realLeft === 1 && Z.filter((q) => q.real).length === 1) {
      let z1: Root;
      [z1, Z] = take(Z, nearest(Z, p1.v, 'complex'));
      sos[si] = singleSection([z1, { v: cconj(z1.v), real: false }], [p1, { v: cconj(p1.v), real: false }]);
    } else {
      let p2: Root;
      if (p1.real) {
        const realIdx = P.map((q, i) => (q.real ? i : -1)).filter((i) => i >= 0);
        const w = realIdx[idxWorst(realIdx.map((i) => P[i]))];
        [p2, P] = take(P, w);
      } else {
        p2 = { v: cconj(p1.v), real: false };
      }
      if (Z.length > 0) {
        let z1: Root;
        [z1, Z] = take(Z, nearest(Z, p1.v, 'any'));
        if (!z1.real) {
          sos[si] = singleSection([z1, { v: cconj(z1.v), real: false }], [p1, p2]);
        } else if (Z.length > 0) {
          let z2: Root;
          [z2, Z] = take(Z, nearest(Z, p1.v, 'real'));
          sos[si] = singleSection([z1, z2], [p1, p2]);
        } else {
          sos[si] = singleSection([z1], [p1, p2]);
        }
      } else {
        sos[si] = singleSection([], [p1, p2]);
      }
    }
  }
  for (let j = 0; j < 3; j++) sos[0][j] *= f.k;
  return sos;
}

function checkOrder(order: number, fn: string): void {
  if (!Number.isInteger(order) || order < 1 || order > 20) {
    throw new ModalInputError(`${fn}: order must be an integer from 1 to 20, got ${order}`);
  }
}

function checkRate(fs: number, fn: string): void {
  if (!Number.isFinite(fs) || fs <= 0) throw new ModalInputError(`${fn}: sampling rate must be a positive number, got ${fs}`);
}

/**
 * Digital Butterworth band-pass as second-order sections, identical in design to
 * scipy.signal.butter(order, [lowHz, highHz], 'bandpass', fs=fs, output='sos') (library): analog
 * prototype, pre-warped band edges, bilinear transform, nearest pole–zero pairing. The filter has
 * 2·order poles (order sections).
 */
export function butterBandpassSos(order: number, lowHz: number, highHz: number, fs: number): Sos {
  checkOrder(order, 'butterBandpassSos');
  checkRate(fs, 'butterBandpassSos');
  if (!(lowHz > 0 && lowHz < highHz && highHz < fs / 2)) {
    throw new ModalInputError(
      `butterBandpassSos: band edges must satisfy 0 < lowHz < highHz < fs/2 = ${fs / 2} Hz, got ${lowHz} and ${highHz} Hz`,
    );
  }
  // scipy normalises to fs = 2: Wn = 2f/fs, warped = 4·tan(π·Wn/2)
  const w1 = 4 * Math.tan((Math.PI * (2 * lowHz) / fs) / 2);
  const w2 = 4 * Math.tan((Math.PI * (2 * highHz) / fs) / 2);
  const f = lp2bp(buttap(order), Math.sqrt(w1 * w2), w2 - w1);
  return zpk2sos(bilinear(f, 2));
}

/** Digital Butterworth low-pass, as scipy.signal.butter(order, cutoffHz, fs=fs, output='sos'). */
export function butterLowpassSos(order: number, cutoffHz: number, fs: number): Sos {
  checkOrder(order, 'butterLowpassSos');
  checkRate(fs, 'butterLowpassSos');
  if (!(cutoffHz > 0 && cutoffHz < fs / 2)) {
    throw new ModalInputError(`butterLowpassSos: cutoff must satisfy 0 < cutoffHz < fs/2 = ${fs / 2} Hz, got ${cutoffHz} Hz`);
  }
  const w = 4 * Math.tan((Math.PI * (2 * cutoffHz) / fs) / 2);
  return zpk2sos(bilinear(lp2lp(buttap(order), w), 2));
}

/**
 * Digital Chebyshev type I low-pass, as scipy.signal.cheby1(order, rippleDb, wn, output='sos')
 * with wn the cutoff as a fraction of the Nyquist frequency.
 */
export function cheby1LowpassSos(order: number, rippleDb: number, wn: number): Sos {
  checkOrder(order, 'cheby1LowpassSos');
  if (!(wn > 0 && wn < 1)) throw new ModalInputError(`cheby1LowpassSos: wn must lie in (0, 1), got ${wn}`);
  const w = 4 * Math.tan((Math.PI * wn) / 2);
  return zpk2sos(bilinear(lp2lp(cheb1ap(order, rippleDb), w), 2));
}

// ---------------------------------------------------------------------------------------------
// Filtering

/**
 * Causal filtering through second-order sections in transposed direct form II (as
 * scipy.signal.sosfilt). `zi` (n_sections × 2, flattened) is the initial state and is updated in
 * place to the final state. Writes into `out` (may alias `x`).
 */
export function sosfiltInPlace(sos: Sos, x: Float64Array, zi: Float64Array, out: Float64Array = x): Float64Array {
  const ns = sos.length;
  const n = x.length;
  // Unpack coefficients once; the inner loop is per sample per section.
  const c = new Float64Array(ns * 5);
  for (let s = 0; s < ns; s++) {
    const a0 = sos[s][3];
    c[s * 5] = sos[s][0] / a0;
    c[s * 5 + 1] = sos[s][1] / a0;
    c[s * 5 + 2] = sos[s][2] / a0;
    c[s * 5 + 3] = sos[s][4] / a0;
    c[s * 5 + 4] = sos[s][5] / a0;
  }
  for (let i = 0; i < n; i++) {
    let v = x[i];
    for (let s = 0; s < ns; s++) {
      const o = s * 5;
      const y = c[o] * v + zi[2 * s];
      zi[2 * s] = c[o + 1] * v - c[o + 3] * y + zi[2 * s + 1];
      zi[2 * s + 1] = c[o + 2] * v - c[o + 4] * y;
      v = y;
    }
    out[i] = v;
  }
  return out;
}

/** Steady-state initial conditions for a unit step, as scipy.signal.sosfilt_zi (flattened). */
export function sosfiltZi(sos: Sos): Float64Array {
  const zi = new Float64Array(sos.length * 2);
  let scale = 1;
  for (let s = 0; s < sos.length; s++) {
    const a0 = sos[s][3];
    const [b0, b1, b2] = [sos[s][0] / a0, sos[s][1] / a0, sos[s][2] / a0];
    const [a1, a2] = [sos[s][4] / a0, sos[s][5] / a0];
    // lfilter_zi for a second-order section: (I − companion(a)ᵀ)·zi = b[1:] − a[1:]·b0
    const B0 = b1 - a1 * b0;
    const B1 = b2 - a2 * b0;
    const z0 = (B0 + B1) / (1 + a1 + a2);
    zi[2 * s] = scale * z0;
    zi[2 * s + 1] = scale * (B1 - a2 * z0);
    scale *= (sos[s][0] + sos[s][1] + sos[s][2]) / (sos[s][3] + sos[s][4] + sos[s][5]);
  }
  return zi;
}

/**
 * Default padding length of scipy.signal.sosfiltfilt: 3·(2·n_sections + 1 − min(#b2 = 0, #a2 = 0)).
 */
export function sosfiltfiltPadlen(sos: Sos): number {
  let b2zero = 0;
  let a2zero = 0;
  for (const s of sos) {
    if (s[2] === 0) b2zero++;
    if (s[5] === 0) a2zero++;
  }
  return 3 * (2 * sos.length + 1 - Math.min(b2zero, a2zero));
}

/**
 * Zero-phase forward–backward filtering, reproducing scipy.signal.sosfiltfilt(sos, x) with its
 * defaults (library): the signal is extended at both ends by `padlen` samples of odd extension
 * (2·x[0] − x[padlen..1] before, 2·x[n−1] − x[n−2..n−1−padlen] after; padlen from
 * sosfiltfiltPadlen), filtered forward from the steady state sosfiltZi·(first extended sample),
 * reversed, filtered again from the steady state of its first sample, reversed and trimmed.
 * The input must be finite and longer than padlen (ModalInputError otherwise).
 */
export function sosfiltfilt(sos: Sos, x: Float64Array): Float64Array {
  const n = x.length;
  const edge = sosfiltfiltPadlen(sos);
  if (n <= edge) {
    throw new ModalInputError(`sosfiltfilt: the signal has ${n} samples; this filter needs more than ${edge} (its padding length)`);
  }
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(x[i])) throw new ModalInputError(`sosfiltfilt: sample ${i} is ${x[i]}; fill gaps before filtering`);
  }
  const m = n + 2 * edge;
  const ext = new Float64Array(m);
  const x0 = x[0];
  const xn = x[n - 1];
  for (let i = 0; i < edge; i++) ext[i] = 2 * x0 - x[edge - i];
  ext.set(x, edge);
  for (let i = 0; i < edge; i++) ext[edge + n + i] = 2 * xn - x[n - 2 - i];
  const zi0 = sosfiltZi(sos);
  const zi = new Float64Array(zi0.length);
  for (let i = 0; i < zi.length; i++) zi[i] = zi0[i] * ext[0];
  sosfiltInPlace(sos, ext, zi);
  ext.reverse();
  for (let i = 0; i < zi.length; i++) zi[i] = zi0[i] * ext[0];
  sosfiltInPlace(sos, ext, zi);
  ext.reverse();
  return ext.slice(edge, edge + n);
}

export interface BandpassOptions {
  /** Lower band edge, Hz. Default 0.1. */
  lowHz?: number;
  /** Upper band edge, Hz. Default 2.0. */
  highHz?: number;
  /** Butterworth prototype order (the band-pass has twice as many poles). Default 4. */
  order?: number;
}

/** Zero-phase Butterworth band-pass (butterBandpassSos + sosfiltfilt). */
export function bandpass(x: Float64Array, fs: number, options: BandpassOptions = {}): Float64Array {
  const { lowHz = 0.1, highHz = 2.0, order = 4 } = options;
  return sosfiltfilt(butterBandpassSos(order, lowHz, highHz, fs), x);
}

/**
 * Down-samples by an integer factor after zero-phase anti-alias filtering, reproducing
 * scipy.signal.decimate(x, factor, ftype='iir', zero_phase=True) (library): an order-8 Chebyshev I
 * low-pass, 0.05 dB ripple, cutoff 0.8·(new Nyquist), applied with sosfiltfilt, then every
 * factor-th sample from the first. Factor 1 returns a copy. (scipy warns above factor 13, where the
 * order-8 design gets numerically poor; we refuse it — decimate in stages instead.)
 */
export function decimate(x: Float64Array, factor: number): Float64Array {
  if (!Number.isInteger(factor) || factor < 1) {
    throw new ModalInputError(`decimate: factor must be a positive integer, got ${factor}`);
  }
  if (factor === 1) return x.slice();
  if (factor > 13) {
    throw new ModalInputError(`decimate: factor ${factor} is above 13; decimate in stages (e.g. ${stagesHint(factor)})`);
  }
  const y = sosfiltfilt(decimationSos(factor), x);
  const out = new Float64Array(Math.ceil(x.length / factor));
  for (let i = 0, j = 0; i < x.length; i += factor, j++) out[j] = y[i];
  return out;
}

function stagesHint(factor: number): string {
  for (let a = 13; a >= 2; a--) if (factor % a === 0 && factor / a <= 13) return `${a} then ${factor / a}`;
  return 'factors of at most 13 each';
}

const decimationSosCache = new Map<number, Sos>();
/** The anti-alias filter decimate() uses for `factor` (scipy: cheby1(8, 0.05, 0.8/factor)). */
export function decimationSos(factor: number): Sos {
  let sos = decimationSosCache.get(factor);
  if (!sos) {
    sos = cheby1LowpassSos(8, 0.05, 0.8 / factor);
    decimationSosCache.set(factor, sos);
  }
  return sos;
}

// ---------------------------------------------------------------------------------------------
// Gaps and data quality

/** Runs of non-finite samples: [start, endExclusive). */
function missingRuns(x: Float64Array): [number, number][] {
  const runs: [number, number][] = [];
  let i = 0;
  while (i < x.length) {
    if (!Number.isFinite(x[i])) {
      const s = i;
      while (i < x.length && !Number.isFinite(x[i])) i++;
      runs.push([s, i]);
    } else i++;
  }
  return runs;
}

function median(sorted: Float64Array): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  const h = n >> 1;
  return n % 2 ? sorted[h] : (sorted[h - 1] + sorted[h]) / 2;
}

/**
 * Data-quality flags of one channel's window (NaN or ±Inf = missing sample):
 *  - dropouts: missing samples; gaps: runs of them; longestGap: longest run, samples;
 *  - flatLine: samples in runs of identical consecutive finite values covering at least 1 s
 *    (a run of ≥ ceil(fs) samples; a frozen PMU output);
 *  - outliers: finite samples farther than 6 robust standard deviations from the median, the
 *    robust standard deviation being 1.4826·MAD (common practice: MAD scaled to σ for Gaussian
 *    data). When MAD is 0 (mostly constant data) no outliers are counted.
 */
export function windowQuality(x: Float64Array, fs: number): WindowQuality {
  checkRate(fs, 'windowQuality');
  const runs = missingRuns(x);
  let dropouts = 0;
  let longestGap = 0;
  for (const [s, e] of runs) {
    dropouts += e - s;
    longestGap = Math.max(longestGap, e - s);
  }
  const minFlat = Math.max(2, Math.ceil(fs));
  let flatLine = 0;
  let i = 0;
  while (i < x.length) {
    if (!Number.isFinite(x[i])) {
      i++;
      continue;
    }
    let j = i + 1;
    while (j < x.length && x[j] === x[i]) j++;
    if (j - i >= minFlat) flatLine += j - i;
    i = j;
  }
  const finite = new Float64Array(x.length - dropouts);
  let k = 0;
  for (let t = 0; t < x.length; t++) if (Number.isFinite(x[t])) finite[k++] = x[t];
  let outliers = 0;
  if (finite.length > 0) {
    const sorted = finite.slice().sort();
    const med = median(sorted);
    const dev = new Float64Array(finite.length);
    for (let t = 0; t < finite.length; t++) dev[t] = Math.abs(finite[t] - med);
    dev.sort();
    const mad = median(dev);
    if (mad > 0) {
      const limit = 6 * 1.4826 * mad;
      for (let t = 0; t < finite.length; t++) if (Math.abs(finite[t] - med) > limit) outliers++;
    }
  }
  return { samples: x.length, dropouts, gaps: runs.length, longestGap, flatLine, outliers };
}

export interface FillGapsOptions {
  /** Interior runs of missing samples lasting at most this long (k/fs ≤ maxGapSeconds for a run
   * of k samples) are linearly interpolated; longer runs split the data. Default 1 s. */
  maxGapSeconds?: number;
}

export interface FillGapsResult {
  /** Copy of the input with short gaps interpolated; long gaps and missing ends stay NaN. */
  values: Float64Array;
  /** Maximal runs of usable (finite) samples, [startIdx, endIdxExclusive), in order. */
  segments: [number, number][];
  /** Quality of the input before interpolation. */
  quality: WindowQuality;
}

/**
 * Fills short gaps by linear interpolation between the neighbouring good samples and splits the
 * data at long gaps. Missing samples at either end cannot be interpolated and are left out of the
 * segments.
 */
export function fillGaps(x: Float64Array, fs: number, options: FillGapsOptions = {}): FillGapsResult {
  const { maxGapSeconds = 1 } = options;
  checkRate(fs, 'fillGaps');
  if (!(maxGapSeconds >= 0) || !Number.isFinite(maxGapSeconds)) {
    throw new ModalInputError(`fillGaps: maxGapSeconds must be a non-negative number, got ${maxGapSeconds}`);
  }
  const quality = windowQuality(x, fs);
  const values = x.slice();
  for (let i = 0; i < values.length; i++) if (!Number.isFinite(values[i])) values[i] = NaN;
  for (const [s, e] of missingRuns(x)) {
    if (s === 0 || e === x.length) continue;
    if ((e - s) / fs > maxGapSeconds) continue;
    const a = x[s - 1];
    const b = x[e];
    const span = e - s + 1;
    for (let i = s; i < e; i++) values[i] = a + ((b - a) * (i - s + 1)) / span;
  }
  const segments: [number, number][] = [];
  let i = 0;
  while (i < values.length) {
    if (Number.isNaN(values[i])) {
      i++;
      continue;
    }
    const s = i;
    while (i < values.length && !Number.isNaN(values[i])) i++;
    segments.push([s, i]);
  }
  return { values, segments, quality };
}

// ---------------------------------------------------------------------------------------------
// Reporting rate and timestamps

/** IEEE C37.118.1-2011 reporting rates, frames/s, by nominal system frequency (standard). */
export const STANDARD_REPORTING_RATES: Record<50 | 60, readonly number[]> = {
  60: [10, 12, 15, 20, 30, 60],
  50: [10, 25, 50],
};

/**
 * Checks a reporting rate against the IEEE C37.118.1 list for the nominal frequency and returns
 * the standard rate. A rate measured from timestamps may differ from the standard one by rounding;
 * a relative difference up to 1e-6 is accepted.
 */
export function checkReportingRate(rate: number, nominalHz: 50 | 60): number {
  if (nominalHz !== 50 && nominalHz !== 60) {
    throw new ModalInputError(`Nominal frequency must be 50 or 60 Hz, got ${nominalHz}`);
  }
  const list = STANDARD_REPORTING_RATES[nominalHz];
  if (!Number.isFinite(rate) || rate <= 0) {
    throw new ModalInputError(`Reporting rate must be a positive number of frames/s, got ${rate}`);
  }
  for (const r of list) if (Math.abs(rate - r) <= 1e-6 * r) return r;
  throw new ModalInputError(
    `Reporting rate ${formatNum(rate)} frames/s is not a standard rate for a ${nominalHz} Hz system ` +
      `(IEEE C37.118.1: ${list.join(', ')} frames/s)`,
  );
}

/** A timestamp problem at one sample; `sampleIndex` is 0-based within the checked array. */
export class TimestampError extends ModalInputError {
  constructor(
    message: string,
    readonly sampleIndex: number,
  ) {
    super(message);
    this.name = 'TimestampError';
  }
}

export interface TimestampReport {
  samples: number;
  /** Median spacing of consecutive timestamps, s. */
  medianInterval: number;
  /** 1 / medianInterval, samples/s. */
  estimatedRate: number;
  /** Spacings longer than 1.5 median spacings (missing frames). */
  gaps: number;
  /** Frames missing in those gaps, estimated as round(spacing / median) − 1 each. */
  missingFrames: number;
}

/**
 * Checks that timestamps (seconds) are finite and strictly increasing; throws a TimestampError
 * naming the first offending sample (0-based) and its time otherwise. Returns spacing statistics.
 */
export function checkTimestamps(times: Float64Array): TimestampReport {
  const n = times.length;
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(times[i])) {
      throw new TimestampError(`Timestamp of sample ${i} is ${times[i]}; timestamps must be finite numbers of seconds`, i);
    }
    if (i > 0) {
      if (times[i] === times[i - 1]) {
        throw new TimestampError(
          `Duplicate timestamp at sample ${i}: ${formatTime(times[i])} s, the same as sample ${i - 1}`,
          i,
        );
      }
      if (times[i] < times[i - 1]) {
        throw new TimestampError(
          `Timestamps out of order at sample ${i}: ${formatTime(times[i])} s comes after ${formatTime(times[i - 1])} s (sample ${i - 1})`,
          i,
        );
      }
    }
  }
  if (n < 2) return { samples: n, medianInterval: NaN, estimatedRate: NaN, gaps: 0, missingFrames: 0 };
  const d = new Float64Array(n - 1);
  for (let i = 1; i < n; i++) d[i - 1] = times[i] - times[i - 1];
  const sorted = d.slice().sort();
  const med = median(sorted);
  let gaps = 0;
  let missingFrames = 0;
  for (let i = 0; i < d.length; i++) {
    if (d[i] > 1.5 * med) {
      gaps++;
      missingFrames += Math.round(d[i] / med) - 1;
    }
  }
  return { samples: n, medianInterval: med, estimatedRate: 1 / med, gaps, missingFrames };
}

function formatNum(v: number): string {
  return Number.isInteger(v) ? String(v) : String(Number(v.toPrecision(10)));
}

/** Seconds with up to microsecond resolution, no exponent. */
function formatTime(t: number): string {
  return String(Number(t.toFixed(6)));
}
