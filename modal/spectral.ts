// Welch power spectral density and cross-spectral density, reproducing scipy.signal.welch and
// scipy.signal.csd (library: scipy 1.10) for real input with these conventions:
//   - periodic Hann window of nperseg samples (scipy get_window('hann', nperseg), fftbins=True);
//   - noverlap default ⌊nperseg/2⌋, nfft default nperseg (zero padding when nfft > nperseg);
//   - segments start at 0, step nperseg − noverlap, count ⌊(n − noverlap)/step⌋ (no boundary
//     extension, no padding of the last partial segment);
//   - each segment detrended ('constant' = minus its mean, as scipy's default), windowed, FFT'd;
//   - Pxy = conj(X)·Y · scale, scale = 1/(fs·Σw²) ('density', units²/Hz) or 1/(Σw)² ('spectrum');
//   - one-sided: every bin but DC (and Nyquist when nfft is even) doubled;
//   - average 'mean' over segments.
// If nperseg exceeds the signal length it is cut to the length (scipy does the same, with a warning).
//
// FFTs are fft.js (radix-4) for power-of-two sizes and Bluestein's chirp-z algorithm on top of it
// for any other size (textbook: Oppenheim & Schafer, chirp transform), so any nfft works.
import FFT from 'fft.js';
import { ModalInputError } from './errors';

// ---------------------------------------------------------------------------------------------
// One-sided real DFT of any length

const fftCache = new Map<number, FFT>();
function fftOf(size: number): FFT {
  let f = fftCache.get(size);
  if (!f) {
    f = new FFT(size);
    fftCache.set(size, f);
  }
  return f;
}

function isPowerOfTwo(n: number): boolean {
  return n >= 2 && (n & (n - 1)) === 0;
}

/**
 * Real-input DFT of a fixed length n ≥ 1, X[k] = Σ x[m]·e^{−2πi·k·m/n} for k = 0..⌊n/2⌋
 * (numpy.fft.rfft convention). Reusable: allocate once per size, call `transform` many times.
 */
export class RealDft {
  readonly n: number;
  readonly bins: number;
  private readonly pow2: boolean;
  private readonly fft: FFT | null;
  private readonly out: number[] | null;
  // Bluestein state
  private readonly m: number = 0;
  private readonly chirpRe: Float64Array | null = null;
  private readonly chirpIm: Float64Array | null = null;
  private readonly kernelFft: number[] | null = null;
  private readonly work: number[] | null = null;
  private readonly work2: number[] | null = null;

  constructor(n: number) {
    if (!Number.isInteger(n) || n < 1) throw new ModalInputError(`RealDft: the length must be a positive integer, got ${n}`);
    this.n = n;
    this.bins = Math.floor(n / 2) + 1;
    this.pow2 = isPowerOfTwo(n);
    if (this.pow2) {
      this.fft = fftOf(n);
      this.out = this.fft.createComplexArray();
      return;
    }
    this.fft = null;
    this.out = null;
    if (n === 1) return;
    // Bluestein: X[k] = w[k]·Σ_m (x[m]·w[m])·conj(w[k−m]), w[m] = e^{−iπm²/n}; the convolution is
    // done by FFTs of size M ≥ 2n − 1. m² is reduced mod 2n before scaling so the angle stays exact.
    let m = 2;
    while (m < 2 * n - 1) m *= 2;
    this.m = m;
    const cr = new Float64Array(n);
    const ci = new Float64Array(n);
    for (let j = 0; j < n; j++) {
      const q = (j * j) % (2 * n);
      const ang = (Math.PI * q) / n;
      cr[j] = Math.cos(ang);
      ci[j] = -Math.sin(ang);
    }
    this.chirpRe = cr;
    this.chirpIm = ci;
    const f = fftOf(m);
    const kernel = f.createComplexArray();
    // conj(w[j]) at j and at m − j (circular convolution)
    kernel[0] = cr[0];
    kernel[1] = -ci[0];
    for (let j = 1; j < n; j++) {
      kernel[2 * j] = cr[j];
      kernel[2 * j + 1] = -ci[j];
      kernel[2 * (m - j)] = cr[j];
      kernel[2 * (m - j) + 1] = -ci[j];
    }
    const kf = f.createComplexArray();
    f.transform(kf, kernel);
    this.kernelFft = kf;
    this.work = f.createComplexArray();
    this.work2 = f.createComplexArray();
  }

