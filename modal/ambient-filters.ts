// Streaming anti-alias decimation for the ambient scan: a linear-phase FIR decimator (polyphase:
// only the kept outputs are computed) that keeps its state across pushes, so a day of PMU data is
// decimated once, chunk by chunk, without holding it whole.
//
// FIR design is the Kaiser-window method exactly as scipy.signal.kaiserord / kaiser_beta / firwin
// (library: scipy 1.10; Kaiser 1974 formulas).
import { ModalInputError } from './errors';

/** Kaiser β for a stop-band attenuation of `a` dB (scipy.signal.kaiser_beta). */
export function kaiserBeta(a: number): number {
  if (a > 50) return 0.1102 * (a - 8.7);
  if (a > 21) return 0.5842 * Math.pow(a - 21, 0.4) + 0.07886 * (a - 21);
  return 0;
}

/**
 * Kaiser-window FIR length and β (scipy.signal.kaiserord): `rippleDb` the attenuation, `width`
 * the transition width as a fraction of the Nyquist frequency.
 */
export function kaiserOrder(rippleDb: number, width: number): { numtaps: number; beta: number } {
  const a = Math.abs(rippleDb);
  if (a < 8) throw new ModalInputError(`kaiserOrder: the attenuation must be at least 8 dB, got ${a}`);
  if (!(width > 0)) throw new ModalInputError(`kaiserOrder: the transition width must be positive, got ${width}`);
  const numtaps = (a - 7.95) / 2.285 / (Math.PI * width) + 1;
  return { numtaps: Math.ceil(numtaps), beta: kaiserBeta(a) };
}

/** Modified Bessel function of the first kind, order 0 (power series; converges for all x). */
export function besselI0(x: number): number {
  let sum = 1;
  let term = 1;
  const q = (x * x) / 4;
  for (let k = 1; k < 500; k++) {
    term *= q / (k * k);
    sum += term;
    if (term < 1e-17 * sum) break;
  }
  return sum;
}

/**
 * Low-pass FIR by the window method with a symmetric Kaiser window, normalised to unit gain at
 * DC — scipy.signal.firwin(numtaps, cutoffHz, window=('kaiser', beta), fs=fs).
 */
export function firwinKaiserLowpass(numtaps: number, cutoffHz: number, fs: number, beta: number): Float64Array {
  if (!Number.isInteger(numtaps) || numtaps < 1) throw new ModalInputError(`firwin: numtaps must be a positive integer, got ${numtaps}`);
  const c = cutoffHz / (fs / 2);
  if (!(c > 0 && c < 1)) throw new ModalInputError(`firwin: the cutoff must lie between 0 and fs/2 (${fs / 2} Hz), got ${cutoffHz}`);
  const alpha = 0.5 * (numtaps - 1);
  const h = new Float64Array(numtaps);
  const i0b = besselI0(beta);
  let sum = 0;
  for (let n = 0; n < numtaps; n++) {
    const m = n - alpha;
    const x = c * m;
    const sinc = x === 0 ? 1 : Math.sin(Math.PI * x) / (Math.PI * x);
    const r = numtaps > 1 ? (2 * n) / (numtaps - 1) - 1 : 0;
    const w = besselI0(beta * Math.sqrt(Math.max(0, 1 - r * r))) / i0b;
    h[n] = c * sinc * w;
    sum += h[n];
  }
  for (let n = 0; n < numtaps; n++) h[n] /= sum;
  return h;
}

/**
 * Anti-alias FIR for decimating from `rate` by `factor` while keeping [0, passHz] free of
 * aliases: pass edge passHz, stop edge (rate/factor − passHz) — everything that would fold into
 * the pass band is attenuated by `attenuationDb`. Odd length (integer group delay).
 */
export function designDecimator(rate: number, factor: number, passHz: number, attenuationDb = 60): Float64Array {
  const outRate = rate / factor;
  const stopHz = outRate - passHz;
  if (!(stopHz > passHz)) {
    throw new ModalInputError(`designDecimator: the output rate ${outRate} samples/s must exceed twice the pass edge ${passHz} Hz`);
  }
  const { numtaps, beta } = kaiserOrder(attenuationDb, (stopHz - passHz) / (rate / 2));
  const n = numtaps % 2 === 0 ? numtaps + 1 : numtaps;
  return firwinKaiserLowpass(n, (passHz + stopHz) / 2, rate, beta);
}

/**
 * Streaming decimator by an integer factor q with a symmetric odd-length FIR h (delay D = (L−1)/2):
 * output j = Σ_k h[k]·x[q·j + D − k], i.e. aligned with input sample q·j (zero phase). The record
 * is extended at both ends by odd reflection (2·x[0] − x[i] before, 2·x[N−1] − x[N−1−i] after),
 * as scipy's filtfilt padding does, so the ends carry no start-up transient. Outputs exist for
 * j = 0 … ⌈N/q⌉ − 1.
 */