  /**
   * DFT of `x` (length ≥ n; the first n samples are used, or zero padding when `x` is shorter —
   * pass `len` to use only the first `len` samples and pad the rest with zeros).
   */
  transform(x: ArrayLike<number>, re: Float64Array, im: Float64Array, len: number = Math.min(x.length, this.n)): void {
    const n = this.n;
    if (n === 1) {
      re[0] = len > 0 ? x[0] : 0;
      im[0] = 0;
      return;
    }
    if (this.pow2) {
      const f = this.fft!;
      const out = this.out!;
      let input: ArrayLike<number> = x;
      if (len < n || x.length !== n) {
        const buf = padBuffer(n);
        for (let i = 0; i < len; i++) buf[i] = x[i];
        for (let i = len; i < n; i++) buf[i] = 0;
        input = buf;
      }
      f.realTransform(out, input);
      for (let k = 0; k < this.bins; k++) {
        re[k] = out[2 * k];
        im[k] = out[2 * k + 1];
      }
      return;
    }
    const f = fftOf(this.m);
    const w = this.work!;
    const w2 = this.work2!;
    const cr = this.chirpRe!;
    const ci = this.chirpIm!;
    w.fill(0);
    for (let j = 0; j < len; j++) {
      w[2 * j] = x[j] * cr[j];
      w[2 * j + 1] = x[j] * ci[j];
    }
    f.transform(w2, w);
    const kf = this.kernelFft!;
    for (let j = 0; j < this.m; j++) {
      const ar = w2[2 * j];
      const ai = w2[2 * j + 1];
      const br = kf[2 * j];
      const bi = kf[2 * j + 1];
      w2[2 * j] = ar * br - ai * bi;
      w2[2 * j + 1] = ar * bi + ai * br;
    }
    f.inverseTransform(w, w2);
    for (let k = 0; k < this.bins; k++) {
      const vr = w[2 * k];
      const vi = w[2 * k + 1];
      re[k] = vr * cr[k] - vi * ci[k];
      im[k] = vr * ci[k] + vi * cr[k];
    }
  }
}

const padBuffers = new Map<number, Float64Array>();
function padBuffer(n: number): Float64Array {
  let b = padBuffers.get(n);
  if (!b) {
    b = new Float64Array(n);
    padBuffers.set(n, b);
  }
  return b;
}

/** Frequencies of the one-sided DFT bins, Hz (numpy.fft.rfftfreq(nfft, 1/fs)). */
export function rfftFrequencies(nfft: number, fs: number): Float64Array {
  const bins = Math.floor(nfft / 2) + 1;
  const f = new Float64Array(bins);
  for (let k = 0; k < bins; k++) f[k] = (k * fs) / nfft;
  return f;
}

/** Periodic Hann window (scipy.signal.get_window('hann', n)): w[j] = 0.5 − 0.5·cos(2πj/n). */
export function hannWindow(n: number): Float64Array {
  const w = new Float64Array(n);
  if (n === 1) {
    w[0] = 1;
    return w;
  }
  for (let j = 0; j < n; j++) w[j] = 0.5 - 0.5 * Math.cos((2 * Math.PI * j) / n);
  return w;
}

// ---------------------------------------------------------------------------------------------
// Welch / CSD

export type SegmentDetrend = 'constant' | 'linear' | false;

/** Options of welch() and csd(). Defaults are scipy.signal.welch's. */
export interface WelchOptions {
  /** Segment length, samples. Default 256 (cut to the signal length when longer). */
  nperseg?: number;
  /** Overlap between segments, samples. Default ⌊nperseg/2⌋. */
  noverlap?: number;
  /** FFT length (≥ nperseg; zero padding). Default nperseg. */
  nfft?: number;
  /** Per-segment detrending before windowing. Default 'constant'. */
  detrend?: SegmentDetrend;
  /** 'density' (units²/Hz, default) or 'spectrum' (units²). */
  scaling?: 'density' | 'spectrum';
}

export interface ResolvedWelchOptions {
  nperseg: number;
  noverlap: number;
  nfft: number;
  detrend: SegmentDetrend;
  scaling: 'density' | 'spectrum';
}

export interface PsdResult {
  /** Bin frequencies, Hz (0 … fs/2). */
  frequencies: Float64Array;
  /** One-sided power spectral density (units²/Hz) or power spectrum (units²). */
  psd: Float64Array;
  /** Number of averaged segments. */
  segments: number;
}

export interface CsdResult {
  frequencies: Float64Array;
  /** Real and imaginary parts of Pxy = E[conj(X)·Y] (scipy's convention). */
  re: Float64Array;
  im: Float64Array;
  segments: number;
}

function checkSignal(x: ArrayLike<number>, name: string, fn: string): void {
  if (x.length === 0) throw new ModalInputError(`${fn}: ${name} is empty`);
  for (let i = 0; i < x.length; i++) {
    if (!Number.isFinite(x[i])) {
      throw new ModalInputError(`${fn}: ${name} has a non-finite sample at index ${i} (${x[i]}); fill gaps first`);
    }
  }
}

/** Resolves and checks Welch options for a signal of length n (the one check of these options). */
export function resolveWelchOptions(n: number, fs: number, opts: WelchOptions = {}, fn = 'welch'): ResolvedWelchOptions {
  if (!Number.isFinite(fs) || fs <= 0) throw new ModalInputError(`${fn}: fs must be a positive number of samples/s, got ${fs}`);
  let nperseg = opts.nperseg ?? 256;
  if (!Number.isInteger(nperseg) || nperseg < 1) {
    throw new ModalInputError(`${fn}: nperseg must be a positive integer, got ${nperseg}`);
  }
  if (nperseg > n) nperseg = n;
  const noverlap = opts.noverlap ?? Math.floor(nperseg / 2);
  if (!Number.isInteger(noverlap) || noverlap < 0) {
    throw new ModalInputError(`${fn}: noverlap must be a non-negative integer, got ${noverlap}`);
  }
  if (noverlap >= nperseg) throw new ModalInputError(`${fn}: noverlap (${noverlap}) must be less than nperseg (${nperseg})`);
  const nfft = opts.nfft ?? nperseg;
  if (!Number.isInteger(nfft) || nfft < nperseg) {
    throw new ModalInputError(`${fn}: nfft must be an integer of at least nperseg (${nperseg}), got ${nfft}`);
  }
  const detrend = opts.detrend ?? 'constant';
  if (detrend !== 'constant' && detrend !== 'linear' && detrend !== false) {
    throw new ModalInputError(`${fn}: detrend must be 'constant', 'linear' or false, got ${String(detrend)}`);
  }
  const scaling = opts.scaling ?? 'density';
  if (scaling !== 'density' && scaling !== 'spectrum') {
    throw new ModalInputError(`${fn}: scaling must be 'density' or 'spectrum', got ${String(scaling)}`);
  }
  return { nperseg, noverlap, nfft, detrend, scaling };
}

/** Detrends seg[0..n) in place (scipy.signal.detrend on one segment). */
export function detrendSegment(seg: Float64Array, n: number, kind: SegmentDetrend): void {
  if (kind === false) return;
  let mean = 0;
  for (let i = 0; i < n; i++) mean += seg[i];
  mean /= n;
  if (kind === 'constant' || n < 2) {
    for (let i = 0; i < n; i++) seg[i] -= mean;
    return;
  }
  const tMean = (n - 1) / 2;
  let stt = 0;
  let stx = 0;
  for (let i = 0; i < n; i++) {
    const dt = i - tMean;
    stt += dt * dt;
    stx += dt * (seg[i] - mean);
  }
  const slope = stx / stt;
  for (let i = 0; i < n; i++) seg[i] -= mean + slope * (i - tMean);
}

/**
 * Windowed, detrended DFT of every Welch segment of `x`: re/im[s·bins + k] for segment s, bin k.
 * Exposed so callers needing several spectra of the same segments (cross-spectral matrices,
 * segment statistics) transform each segment once.
 */