export class FirDecimator {
  private readonly h: Float64Array;
  private readonly q: number;
  private readonly d: number;
  private buf: Float64Array;
  /** Absolute input index of buf[0] (negative while the start reflection is held). */
  private bufStart = 0;
  private bufLen = 0;
  private nextOut = 0;
  private started = false;
  private pending: number[] = [];
  private total = 0;

  constructor(h: Float64Array, q: number) {
    if (h.length % 2 !== 1) throw new ModalInputError(`FirDecimator: the filter length must be odd, got ${h.length}`);
    this.h = h;
    this.q = q;
    this.d = (h.length - 1) / 2;
    this.buf = new Float64Array(Math.max(1024, 4 * h.length));
  }

  get delay(): number {
    return this.d;
  }

  private append(v: number): void {
    // outputs ≥ nextOut use inputs from q·nextOut − D on; older samples can go
    if (this.bufLen === this.buf.length) this.makeRoom(1);
    this.buf[this.bufLen++] = v;
  }

  /**
   * Feeds input samples x[from..to) (finite); writes the outputs that became available into
   * `out` from index 0 and returns how many (at most ⌈(to − from)/q⌉ + D/q + 1).
   */
  push(x: ArrayLike<number>, from: number, to: number, out: Float64Array): number {
    let i = from;
    while (i < to && !this.started) {
      this.total++;
      this.pending.push(x[i++]);
      if (this.pending.length > this.d) this.start();
    }
    if (i < to) {
      const n = to - i;
      if (this.bufLen + n > this.buf.length) this.makeRoom(n);
      const buf = this.buf;
      let len = this.bufLen;
      for (; i < to; i++) buf[len++] = x[i];
      this.bufLen = len;
      this.total += n;
    }
    return this.started ? this.drain(out, 0) : 0;
  }

  /** Frees or adds space for `n` more samples. */
  private makeRoom(n: number): void {
    const keepFrom = this.q * this.nextOut - this.d;
    const drop = Math.max(0, Math.min(this.bufLen, keepFrom - this.bufStart));
    if (drop > 0) {
      this.buf.copyWithin(0, drop, this.bufLen);
      this.bufStart += drop;
      this.bufLen -= drop;
    }
    if (this.bufLen + n > this.buf.length) {
      let cap = this.buf.length;
      while (cap < this.bufLen + n) cap *= 2;
      const nb = new Float64Array(cap);
      nb.set(this.buf.subarray(0, this.bufLen));
      this.buf = nb;
    }
  }

  private start(): void {
    const p = this.pending;
    const x0 = p[0];
    // virtual samples −D … −1: 2·x0 − x[D] … 2·x0 − x[1]
    this.bufStart = -this.d;
    this.bufLen = 0;
    for (let i = this.d; i >= 1; i--) this.append(2 * x0 - p[i]);
    for (const v of p) this.append(v);
    this.pending = [];
    this.started = true;
  }

  private drain(out: Float64Array, at: number): number {
    const h = this.h;
    const d = this.d;
    const q = this.q;
    const buf = this.buf;
    const base = this.bufStart;
    const lastAbs = base + this.bufLen - 1;
    let j = this.nextOut;
    let k0 = at;
    while (q * j + d <= lastAbs) {
      const c = q * j - base; // centre index in buf
      let acc = h[d] * buf[c];
      for (let k = 0; k < d; k++) acc += h[k] * (buf[c + d - k] + buf[c - d + k]);
      out[k0++] = acc;
      j++;
    }
    this.nextOut = j;
    return k0 - at;
  }

  /** Ends the stream: pads by odd reflection and writes the last outputs into `out`; returns the count. */
  finish(out: Float64Array): number {
    if (this.total === 0) return 0;
    if (!this.started) {
      // Fewer than D + 1 samples: reflect what there is (short records only).
      const p = this.pending;
      const x0 = p[0];
      this.bufStart = -this.d;
      this.bufLen = 0;
      for (let i = this.d; i >= 1; i--) this.append(i < p.length ? 2 * x0 - p[i] : x0);
      for (const v of p) this.append(v);
      this.pending = [];
      this.started = true;
    }
    const n = this.total;
    const lastAbs = this.bufStart + this.bufLen - 1; // = n − 1
    const xn = this.buf[lastAbs - this.bufStart];
    for (let i = 1; i <= this.d; i++) {
      const src = lastAbs - i;
      const v = src >= this.bufStart ? this.buf[src - this.bufStart] : xn;
      this.append(2 * xn - v);
    }
    const outs = Math.ceil(n / this.q);
    const h = this.h;
    const d = this.d;
    let k0 = 0;
    while (this.nextOut < outs) {
      const c = this.q * this.nextOut - this.bufStart;
      let acc = h[d] * this.buf[c];
      for (let k = 0; k < d; k++) acc += h[k] * (this.buf[c + d - k] + this.buf[c - d + k]);
      out[k0++] = acc;
      this.nextOut++;
    }
    return k0;
  }

  /** Upper bound of outputs from pushing n samples (or from finish, n = 0). */
  maxOutputs(n: number): number {
    return Math.ceil((n + this.d + this.q) / this.q) + 1 + Math.ceil(this.pending.length / this.q);
  }
}