export function segmentSpectra(
  x: ArrayLike<number>,
  o: ResolvedWelchOptions,
): { re: Float64Array; im: Float64Array; segments: number; bins: number; window: Float64Array } {
  const step = o.nperseg - o.noverlap;
  const segments = Math.floor((x.length - o.noverlap) / step);
  const dft = new RealDft(o.nfft);
  const bins = dft.bins;
  const win = hannWindow(o.nperseg);
  const re = new Float64Array(segments * bins);
  const im = new Float64Array(segments * bins);
  const seg = new Float64Array(o.nperseg);
  const r = new Float64Array(bins);
  const i2 = new Float64Array(bins);
  for (let s = 0; s < segments; s++) {
    const off = s * step;
    for (let j = 0; j < o.nperseg; j++) seg[j] = x[off + j];
    detrendSegment(seg, o.nperseg, o.detrend);
    for (let j = 0; j < o.nperseg; j++) seg[j] *= win[j];
    dft.transform(seg, r, i2, o.nperseg);
    re.set(r, s * bins);
    im.set(i2, s * bins);
  }
  return { re, im, segments, bins, window: win };
}

/** Density or spectrum scale factor and one-sided doubling, as scipy applies them. */
export function spectralScale(win: Float64Array, fs: number, scaling: 'density' | 'spectrum'): number {
  let s1 = 0;
  let s2 = 0;
  for (let j = 0; j < win.length; j++) {
    s1 += win[j];
    s2 += win[j] * win[j];
  }
  return scaling === 'density' ? 1 / (fs * s2) : 1 / (s1 * s1);
}

/** One-sided doubling factor of bin k for an nfft-point DFT (DC and even-nfft Nyquist stay). */
export function oneSidedFactor(k: number, nfft: number): number {
  if (k === 0) return 1;
  if (nfft % 2 === 0 && k === nfft / 2) return 1;
  return 2;
}

/** Welch power spectral density, as scipy.signal.welch(x, fs, nperseg=…, …) (library). */
export function welch(x: ArrayLike<number>, fs: number, opts: WelchOptions = {}): PsdResult {
  checkSignal(x, 'x', 'welch');
  const o = resolveWelchOptions(x.length, fs, opts, 'welch');
  const sp = segmentSpectra(x, o);
  const scale = spectralScale(sp.window, fs, o.scaling);
  const psd = new Float64Array(sp.bins);
  for (let s = 0; s < sp.segments; s++) {
    const off = s * sp.bins;
    for (let k = 0; k < sp.bins; k++) psd[k] += sp.re[off + k] * sp.re[off + k] + sp.im[off + k] * sp.im[off + k];
  }
  for (let k = 0; k < sp.bins; k++) psd[k] *= (scale * oneSidedFactor(k, o.nfft)) / sp.segments;
  return { frequencies: rfftFrequencies(o.nfft, fs), psd, segments: sp.segments };
}

/** Cross-spectral density Pxy (conj(X)·Y), as scipy.signal.csd(x, y, fs, …) (library). */
export function csd(x: ArrayLike<number>, y: ArrayLike<number>, fs: number, opts: WelchOptions = {}): CsdResult {
  checkSignal(x, 'x', 'csd');
  checkSignal(y, 'y', 'csd');
  if (x.length !== y.length) {
    throw new ModalInputError(`csd: x has ${x.length} samples but y has ${y.length}; they must be the same length`);
  }
  const o = resolveWelchOptions(x.length, fs, opts, 'csd');
  const sx = segmentSpectra(x, o);
  const sy = segmentSpectra(y, o);
  const scale = spectralScale(sx.window, fs, o.scaling);
  const re = new Float64Array(sx.bins);
  const im = new Float64Array(sx.bins);
  for (let s = 0; s < sx.segments; s++) {
    const off = s * sx.bins;
    for (let k = 0; k < sx.bins; k++) {
      const ar = sx.re[off + k];
      const ai = sx.im[off + k];
      const br = sy.re[off + k];
      const bi = sy.im[off + k];
      // conj(a)·b
      re[k] += ar * br + ai * bi;
      im[k] += ar * bi - ai * br;
    }
  }
  for (let k = 0; k < sx.bins; k++) {
    const f = (scale * oneSidedFactor(k, o.nfft)) / sx.segments;
    re[k] *= f;
    im[k] *= f;
  }
  return { frequencies: rfftFrequencies(o.nfft, fs), re, im, segments: sx.segments };
}
