// The streaming engine behind scanAmbient / estimateAmbientWindow.
//
// Pipeline (each input sample is touched once; memory is bounded by one window):
//   raw PMU samples ─ angle channels unwrapped ─ short gaps linearly interpolated (long gaps held
//   and marked) ─ angle channels minus the angle reference ─ linear-phase FIR anti-alias
//   decimation to the analysis rate (only kept outputs computed) ─ DC blocker at bandHz[0]/20 ─
//   per-block sums:
//     • lag products Σ x[t]·x[t−k], k = 0…maxLag, per channel, and the zero-lag products of
//       every pair of channels (blocks of `blockSamples`, so a window's autocovariances and
//       correlation matrix are sums of its blocks' sums: each sample's products are computed
//       once, not once per window);
//     • windowed FFTs of the Welch segments (hop = half a segment) for spectra and mode shapes;
//     • raw-data quality summaries.
//   Per window:
//     1. centred autocovariances of every channel, exactly, and of every jackknife replicate;
//     2. line search (forced oscillations, below) — found lines are removed from the
//        autocovariances so they neither hide nor bias the natural modes next to them;
//     3. stage 1: one AR polynomial (Levinson) or matrix pencil on the autocorrelation pooled over
//        all channels with equal weights → candidate poles in band, damped less than
//        maxDampingPercent;
//     4. stage 2, per candidate (strongest first), Yule-Walker method: the MODAL FILTER — the
//        channel combination y = Σ w_c·x_c/σ_c that puts the largest share of its variance at the
//        candidate's frequency (w: leading generalised eigenvector of the real cross-spectral
//        matrix at that bin against the channels' correlation matrix; the other modes, which carry
//        most of the correlation, are nulled in y) — and a low-order MODIFIED Yule-Walker fit of
//        y's autocovariance (AR order 3, equations from lag 3: modal/ar.ts modifiedYuleWalker).
//        A pooled high-order AR model of all channels splits a well-damped mode that is weak in
//        most channels into two or three poles (measured on the benchmark's simulated Tarrow
//        windows at 2500 MW: the 7.5 % east–west mode came out as two poles, e.g. ≈0.52 + 0.59 Hz,
//        in 2 windows of 3, damping bias +1.5 points, spread 1.7; the 10 % Greyscar local mode,
//        seen in two channels of 21, was never found); y holds one mode on a nearly flat floor,
//        which three poles describe (east–west bias −0.1, spread 0.5; Greyscar found in every
//        window, bias ≈ 0, spread 0.8). The candidate must
//        stand minStrength above the floor of y's spectrum; the other stage-1 poles of a peak
//        already estimated are skipped, and estimates closer than a half-power half-width are one
//        mode (the one standing higher stays). acf-matrix-pencil, or a filter without a pole near
//        the candidate: the stage-1 fit on the autocorrelation pooled with channel weights = each
//        channel's share of its variance at the candidate's frequency, the pole followed by Newton;
//     5. jackknife interval (replicates refit y's autocovariance without each group's lag
//        products, with the same filter), the forced test of the pole, and the MODE SHAPE from
//        residues: the output covariance of a linear system driven by white noise is
//        R(τ) = C·e^{Aτ}·P·Cᵀ = Σ_k (C·v_k)·b_kᵀ·e^{λ_k τ} (τ ≥ 0), so in every channel's
//        cross-correlation with y the coefficient of the mode's own exponential is proportional to
//        the eigenvector C·v; fitting the cross-correlations (lags 1 … 6 s) on the exponentials of
//        all reported modes and the remaining stage-1 poles separates the mode from the spectral
//        tail of a strong neighbour, which bends the first eigenvector of the cross-spectral matrix
//        (measured, median over windows: 17° on the Highmoor channels of the east–west mode, whose
//        north–south tail is as large as its own peak there, 1 window in 3 within 15°; with
//        residues 3–4°, 97 % of windows within 15°, and ≈ 1° for the north–south mode). Without a filter (acf-matrix-pencil): the first eigenvector of the cross-spectral
//        matrix at the mode's bin.
//
// Confidence intervals: delete-a-group jackknife (textbook: Efron & Tibshirani 1993, §11; for
// dependent data the groups are contiguous blocks, Künsch 1989). The window is cut into K
// contiguous groups (default 10 × 2 min); replicate g re-estimates the pole from the
// autocovariances with group g's lag products removed (the replicate pole is the root of the
// replicate polynomial reached by Newton's method from the full-window pole; for the matrix pencil
// the nearest replicate pole). The jackknife standard error se² = (K−1)/K·Σ(θ_g − θ̄)² of frequency
// and damping gives the interval θ̂ ± t_{K−1, (1+level)/2}·se. Its calibration is checked by Monte
// Carlo (modal/ambient.test.ts; scripts/bench/accuracy.ts).
//
// Forced oscillations: a sustained sinusoid keeps its amplitude and a phase that advances exactly
// with its frequency over the whole window; a mode excited by random load changes has a random
// amplitude and phase in each segment once segments are longer than its decay time. Two tests:
//   • line search: each channel's full-window periodogram over its Welch density,
//     Λ = |X(f)|²/W / S_welch(f), ≈ Exp(1) for a smooth spectrum and up to ~1.5·W/segment for a
//     line; the largest local maxima above a screening level are refined to the exact peak
//     frequency, and each channel's complex line amplitude a_c = 2·DTFT/W is measured;
//   • phase coherence of the peak across the window's segments: each segment's DFT vector
//     (channels, scaled to unit variance) at the peak, projected on the line's (or mode's) shape,
//     de-rotated by the peak frequency:
//       R = |Σ_s y_s·e^{−2πi·f·t_s}|² / (M·Σ_s |y_s|²)  (0…1; ≈ 1/M for random phases, → 1 for a line),
//     maximised over f within ±1/T of the peak (T the window length).
// A searched line with R ≥ forced.minCoherence is reported as a forced entry (damping 0 with a
// zero-width interval: a forced oscillation has no damping of its own) and removed before the AR
// fit; an AR pole with apparent damping below forced.maxDampingPercent and R ≥ minCoherence is
// marked forced too. Limitation: a natural mode damped well under 1 % has a decay time comparable
// to a segment and can look coherent (on known-answer data: 2 % of windows at 1 %, 5 % at 0.7 %).
import { ModalInputError } from './errors';
import { arRoots, levinsonDurbin, modifiedYuleWalker, poleToMode, refineArRoot } from './ar';
import { FirDecimator, designDecimator } from './ambient-filters';
import { finalizeSummary, mergeSummaries, summarizeBlock, type QualitySummary } from './ambient-quality';
import { jackknifeSe, medianOf } from './ambient-stats';
import { studentTQuantile } from './student-t';
import { complexEigenvalues, leadingGeneralizedEigenvector, lstsq, lstsqArrays, svd, type Complex } from './linalg';
import { Matrix } from 'ml-matrix';
import { RealDft, hannWindow } from './spectral';
import type { ResolvedAmbientOptions } from './ambient-options';
import type { AmbientMode, AmbientWindowResult, ShapeEntry, WindowQuality } from './types';

// ---------------------------------------------------------------------------------------------
// Small containers

/** Growable FIFO of numbers with absolute indexing. */
class Fifo {
  buf = new Float64Array(4096);
  head = 0; // absolute index of buf[0]
  len = 0;

  get end(): number {
    return this.head + this.len;
  }

  /** Makes room for `extra` more entries. */
  ensure(extra: number): void {
    if (this.len + extra <= this.buf.length) return;
    let cap = this.buf.length;
    while (cap < this.len + extra) cap *= 2;
    const nb = new Float64Array(cap);
    nb.set(this.buf.subarray(0, this.len));
    this.buf = nb;
  }

  push(v: number): void {
    if (this.len === this.buf.length) this.ensure(1);
    this.buf[this.len++] = v;
  }

  get(abs: number): number {
    return this.buf[abs - this.head];
  }

  /** Drops entries before absolute index `abs`. */
  dropBefore(abs: number): void {
    const n = abs - this.head;
    if (n <= 0) return;
    if (n >= this.len) {
      this.head = abs;
      this.len = 0;
      return;
    }
    this.buf.copyWithin(0, n, this.len);
    this.head = abs;
    this.len -= n;
  }
}

/** Linear buffer of the decimated series with absolute indexing and compaction. */
class SeriesBuffer {
  data: Float64Array;
  base = 0;
  len = 0;

  constructor(capacity: number) {
    this.data = new Float64Array(capacity);
  }

  get end(): number {
    return this.base + this.len;
  }

  /** Makes room for n more values, dropping those before `keepFrom` when full. */
  reserve(n: number, keepFrom: number): void {
    if (this.len + n <= this.data.length) return;
    const drop = Math.max(0, Math.min(this.len, keepFrom - this.base));
    if (drop > 0) {
      this.data.copyWithin(0, drop, this.len);
      this.base += drop;
      this.len -= drop;
    }
    if (this.len + n > this.data.length) {
      let cap = this.data.length;
      while (cap < this.len + n) cap *= 2;
      const nd = new Float64Array(cap);
      nd.set(this.data.subarray(0, this.len));
      this.data = nd;
    }
  }
}

/**
 * First-order DC blocker y[n] = x[n] − x[n−1] + ρ·y[n−1], ρ = 1 − 2π·fc/fs (common practice):
 * removes channel offsets (60 Hz, hundreds of MW, steady angles) and drifts slower than fc so the
 * lag-product sums stay well conditioned. With fc = bandHz[0]/20 its gain in the band differs from
 * 1 by < 0.2 % and its phase (≤ 3°) is the same for every channel. Starts from y = 0 at the first
 * sample (no start-up step). A steep high-pass at the band edge would put a spectral null near the
 * band that an AR model cannot follow (it biased damping low by ~0.4 points in tests).
 */
class DcBlocker {
  private readonly rho: number;
  private px = NaN;
  private py = 0;

  constructor(fc: number, fs: number) {
    this.rho = 1 - (2 * Math.PI * fc) / fs;
  }

  step(x: number): number {
    if (this.px !== this.px) this.px = x;
    const y = x - this.px + this.rho * this.py;
    this.px = x;
    this.py = y;
    return y;
  }
}

/** DC-blocker corner = bandHz[0] / this. */
const DC_BLOCK_DIVISOR = 20;

/** Interpolates short gaps, holds through long ones and reports them. */
class GapConditioner {
  readonly out = new Fifo();
  private last = NaN;
  private pending = 0;
  private inLong = false;
  private longStart = 0;
  private seenFinite = false;

  constructor(
    private readonly maxGap: number,
    private readonly onLongGap: (start: number, end: number) => void,
  ) {}

  /** Samples v[0..n) at absolute indices start…start+n−1 (missing samples are NaN). */
  pushChunk(v: Float64Array, n: number, start: number): void {
    const out = this.out;
    out.ensure(n);
    let j = 0;
    while (j < n) {
      if (this.pending === 0 && this.seenFinite) {
        // fast path: copy the run of finite samples up to the next missing one
        let e = j;
        while (e < n && v[e] === v[e]) e++;
        if (e > j) {
          out.buf.set(v.subarray(j, e), out.len);
          out.len += e - j;
          this.last = v[e - 1];
          j = e;
          continue;
        }
      }
      this.push(v[j], start + j);
      j++;
    }
  }

  /** v is the sample at absolute index `i`. */
  push(v: number, i: number): void {
    if (Number.isFinite(v)) {
      if (!this.seenFinite) {
        if (this.pending > this.maxGap) this.onLongGap(i - this.pending, i);
        for (let k = 0; k < this.pending; k++) this.out.push(v);
        this.seenFinite = true;
      } else if (this.pending > 0) {
        if (this.inLong) {
          this.onLongGap(this.longStart, i);
          this.inLong = false;
        } else {
          const a = this.last;
          const span = this.pending + 1;
          for (let k = 1; k <= this.pending; k++) this.out.push(a + ((v - a) * k) / span);
        }
      }
      this.pending = 0;
      this.out.push(v);
      this.last = v;
      return;
    }
    this.pending++;
    if (!this.seenFinite) return;
    if (this.inLong) {
      this.out.push(this.last);
    } else if (this.pending > this.maxGap) {
      this.inLong = true;
      this.longStart = i - this.pending + 1;
      for (let k = 0; k < this.pending; k++) this.out.push(this.last);
    }
  }

  /** Ends the stream at absolute index `end`; false when no finite sample was ever seen. */
  finish(end: number): boolean {
    if (!this.seenFinite) return false;
    if (this.inLong) this.onLongGap(this.longStart, end);
    else for (let k = 0; k < this.pending; k++) this.out.push(this.last);
    this.pending = 0;
    return true;
  }
}

interface LongGap {
  channel: string;
  /** Raw sample indices [start, end). */
  start: number;
  end: number;
}

interface BlockData {
  /** lag[c·(maxLag+1) + k] = Σ_{t∈block} x_c[t]·x_c[t−k] (t − k ≥ 0). */
  lag: Float64Array;
  /** cross[c·nCh + d] = Σ_{t∈block} x_c[t]·x_d[t] for d < c (the modal filter's correlation matrix). */
  cross: Float64Array;
  /** Σ_{t∈block} x_c[t]. */
  sum: Float64Array;
  /** Σ of squared (pre-filter) derived samples, for the constant-channel test. */
  rawSq: Float64Array;
}

interface WindowAcf {
  /** Centred lag sums C_c[k], channel-major (nCh × L). */
  full: Float64Array;
  /** Replicate sums without group g: reps[(c·K + g)·L + k]. */
  reps: Float64Array;
  active: boolean[];
  /** Window standard deviation and mean per channel. */
  sd: Float64Array;
  mean: Float64Array;
  L: number;
}

interface LineInfo {
  frequencyHz: number;
  /** Complex amplitude per analysis channel (channel units): the line is Re(a·e^{iωt}). */
  amp: Complex[];
  coherence: number;
  lambda: number;
  /** Band-bin index of the segment spectra nearest the line. */
  bin: number;
}

/** Result of the modal-filter stage 2 for one candidate. */
interface ModalFilterFit {
  z: Complex;
  reps: ((z: Complex) => Complex | null)[];
  /** Filter weight per analysis channel (on the channel divided by its standard deviation). */
  w: Float64Array;
  /** Welch density of the filter output at a band bin over its median across the band, dB. */
  strengthAt: (bin: number) => number;
  /** The filter output over the window, centred. */
  y: Float64Array;
}

/**
 * Modified Yule-Walker fit of the modal-filter output (modal/ar.ts modifiedYuleWalker): AR order 3
 * (the mode's pole pair and one real pole for the slow drift left in y), equations from lag 3
 * (lags 0–2 carry the measurement noise and the moving-average part of a sampled mode). The
 * equations span MYW_DECAY_SPAN decay times 1/σ of the mode (from a first fit with the fewest),
 * between MYW_MIN_EQUATIONS and MYW_MAX_EQUATIONS lags: a well-damped mode's correlation is gone
 * after a few lags, a lightly damped one's carries information much longer. Chosen on simulated
 * Tarrow data (500–3000 MW, seeds apart from the benchmark's): orders 4–6 or more equations gave
 * a larger spread for the east–west and Greyscar modes, fewer a bias of −0.6 points on a 9 %
 * north–south mode.
 */
const MYW_ORDER = 3;
const MYW_FIRST_LAG = 3;
const MYW_MIN_EQUATIONS = 9;
const MYW_MAX_EQUATIONS = 30;
const MYW_DECAY_SPAN = 0.5;
/**
 * Diagonal loading of the correlation matrix in the modal filter (relative to unit variances):
 * keeps the filter from exploiting directions with almost no variance (differences of bus
 * frequencies that only measurement noise separates).
 */
const MODAL_FILTER_LOADING = 1e-3;
/** The floor of the modal-filter output's spectrum is the median over every this-many-th band bin. */
const SPEC_FLOOR_STRIDE = 6;
/** Span of the cross-correlation lags fitted for residue mode shapes, s (30 lags at 5 samples/s). */
const RESIDUE_SECONDS = 6;
/**
 * A stage-1 pole whose half-power band comes within this many sums of half-widths of a reported
 * mode stands for (part of) that mode's peak and is left out of the residue basis: two nearly
 * collinear exponentials would share the mode's coefficient between them.
 */
const RESIDUE_OVERLAP = 2;

/** Screening threshold of the periodogram/Welch ratio Λ for line candidates. */
const FORCED_SCREEN = 12;
/** Exponent of the per-mode channel weights. */
const MODE_WEIGHT_POWER = 1;
/** Lines tested per window. */
const MAX_LINES = 3;

interface SegmentData {
  /** Band bins of every channel: re/im[c·nb + j]. */
  re: Float64Array;
  im: Float64Array;
}

export interface EngineMeta {
  rate: number;
  startTime: number;
  /** Names of the arrays passed to push(), in order. */
  inputNames: string[];
}

/** Streaming ambient scanner; `onWindow` receives each window as soon as it is complete. */
export class AmbientEngine {
  private readonly o: ResolvedAmbientOptions;
  private readonly meta: EngineMeta;
  private readonly onWindow: (w: AmbientWindowResult) => void;

  // channel bookkeeping
  private readonly used: string[]; // inputs conditioned: analysis channels (+ reference)
  private readonly usedInput: number[]; // index into push() arrays
  private readonly isAngleUsed: boolean[];
  private readonly refUsed: number; // index in `used` of the reference, or −1
  private readonly nCh: number; // analysis channels = used[0..nCh)
  private readonly subtractRef: boolean[];

  // per used input
  private readonly unwrapPrev: Float64Array;
  private readonly unwrapOffset: Float64Array;
  private readonly cond: GapConditioner[];
  private readonly qualityCur: Float64Array[];
  private readonly qualityBlocks: Map<number, QualitySummary>[];
  private readonly firstFinite: Float64Array;
  private readonly varies: boolean[];
  private readonly longGaps: LongGap[] = [];
  private readonly qScratch: Float64Array;

  // per analysis channel
  private readonly dec: FirDecimator[];
  private readonly series: SeriesBuffer[];
  private readonly dcBlock: DcBlocker[];
  private readonly blockRawSq: Float64Array; // accumulating Σ derived² for the current analysis block, per channel
  private readonly decScratch: Float64Array;
  private decOut = new Float64Array(1024);
  private uwScratch = new Float64Array(0);

  private rawCount = 0;
  private derivedCount = 0;
  private readonly rawBlock: number; // raw samples per block
  private nextBlock = 0;
  private nextWindow = 0;
  private readonly blocks = new Map<number, BlockData>();
  private readonly segments = new Map<number, SegmentData>();
  private finished = false;
  private readonly minFlat: number;
  private readonly guardRaw: number;
  private readonly guardAfterRaw: number;

  // spectral constants
  private readonly nfft: number;
  private readonly kLo: number;
  private readonly kHi: number;
  private readonly nb: number;
  private readonly dft: RealDft;
  private readonly hann: Float64Array;
  private readonly tQuant: number;
  private readonly longFft: RealDft;
  private readonly longBuf: Float64Array;
  private readonly longRe: Float64Array;
  private readonly longIm: Float64Array;

  constructor(options: ResolvedAmbientOptions, meta: EngineMeta, onWindow: (w: AmbientWindowResult) => void) {
    this.o = options;
    this.meta = meta;
    this.onWindow = onWindow;
    const idx = new Map(meta.inputNames.map((n, i) => [n, i]));
    for (const c of options.channels) {
      if (!idx.has(c)) throw new ModalInputError(`unknown channel '${c}': the record has no such channel`);
    }
    const angle = new Set(options.angleChannels);
    this.nCh = options.channels.length;
    this.used = options.channels.slice();
    const ref = options.angleReference;
    const needRef = ref !== null && options.channels.some((c) => angle.has(c));
    if (needRef) {
      if (!idx.has(ref)) throw new ModalInputError(`angleReference '${ref}' is not a channel of the record`);
      this.used.push(ref);
    }
    this.refUsed = needRef ? this.used.length - 1 : -1;
    this.usedInput = this.used.map((c) => idx.get(c)!);
    this.isAngleUsed = this.used.map((c) => angle.has(c));
    this.subtractRef = options.channels.map((c) => needRef && angle.has(c));

    const nu = this.used.length;
    const maxGapRaw = Math.floor(options.maxGapSeconds * meta.rate + 1e-9);
    this.unwrapPrev = new Float64Array(nu).fill(NaN);
    this.unwrapOffset = new Float64Array(nu);
    this.cond = this.used.map(
      (name) => new GapConditioner(maxGapRaw, (start, end) => this.longGaps.push({ channel: name, start, end })),
    );
    this.rawBlock = options.blockSamples * options.factor;
    this.qualityCur = this.used.map(() => new Float64Array(this.rawBlock));
    this.qualityBlocks = this.used.map(() => new Map());
    this.firstFinite = new Float64Array(nu).fill(NaN);
    this.varies = this.used.map(() => false);
    this.qScratch = new Float64Array(this.rawBlock);
    this.minFlat = Math.max(2, Math.ceil(meta.rate));

    const h = options.factor > 1 ? designDecimator(meta.rate, options.factor, options.bandHz[1]) : new Float64Array([1]);
    this.dec = options.channels.map(() => new FirDecimator(h, options.factor));
    const cap = options.windowSamples + options.maxLag + 4 * options.blockSamples + 1024;
    this.series = options.channels.map(() => new SeriesBuffer(cap));
    this.dcBlock = options.channels.map(() => new DcBlocker(options.bandHz[0] / DC_BLOCK_DIVISOR, options.analysisRate));
    this.blockRawSq = new Float64Array(this.nCh);
    this.decScratch = new Float64Array(this.rawBlock);
    // A held long gap ends in a step: the FIR spreads it over its length, the DC blocker lets it
    // decay with time constant 1/(2π·fc); ten time constants after the gap it is down to e^−10.
    this.guardRaw = h.length;
    this.guardAfterRaw = h.length + Math.ceil((10 * DC_BLOCK_DIVISOR * meta.rate) / (2 * Math.PI * options.bandHz[0]));

    let nfft = 2;
    while (nfft < options.segmentSamples) nfft *= 2;
    this.nfft = nfft;
    const fsA = options.analysisRate;
    this.kLo = Math.max(1, Math.ceil((options.bandHz[0] * nfft) / fsA));
    this.kHi = Math.min(nfft / 2, Math.floor((options.bandHz[1] * nfft) / fsA));
    this.nb = this.kHi - this.kLo + 1;
    this.dft = new RealDft(nfft);
    this.hann = hannWindow(options.segmentSamples);
    let nL = 2;
    while (nL < options.windowSamples) nL *= 2;
    this.longFft = new RealDft(nL);
    this.longBuf = new Float64Array(nL);
    this.longRe = new Float64Array(nL / 2 + 1);
    this.longIm = new Float64Array(nL / 2 + 1);
    this.tQuant = studentTQuantile((1 + options.confidenceLevel) / 2, options.jackknifeGroups - 1);
  }

  /** Feeds the next samples of every input (arrays in meta.inputNames order, equal lengths). */
  push(arrays: ArrayLike<number>[], from = 0, to = arrays[0]?.length ?? 0): void {
    if (this.finished) throw new ModalInputError('the ambient scanner has already finished');
    if (arrays.length !== this.meta.inputNames.length) {
      throw new ModalInputError(`push: expected ${this.meta.inputNames.length} channel arrays, got ${arrays.length}`);
    }
    let i = from;
    while (i < to) {
      // sub-chunks end on raw block boundaries so quality blocks close in order
      const blockEnd = (Math.floor(this.rawCount / this.rawBlock) + 1) * this.rawBlock;
      const n = Math.min(to - i, blockEnd - this.rawCount);
      this.ingest(arrays, i, i + n);
      i += n;
      this.derive();
      this.process();
    }
  }

  /** Ends the stream and emits the remaining complete windows. */
  finish(): void {
    if (this.finished) return;
    this.finished = true;
    // close the partial quality block
    const part = this.rawCount % this.rawBlock;
    if (part > 0) {
      const b = Math.floor(this.rawCount / this.rawBlock);
      for (let u = 0; u < this.used.length; u++) {
        this.qualityBlocks[u].set(b, summarizeBlock(this.qualityCur[u], 0, part, this.minFlat, this.qScratch));
      }
    }
    for (let u = 0; u < this.used.length; u++) {
      if (!this.cond[u].finish(this.rawCount)) {
        throw new ModalInputError(`channel '${this.used[u]}' has no valid samples (all are missing)`);
      }
      if (!this.varies[u]) {
        throw new ModalInputError(`channel '${this.used[u]}' is constant (every sample is ${this.firstFinite[u]}); no oscillation can be estimated from it`);
      }
    }
    this.derive();
    for (let c = 0; c < this.nCh; c++) {
      const need = this.dec[c].maxOutputs(0);
      if (this.decOut.length < need) this.decOut = new Float64Array(need);
      const k = this.dec[c].finish(this.decOut);
      this.appendSeries(c, this.decOut, k, this.keepFrom());
    }
    this.process();
  }

  /** Windows expected for a record of `rawSamples` samples. */
  static windowCount(o: ResolvedAmbientOptions, rawSamples: number): number {
    const na = Math.ceil(rawSamples / o.factor);
    if (na < o.windowSamples) return 0;
    return Math.floor((na - o.windowSamples) / o.stepSamples) + 1;
  }

  // -------------------------------------------------------------------------------------------

  private ingest(arrays: ArrayLike<number>[], from: number, to: number): void {
    const start = this.rawCount;
    const offInBlock = start % this.rawBlock;
    const n = to - from;
    if (this.uwScratch.length < n) this.uwScratch = new Float64Array(n);
    const uw = this.uwScratch;
    for (let u = 0; u < this.used.length; u++) {
      const x = arrays[this.usedInput[u]];
      const q = this.qualityCur[u];
      const typed = x instanceof Float64Array;
      if (typed) q.set(x.subarray(from, to), offInBlock);
      else for (let j = 0; j < n; j++) q[offInBlock + j] = x[from + j];
      if (!this.varies[u]) {
        let first = this.firstFinite[u];
        for (let j = 0; j < n; j++) {
          const v = x[from + j];
          if (v - v !== 0) continue;
          if (first !== first) first = v;
          else if (v !== first) {
            this.varies[u] = true;
            break;
          }
        }
        this.firstFinite[u] = first;
      }
      if (!this.isAngleUsed[u]) {
        // ±Inf count as missing: map every non-finite sample to NaN
        let clean = typed;
        if (typed) {
          for (let j = 0; j < n; j++) {
            const v = x[from + j];
            if (v - v !== 0) {
              clean = false;
              break;
            }
          }
        }
        if (clean) {
          this.cond[u].pushChunk((x as Float64Array).subarray(from, to), n, start);
        } else {
          for (let j = 0; j < n; j++) {
            const v = x[from + j];
            uw[j] = v - v === 0 ? v : NaN;
          }
          this.cond[u].pushChunk(uw, n, start);
        }
        continue;
      }
      let prev = this.unwrapPrev[u];
      let offset = this.unwrapOffset[u];
      for (let j = 0; j < n; j++) {
        let v = x[from + j];
        if (v - v === 0) {
          // numpy.unwrap rule with period 360°, continuing across missing samples
          if (prev === prev) {
            const dd = v - prev;
            if (dd >= 180 || dd <= -180) {
              let ddmod = ((((dd + 180) % 360) + 360) % 360) - 180;
              if (ddmod === -180 && dd > 0) ddmod = 180;
              offset += ddmod - dd;
            }
          }
          prev = v;
          v += offset;
        } else v = NaN;
        uw[j] = v;
      }
      this.cond[u].pushChunk(uw, n, start);
      this.unwrapPrev[u] = prev;
      this.unwrapOffset[u] = offset;
    }
    this.rawCount += n;
    if (this.rawCount % this.rawBlock === 0) {
      const b = this.rawCount / this.rawBlock - 1;
      for (let u = 0; u < this.used.length; u++) {
        this.qualityBlocks[u].set(b, summarizeBlock(this.qualityCur[u], 0, this.rawBlock, this.minFlat, this.qScratch));
      }
    }
  }

  /** DC-blocks decimated values v[0..n) and appends them to channel c's series. */
  private appendSeries(c: number, v: Float64Array, n: number, keep: number): void {
    const s = this.series[c];
    const dc = this.dcBlock[c];
    s.reserve(n, keep);
    const data = s.data;
    let len = s.len;
    for (let i = 0; i < n; i++) data[len++] = dc.step(v[i]);
    s.len = len;
  }

  private keepFrom(): number {
    const o = this.o;
    return Math.min(this.nextWindow * o.stepSamples, this.nextBlock * o.blockSamples) - o.maxLag - 1;
  }

  /** Angle differences, decimation and high-pass for the conditioned samples all inputs have. */
  private derive(): void {
    let ready = Infinity;
    for (const c of this.cond) ready = Math.min(ready, c.out.end);
    if (!(ready > this.derivedCount)) return;
    const from = this.derivedCount;
    const n = ready - from;
    const refFifo = this.refUsed >= 0 ? this.cond[this.refUsed].out : null;
    const keep = this.keepFrom();
    for (let c = 0; c < this.nCh; c++) {
      let scratch = this.decScratch;
      if (scratch.length < n) scratch = new Float64Array(n);
      const f = this.cond[c].out;
      const fo = from - f.head;
      const fb = f.buf;
      let sq = 0;
      if (this.subtractRef[c] && refFifo) {
        const rb = refFifo.buf;
        const ro = from - refFifo.head;
        for (let i = 0; i < n; i++) scratch[i] = fb[fo + i] - rb[ro + i];
      } else {
        for (let i = 0; i < n; i++) scratch[i] = fb[fo + i];
      }
      for (let i = 0; i < n; i++) sq += scratch[i] * scratch[i];
      this.blockRawSq[c] += sq;
      const need = this.dec[c].maxOutputs(n);
      if (this.decOut.length < need) this.decOut = new Float64Array(need);
      const k = this.dec[c].push(scratch, 0, n, this.decOut);
      this.appendSeries(c, this.decOut, k, keep);
    }
    this.derivedCount = ready;
    for (const c of this.cond) c.out.dropBefore(ready);
  }

  private process(): void {
    const o = this.o;
    let ready = Infinity;
    for (const s of this.series) ready = Math.min(ready, s.end);
    while ((this.nextBlock + 1) * o.blockSamples <= ready) {
      this.computeBlock(this.nextBlock);
      this.nextBlock++;
    }
    for (;;) {
      const ws = this.nextWindow * o.stepSamples;
      const we = ws + o.windowSamples;
      if (we > ready) break;
      this.emitWindow(ws, we);
      this.nextWindow++;
      const firstBlock = Math.floor((this.nextWindow * o.stepSamples) / o.blockSamples);
      for (const b of this.blocks.keys()) if (b < firstBlock) this.blocks.delete(b);
      for (let u = 0; u < this.used.length; u++) {
        for (const b of this.qualityBlocks[u].keys()) if (b < firstBlock) this.qualityBlocks[u].delete(b);
      }
      const firstSeg = Math.ceil((this.nextWindow * o.stepSamples) / o.segmentHop);
      for (const s of this.segments.keys()) if (s < firstSeg) this.segments.delete(s);
    }
  }

  private computeBlock(b: number): void {
    const o = this.o;
    const L = o.maxLag + 1;
    const B = o.blockSamples;
    const lag = new Float64Array(this.nCh * L);
    const t0 = b * B;
    for (let c = 0; c < this.nCh; c++) {
      const s = this.series[c];
      const x = s.data;
      const off = t0 - s.base;
      for (let k = 0; k < L; k++) {
        const tStart = Math.max(0, k - t0); // products with t − k < 0 (before the record) are skipped
        let a = 0;
        for (let t = tStart; t < B; t++) a += x[off + t] * x[off + t - k];
        lag[c * L + k] = a;
      }
    }
    const C = this.nCh;
    const cross = new Float64Array(C * C);
    const sum = new Float64Array(C);
    const xs = this.series.map((s) => s.data.subarray(t0 - s.base, t0 - s.base + B));
    for (let c = 0; c < C; c++) {
      const xc = xs[c];
      let a = 0;
      for (let t = 0; t < B; t++) a += xc[t];
      sum[c] = a;
      for (let d = 0; d < c; d++) {
        const xd = xs[d];
        let p = 0;
        for (let t = 0; t < B; t++) p += xc[t] * xd[t];
        cross[c * C + d] = p;
      }
    }
    const rawSq = this.blockRawSq.slice();
    this.blockRawSq.fill(0);
    this.blocks.set(b, { lag, cross, sum, rawSq });
  }

  private segment(sIdx: number): SegmentData {
    let seg = this.segments.get(sIdx);
    if (seg) return seg;
    const o = this.o;
    const n = o.segmentSamples;
    const t0 = sIdx * o.segmentHop;
    const nb = this.nb;
    const re = new Float64Array(this.nCh * nb);
    const im = new Float64Array(this.nCh * nb);
    const buf = new Float64Array(n);
    const bins = this.dft.bins;
    const fr = new Float64Array(bins);
    const fi = new Float64Array(bins);
    for (let c = 0; c < this.nCh; c++) {
      const s = this.series[c];
      const off = t0 - s.base;
      let mean = 0;
      for (let j = 0; j < n; j++) mean += s.data[off + j];
      mean /= n;
      for (let j = 0; j < n; j++) buf[j] = (s.data[off + j] - mean) * this.hann[j];
      this.dft.transform(buf, fr, fi, n);
      for (let j = 0; j < nb; j++) {
        re[c * nb + j] = fr[this.kLo + j];
        im[c * nb + j] = fi[this.kLo + j];
      }
    }
    seg = { re, im };
    this.segments.set(sIdx, seg);
    return seg;
  }

  // -------------------------------------------------------------------------------------------
  // One window

  private windowQuality(ws: number, we: number): Record<string, WindowQuality> {
    const o = this.o;
    const b0 = Math.floor(ws / o.blockSamples);
    const b1 = Math.ceil(we / o.blockSamples);
    const out: Record<string, WindowQuality> = {};
    for (let u = 0; u < this.used.length; u++) {
      let acc: QualitySummary | null = null;
      for (let b = b0; b < b1; b++) {
        const s = this.qualityBlocks[u].get(b);
        if (!s) continue;
        acc = acc ? mergeSummaries(acc, s, this.minFlat) : s;
      }
      out[this.used[u]] = acc
        ? finalizeSummary(acc, this.minFlat)
        : { samples: 0, dropouts: 0, gaps: 0, longestGap: 0, flatLine: 0, outliers: 0 };
    }
    return out;
  }

  private skipReason(ws: number, we: number, quality: Record<string, WindowQuality>): string | null {
    const o = this.o;
    const rate = this.meta.rate;
    const rs = ws * o.factor;
    const re = we * o.factor;
    for (const g of this.longGaps) {
      if (g.start - this.guardRaw < re && g.end + this.guardAfterRaw > rs) {
        const secs = (g.end - g.start) / rate;
        return (
          `channel '${g.channel}' has a gap of ${+secs.toFixed(2)} s at +${+(g.start / rate).toFixed(2)} s ` +
          `(longer than maxGapSeconds ${o.maxGapSeconds} s) in or next to this window`
        );
      }
    }
    for (const name of this.used) {
      const q = quality[name];
      if (q.samples > 0 && (100 * q.dropouts) / q.samples > o.maxMissingPercent) {
        return `channel '${name}' misses ${+((100 * q.dropouts) / q.samples).toFixed(1)} % of its samples in this window (limit maxMissingPercent ${o.maxMissingPercent} %)`;
      }
    }
    return null;
  }

  private emitWindow(ws: number, we: number): void {
    const o = this.o;
    const rate = this.meta.rate;
    const start = this.meta.startTime + (ws * o.factor) / rate;
    const end = start + o.windowSamples / o.analysisRate;
    const quality = this.windowQuality(ws, we);
    const reason = this.skipReason(ws, we, quality);
    if (reason) {
      this.onWindow({ start, end, modes: [], quality, skipped: true, reason });
      return;
    }
    const est = this.estimate(ws, we);
    if (typeof est === 'string') {
      this.onWindow({ start, end, modes: [], quality, skipped: true, reason: est });
      return;
    }
    this.onWindow({ start, end, modes: est, quality, skipped: false });
  }

  /**
   * Centred lag-product sums of every channel over the window, C_c[k] = Σ_{t=ws+k}^{we−1}
   * (x[t] − m)(x[t−k] − m) (m the window mean), and the same without each jackknife group's
   * products (t in the group) — exact, the mean terms from prefix sums of the window.
   */
  private autocorrelations(ws: number, we: number): WindowAcf | string {
    const o = this.o;
    const L = o.maxLag + 1;
    const W = o.windowSamples;
    const K = o.jackknifeGroups;
    const B = o.blockSamples;
    const perGroup = o.groupSamples / B;
    const b0 = ws / B;
    const C = this.nCh;
    const full = new Float64Array(C * L);
    const reps = new Float64Array(C * K * L);
    const active: boolean[] = [];
    const sd = new Float64Array(C);
    const mean = new Float64Array(C);
    let nActive = 0;
    const G = Array.from({ length: K }, () => new Float64Array(L));
    const prefix = new Float64Array(W + L);
    for (let c = 0; c < C; c++) {
      let rawSq = 0;
      for (let g = 0; g < K; g++) {
        G[g].fill(0);
        for (let j = 0; j < perGroup; j++) {
          const blk = this.blocks.get(b0 + g * perGroup + j)!;
          const base = c * L;
          for (let k = 0; k < L; k++) G[g][k] += blk.lag[base + k];
          rawSq += blk.rawSq[c];
        }
      }
      // products reaching before the window start belong to no group
      const s = this.series[c];
      const x = s.data;
      const off = ws - s.base;
      for (let k = 1; k < L; k++) {
        let e = 0;
        for (let t = Math.max(0, k - ws); t < k; t++) e += x[off + t] * x[off + t - k];
        G[0][k] -= e;
      }
      // prefix sums P[i] = Σ x[ws − L + 1 … ws − L + i) for the exact mean terms of every group
      const pOff = off - (L - 1);
      prefix[0] = 0;
      for (let i = 0; i < W + L - 1; i++) prefix[i + 1] = prefix[i] + (pOff + i >= 0 ? x[pOff + i] : 0);
      const P = (t: number): number => prefix[t - ws + L - 1]; // Σ x[ws − L + 1 … t)
      const X = P(we) - P(ws);
      const m = X / W;
      mean[c] = m;
      const fc = full.subarray(c * L, (c + 1) * L);
      fc.fill(0);
      for (let g = 0; g < K; g++) {
        const a = ws + g * o.groupSamples;
        const b = a + o.groupSamples;
        const Cg = G[g];
        for (let k = 0; k < L; k++) {
          const t0 = Math.max(a, ws + k);
          const n = b - t0;
          const A = P(b) - P(t0);
          const Bk = P(b - k) - P(t0 - k);
          Cg[k] = Cg[k] - m * (A + Bk) + n * m * m; // centred sum of group g's products
          fc[k] += Cg[k];
        }
      }
      const varC = fc[0] / W;
      const rawMeanSq = rawSq / (W * o.factor);
      if (!(varC > 1e-24 * (1 + rawMeanSq))) {
        active.push(false);
        continue;
      }
      active.push(true);
      nActive++;
      sd[c] = Math.sqrt(varC);
      for (let g = 0; g < K; g++) {
        const rep = reps.subarray((c * K + g) * L, (c * K + g + 1) * L);
        for (let k = 0; k < L; k++) rep[k] = fc[k] - G[g][k];
      }
    }
    if (nActive === 0) return 'no analysed channel varies in this window';
    return { full, reps, active, sd, mean, L };
  }

  /**
   * Pooled normalised autocorrelation (mean over active channels of C_c[k]/C_c[0]) of the window
   * and of each jackknife replicate, after removing detected lines: a sinusoid of complex
   * amplitude a adds (|a|²/2)·cos(ωk) per sample pair to the autocovariance.
   */
  private pooled(ac: WindowAcf, lines: LineInfo[], weights: Float64Array | null): { full: Float64Array; reps: Float64Array[] } {
    const o = this.o;
    const L = ac.L;
    const K = o.jackknifeGroups;
    const W = o.windowSamples;
    const Wg = W - o.groupSamples;
    const full = new Float64Array(L);
    const reps = Array.from({ length: K }, () => new Float64Array(L));
    const lineAcf = new Float64Array(L);
    let n = 0;
    for (let c = 0; c < this.nCh; c++) {
      if (!ac.active[c]) continue;
      const wc = weights ? weights[c] : 1;
      if (!(wc > 0)) continue;
      n += wc;
      lineAcf.fill(0);
      for (const ln of lines) {
        const p = 0.5 * (ln.amp[c].re ** 2 + ln.amp[c].im ** 2);
        const w = (2 * Math.PI * ln.frequencyHz) / o.analysisRate;
        for (let k = 0; k < L; k++) lineAcf[k] += p * Math.cos(w * k);
      }
      const fc = ac.full.subarray(c * L, (c + 1) * L);
      const v0 = Math.max(fc[0] / W - lineAcf[0], 0.05 * (fc[0] / W)) / wc;
      for (let k = 0; k < L; k++) full[k] += (fc[k] / W - (lineAcf[k] * (W - k)) / W) / v0;
      for (let g = 0; g < K; g++) {
        const rep = ac.reps.subarray((c * K + g) * L, (c * K + g + 1) * L);
        const r0 = Math.max(rep[0] / Wg - lineAcf[0], 0.05 * (rep[0] / Wg)) / wc;
        const out = reps[g];
        for (let k = 0; k < L; k++) out[k] += (rep[k] / Wg - (lineAcf[k] * (Wg - k)) / Wg) / r0;
      }
    }
    for (let k = 0; k < L; k++) full[k] /= n;
    for (const rep of reps) for (let k = 0; k < L; k++) rep[k] /= n;
    return { full, reps };
  }


  /**
   * Line (sustained sinusoid) search: each channel's full-window periodogram against its Welch
   * estimate (Λ = |X(f)|²/W over the segment-averaged density; ≈ Exp(1) for a smooth spectrum,
   * up to ~1.5·W/segment for a pure line). The largest local maxima above forcedScreen are refined
   * to the exact peak frequency and confirmed by the multichannel phase coherence R ≥ minCoherence.
   */
  private detectLines(ws: number, segs: SegmentData[], segIdx: number[], ac: WindowAcf): LineInfo[] {
    const o = this.o;
    const W = o.windowSamples;
    const fsA = o.analysisRate;
    const C = this.nCh;
    const nL = this.longFft.n;
    const kL0 = Math.max(1, Math.ceil((o.bandHz[0] * nL) / fsA));
    const kL1 = Math.min(nL / 2, Math.floor((o.bandHz[1] * nL) / fsA));
    const nbL = kL1 - kL0 + 1;
    const buf = this.longBuf;
    const re = this.longRe;
    const im = this.longIm;
    // Welch density per channel and coarse bin (un-normalised units, Σw² scale)
    let w2 = 0;
    for (let j = 0; j < this.hann.length; j++) w2 += this.hann[j] * this.hann[j];
    const M = segs.length;
    const cands: { c: number; k: number; lambda: number }[] = [];
    const welchC = new Float64Array(this.nb);
    const lam = new Float64Array(nbL);
    for (let c = 0; c < C; c++) {
      if (!ac.active[c]) continue;
      welchC.fill(0);
      for (const seg of segs) {
        for (let j = 0; j < this.nb; j++) {
          const a = seg.re[c * this.nb + j];
          const b = seg.im[c * this.nb + j];
          welchC[j] += a * a + b * b;
        }
      }
      for (let j = 0; j < this.nb; j++) welchC[j] /= M * w2;
      const s = this.series[c];
      const off = ws - s.base;
      const m = ac.mean[c];
      for (let t = 0; t < W; t++) buf[t] = s.data[off + t] - m;
      buf.fill(0, W);
      this.longFft.transform(buf, re, im, nL);
      const map = this.lineBinMap(kL0, nbL, nL);
      for (let i = 0; i < nbL; i++) {
        const k = kL0 + i;
        const d = welchC[map[i]];
        lam[i] = d > 0 ? (re[k] * re[k] + im[k] * im[k]) / W / d : 0;
      }
      for (let i = 1; i < nbL - 1; i++) {
        if (lam[i] >= FORCED_SCREEN && lam[i] >= lam[i - 1] && lam[i] > lam[i + 1]) cands.push({ c, k: kL0 + i, lambda: lam[i] });
      }
    }
    cands.sort((p, q) => q.lambda - p.lambda);
    const T = W / fsA;
    const lines: LineInfo[] = [];
    const tried: number[] = [];
    for (const cand of cands) {
      if (lines.length >= MAX_LINES || tried.length >= 2 * MAX_LINES) break;
      const f0 = (cand.k * fsA) / nL;
      if (tried.some((f) => Math.abs(f - f0) < 3 / T)) continue;
      tried.push(f0);
      // refine on the screening channel: golden-section maximum of |DTFT|² within ±1 FFT bin
      const s = this.series[cand.c];
      const x = s.data.subarray(ws - s.base, ws - s.base + W);
      const m = ac.mean[cand.c];
      const fRef = goldenMax((f) => dtftPower(x, m, f / fsA), f0 - fsA / nL, f0 + fsA / nL, 1e-7);
      const amp: Complex[] = [];
      for (let c = 0; c < C; c++) {
        if (!ac.active[c]) {
          amp.push({ re: 0, im: 0 });
          continue;
        }
        const sc = this.series[c];
        const xc = sc.data.subarray(ws - sc.base, ws - sc.base + W);
        const d = dtft(xc, ac.mean[c], fRef / fsA);
        amp.push({ re: (2 * d.re) / W, im: (2 * d.im) / W });
      }
      // multichannel phase coherence across segments, projected on the line's own shape
      const bin = Math.min(this.kHi, Math.max(this.kLo, Math.round((fRef * this.nfft) / fsA))) - this.kLo;
      let nu = 0;
      const ur = new Float64Array(C);
      const ui = new Float64Array(C);
      for (let c = 0; c < C; c++) {
        if (!ac.active[c]) continue;
        ur[c] = amp[c].re / ac.sd[c];
        ui[c] = amp[c].im / ac.sd[c];
        nu += ur[c] * ur[c] + ui[c] * ui[c];
      }
      nu = Math.sqrt(nu) || 1;
      const yr = new Float64Array(M);
      const yi = new Float64Array(M);
      for (let si = 0; si < M; si++) {
        let a = 0;
        let b = 0;
        for (let c = 0; c < C; c++) {
          if (!ac.active[c]) continue;
          const vr = segs[si].re[c * this.nb + bin] / ac.sd[c];
          const vi = segs[si].im[c * this.nb + bin] / ac.sd[c];
          a += (ur[c] * vr + ui[c] * vi) / nu;
          b += (ur[c] * vi - ui[c] * vr) / nu;
        }
        yr[si] = a;
        yi[si] = b;
      }
      const times = segIdx.map((sIdx) => (sIdx * o.segmentHop - ws) / fsA);
      const coherence = maxPhaseCoherence(yr, yi, times, fRef, T);
      if (coherence >= o.forced.minCoherence) lines.push({ frequencyHz: fRef, amp, coherence, lambda: cand.lambda, bin });
    }
    return lines;
  }

  private binMap: Int32Array | null = null;
  /** Band bin of the segment spectra nearest each band bin of the full-window periodogram. */
  private lineBinMap(kL0: number, nbL: number, nL: number): Int32Array {
    if (this.binMap && this.binMap.length === nbL) return this.binMap;
    const fsA = this.o.analysisRate;
    const map = new Int32Array(nbL);
    for (let i = 0; i < nbL; i++) {
      const f = ((kL0 + i) * fsA) / nL;
      map[i] = Math.min(this.nb - 1, Math.max(0, Math.round((f * this.nfft) / fsA) - this.kLo));
    }
    this.binMap = map;
    return map;
  }

  private estimate(ws: number, we: number): AmbientMode[] | string {
    const o = this.o;
    const ac = this.autocorrelations(ws, we);
    if (typeof ac === 'string') return ac;
    const fsA = o.analysisRate;
    const [lo, hi] = o.bandHz;
    const T = o.windowSamples / fsA;
    const segIdx: number[] = [];
    for (let s = Math.ceil(ws / o.segmentHop); s * o.segmentHop + o.segmentSamples <= we; s++) segIdx.push(s);
    const segs = segIdx.map((s) => this.segment(s));
    const lines = o.forced.enabled ? this.detectLines(ws, segs, segIdx, ac) : [];
    const stage1 = this.fitModel(this.pooled(ac, lines, null));
    if (typeof stage1 === 'string') return stage1;
    const modes: AmbientMode[] = [];
    const trace = this.bandTrace(segs, ac.active, ac.sd);
    const floor = medianOf(trace);
    // strength: the peak over the floor in dB (see AmbientMode.strength)
    const strengthAt = (bin: number): number => peakDb(trace[bin], floor);
    // a line removed from the autocorrelation can leave a residual pole next to it
    const lineGuardHz = Math.max(3 / T, (1.5 * o.analysisRate) / o.segmentSamples);
    const taken: Complex[] = [];
    let R0: Float64Array | null = null;
    const natural: AmbientMode[] = [];
    const filterOf = new Map<Complex, ModalFilterFit>();
    const poleOf = new Map<AmbientMode, Complex>();
    const binOf = (f: number) => Math.min(this.kHi, Math.max(this.kLo, Math.round((f * this.nfft) / fsA))) - this.kLo;
    // candidates strongest first, so that the other poles of a split peak find their mode taken
    const candidates = stage1.poles
      .filter((z1) => z1.im > 0)
      .map((z1) => ({ z1, m1: poleToMode(z1, fsA) }))
      // a stable system's ambient response decays; a non-decaying pole is a line (searched above)
      .filter(({ m1 }) => m1.frequencyHz >= lo && m1.frequencyHz <= hi && m1.dampingPercent > 0 && m1.dampingPercent < o.maxDampingPercent)
      .sort((a, b) => strengthAt(binOf(b.m1.frequencyHz)) - strengthAt(binOf(a.m1.frequencyHz)));
    for (const { z1, m1 } of candidates) {
      const bin1 = binOf(m1.frequencyHz);
      // another pole of a peak already estimated (an AR model splits a broad peak)
      if (o.method === 'yule-walker' && natural.some((k) => Math.abs(k.frequencyHz - m1.frequencyHz) < -k.sigma / (2 * Math.PI))) continue;
      let z = z1;
      let repPoles = stage1.reps;
      let filter: ModalFilterFit | null = null;
      if (o.method === 'yule-walker') {
        // stage 2 (Yule-Walker): modal filter + modified Yule-Walker (see the file header); poles
        // on the floor of the filter output's spectrum model noise, not a mode
        R0 ??= this.channelCorrelation(ws, ac);
        const fit = this.modalFilterFit(ws, segs, bin1, z1, ac, lines, R0);
        if (fit && fit.z === null) continue; // on the floor of the filter output's spectrum
        if (fit) {
          filter = fit;
          z = fit.z;
          repPoles = fit.reps;
        }
      }
      if (!filter) {
        // poles on the spectral floor model noise, not a mode: not reported (and not worth refitting)
        if (strengthAt(bin1) < o.minStrength) continue;
        // stage 2 (pencil, or when the modal filter finds no pole): refit with channels weighted
        // by how much of their variance sits at this mode
        const weights = this.modeWeights(segs, bin1, ac);
        if (weights) {
          const fit2 = this.fitModel(this.pooled(ac, lines, weights));
          if (typeof fit2 !== 'string') {
            const z2 = fit2.locate(z1);
            if (z2) {
              z = z2;
              repPoles = fit2.reps;
            }
          }
        }
      }
      // two candidates can lead to the same stage-2 pole
      if (taken.some((t) => Math.hypot(t.re - z.re, t.im - z.im) < 1e-4)) continue;
      const m = poleToMode(z, fsA);
      if (m.frequencyHz < lo || m.frequencyHz > hi) continue;
      if (!(m.dampingPercent > 0 && m.dampingPercent < o.maxDampingPercent)) continue;
      if (lines.some((ln) => Math.abs(ln.frequencyHz - m.frequencyHz) < lineGuardHz && m.dampingPercent < o.forced.maxDampingPercent)) continue;
      taken.push(z);
      const fr: number[] = [];
      const dr: number[] = [];
      for (const rp of repPoles) {
        const zz = rp(z);
        if (!zz) continue;
        const mm = poleToMode(zz, fsA);
        fr.push(mm.frequencyHz);
        dr.push(mm.dampingPercent);
      }
      let fCi: [number, number];
      let dCi: [number, number];
      if (fr.length >= Math.max(3, o.jackknifeGroups - 2)) {
        const sf = jackknifeSe(fr);
        const sdmp = jackknifeSe(dr);
        fCi = [m.frequencyHz - this.tQuant * sf, m.frequencyHz + this.tQuant * sf];
        dCi = [m.dampingPercent - this.tQuant * sdmp, m.dampingPercent + this.tQuant * sdmp];
      } else {
        // the pole is not found again in most replicates: no usable interval; say so by width
        fCi = [lo, hi];
        dCi = [0, o.maxDampingPercent];
      }
      const bin = binOf(m.frequencyHz);
      const strength = filter ? filter.strengthAt(bin) : strengthAt(bin);
      if (strength < o.minStrength) continue;
      const sh = this.shapeAndForced(segs, segIdx, bin, m.frequencyHz, m.dampingPercent, ac.active, ac.sd, ws, filter?.w ?? null);
      if (filter) filterOf.set(z, filter);
      const mode: AmbientMode = {
        ...m,
        dampingCi: dCi,
        frequencyCi: fCi,
        confidenceLevel: o.confidenceLevel,
        forced: sh.forced,
        shape: sh.shape,
        strength,
        ...(sh.coherence !== null ? { coherence: sh.coherence } : {}),
      };
      natural.push(mode);
      poleOf.set(mode, z);
    }
    // Split peaks: several stage-1 poles of one broad peak lead, through their modal filters, to
    // nearly the same mode. Poles closer than the larger half-power half-width (σ/2π Hz) are one
    // mode; the estimate standing highest above its filter's floor stays.
    natural.sort((a, b) => b.strength - a.strength);
    const hw = (x: AmbientMode) => -x.sigma / (2 * Math.PI);
    for (const cand of natural) {
      if (!modes.some((k) => Math.abs(k.frequencyHz - cand.frequencyHz) < Math.max(hw(k), hw(cand)))) modes.push(cand);
    }
    // Residue shapes (modes from the modal filter): the basis is every reported mode's pole plus
    // the stage-1 poles that stand for no reported mode (real, out of band, on the floor away from
    // the modes), so each mode's coefficient is its own.
    const own = modes.map((k) => poleOf.get(k)!);
    const others = stage1.poles.filter((p) => {
      if (p.im < 0) return false;
      if (p.im === 0) return true;
      const pm = poleToMode(p, fsA);
      return !modes.some((k) => Math.abs(k.frequencyHz - pm.frequencyHz) < RESIDUE_OVERLAP * (hw(k) - pm.sigma / (2 * Math.PI)));
    });
    modes.forEach((k, i) => {
      const f = filterOf.get(own[i]);
      if (!f) return;
      const shape = this.residueShape(ws, ac, f.y, [own[i], ...own.filter((_, j) => j !== i), ...others]);
      if (shape) k.shape = shape;
    });
    for (const ln of lines) {
      // a forced oscillation has no damping of its own: reported as 0 % with a zero-width interval;
      // its frequency is resolved to about ±1/(2T) by the full-window periodogram
      const chans: number[] = [];
      for (let c = 0; c < this.nCh; c++) if (ac.active[c]) chans.push(c);
      const shape = shapeEntries(
        chans.map((c) => o.channels[c]),
        chans.map((c) => ({ re: ln.amp[c].re, im: ln.amp[c].im, part: Math.hypot(ln.amp[c].re, ln.amp[c].im) / ac.sd[c] })),
        o.shapeReference,
      );
      const omega = 2 * Math.PI * ln.frequencyHz;
      modes.push({
        frequencyHz: ln.frequencyHz,
        dampingRatio: 0,
        dampingPercent: 0,
        sigma: 0,
        omega,
        dampingCi: [0, 0],
        frequencyCi: [ln.frequencyHz - 0.5 / T, ln.frequencyHz + 0.5 / T],
        confidenceLevel: o.confidenceLevel,
        forced: true,
        shape,
        strength: strengthAt(ln.bin),
        coherence: ln.coherence,
      });
    }
    modes.sort((p, q) => p.frequencyHz - q.frequencyHz);
    return modes;
  }

  /**
   * Poles of the pooled autocorrelation by the configured method, with a function per jackknife
   * replicate that finds the replicate's pole next to a given pole, and `locate` for this model's
   * pole next to a given one (Newton on the AR polynomial; nearest pencil pole otherwise).
   */
  private fitModel(
    pooled: { full: Float64Array; reps: Float64Array[] },
  ): { poles: Complex[]; reps: ((z: Complex) => Complex | null)[]; locate: (z: Complex) => Complex | null } | string {
    const o = this.o;
    if (o.method === 'yule-walker') {
      let a: Float64Array;
      try {
        a = levinsonDurbin(pooled.full, o.arOrder).a;
      } catch {
        return 'the autocorrelation of this window is not positive definite (numerically degenerate data)';
      }
      let poles: Complex[] | null = null;
      const getPoles = (): Complex[] => (poles ??= arRoots(a));
      const reps = pooled.reps.map((r) => {
        let ra: Float64Array | null = null;
        try {
          ra = levinsonDurbin(r, o.arOrder).a;
        } catch {
          ra = null;
        }
        return (z: Complex) => (ra ? refineArRoot(ra, z) : null);
      });
      const locate = (z: Complex): Complex | null => refineArRoot(a, z) ?? nearestPole(getPoles(), z, 0.05);
      return {
        get poles() {
          return getPoles();
        },
        reps,
        locate,
      };
    }
    const W = o.windowSamples;
    const unbiased = (r: Float64Array): Float64Array => {
      const u = new Float64Array(r.length);
      for (let k = 0; k < r.length; k++) u[k] = (r[k] * W) / (W - k);
      return u;
    };
    let poles: Complex[];
    let order: number;
    try {
      ({ poles, order } = acfPencilPoles(unbiased(pooled.full), o.arOrder));
    } catch {
      return 'the matrix pencil of this window failed (numerically degenerate data)';
    }
    const reps = pooled.reps.map((r) => {
      let ps: Complex[] | null = null;
      return (z: Complex) => {
        if (!ps) {
          try {
            ps = acfPencilPoles(unbiased(r), o.arOrder, order).poles;
          } catch {
            ps = [];
          }
        }
        return nearestPole(ps, z, 0.2);
      };
    });
    return { poles, reps, locate: (z: Complex) => nearestPole(poles, z, 0.05) };
  }

  /**
   * Channel weights for one mode: each channel's share of its variance at the mode's bin
   * (normalised Welch density), so channels where the mode stands out carry the estimate and
   * channels where it is buried under other modes and noise do not bias it. Null when no channel
   * shows the mode.
   */
  private modeWeights(segs: SegmentData[], bin: number, ac: WindowAcf): Float64Array | null {
    const w = new Float64Array(this.nCh);
    let tot = 0;
    for (let c = 0; c < this.nCh; c++) {
      if (!ac.active[c]) continue;
      let p = 0;
      for (const seg of segs) {
        const r = seg.re[c * this.nb + bin];
        const i = seg.im[c * this.nb + bin];
        p += r * r + i * i;
      }
      p /= segs.length * ac.sd[c] * ac.sd[c];
      w[c] = Math.pow(p, MODE_WEIGHT_POWER);
      tot += w[c];
    }
    return tot > 0 ? w : null;
  }

  /**
   * Correlation matrix of the analysis channels over the window (centred, each channel divided by
   * its window standard deviation; inactive channels get a unit diagonal and no coupling).
   */
  private channelCorrelation(ws: number, ac: WindowAcf): Float64Array {
    const C = this.nCh;
    const o = this.o;
    const W = o.windowSamples;
    const B = o.blockSamples;
    const R = new Float64Array(C * C);
    const sum = new Float64Array(C);
    const b0 = ws / B;
    for (let b = b0; b < b0 + W / B; b++) {
      const blk = this.blocks.get(b)!;
      for (let k = 0; k < C * C; k++) R[k] += blk.cross[k];
      for (let c = 0; c < C; c++) sum[c] += blk.sum[c];
    }
    for (let c = 0; c < C; c++) {
      for (let d = 0; d < c; d++) {
        // centred: Σ(x_c − m_c)(x_d − m_d) = Σ x_c·x_d − W·m_c·m_d, with m = Σx/W
        const v = ac.active[c] && ac.active[d] ? (R[c * C + d] - (sum[c] * sum[d]) / W) / (W * ac.sd[c] * ac.sd[d]) : 0;
        R[c * C + d] = v;
        R[d * C + c] = v;
      }
      R[c * C + c] = 1;
    }
    return R;
  }

  /**
   * Stage 2 of the Yule-Walker method for one candidate: the modal filter — the channel
   * combination y = Σ w_c·x_c/σ_c whose variance is most concentrated at the candidate's bin
   * (w maximises wᵀ·Re S(f)·w / wᵀ·R₀·w, S the cross-spectral matrix, R₀ the correlation matrix;
   * other modes, which carry most of R₀, are nulled in y) — then a low-order modified Yule-Walker
   * fit on y's autocovariance, lags MYW_FIRST_LAG… (modal/ar.ts modifiedYuleWalker). Jackknife
   * replicates refit y's autocovariance without each group's lag products, with the same filter.
   * `z: null` when the candidate's bin stands less than minStrength above the floor of y's
   * spectrum (a pole that only shapes the noise floor); null when no filter or no pole is found
   * (the caller falls back to the channel-weighted pooled fit).
   */
  private modalFilterFit(
    ws: number,
    segs: SegmentData[],
    bin: number,
    z1: Complex,
    ac: WindowAcf,
    lines: LineInfo[],
    R0: Float64Array,
  ): ModalFilterFit | { z: null; strengthAt: (bin: number) => number } | null {
    const o = this.o;
    const C = this.nCh;
    const nb = this.nb;
    const W = o.windowSamples;
    const K = o.jackknifeGroups;
    const G = o.groupSamples;
    const chans: number[] = [];
    for (let c = 0; c < C; c++) if (ac.active[c]) chans.push(c);
    const n = chans.length;
    // Re S at the bin (normalised channels), summed over segments; R₀ with a little diagonal loading
    const A = new Float64Array(n * n);
    const vr = new Float64Array(n);
    const vi = new Float64Array(n);
    for (const seg of segs) {
      for (let i = 0; i < n; i++) {
        vr[i] = seg.re[chans[i] * nb + bin] / ac.sd[chans[i]];
        vi[i] = seg.im[chans[i] * nb + bin] / ac.sd[chans[i]];
      }
      for (let i = 0; i < n; i++) {
        for (let j = 0; j <= i; j++) A[i * n + j] += vr[i] * vr[j] + vi[i] * vi[j];
      }
    }
    let traceA = 0;
    for (let i = 0; i < n; i++) traceA += A[i * n + i];
    if (!(traceA > 0)) return null;
    for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) A[j * n + i] = A[i * n + j];
    const B = new Float64Array(n * n);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) B[i * n + j] = R0[chans[i] * C + chans[j]];
      B[i * n + i] += MODAL_FILTER_LOADING;
    }
    let gen: { lambda: number; w: Float64Array };
    try {
      gen = leadingGeneralizedEigenvector(A, B, n);
    } catch {
      return null;
    }
    const w = new Float64Array(C);
    chans.forEach((c, i) => (w[c] = gen.w[i]));
    // the filter output's Welch density at a band bin (memoised); its floor is the median over
    // every SPEC_FLOOR_STRIDE-th bin of the band (a floor needs no more)
    const spec = new Float64Array(nb).fill(-1);
    const gains = chans.map((c) => w[c] / ac.sd[c]);
    const specAt = (j: number): number => {
      if (spec[j] >= 0) return spec[j];
      let p = 0;
      for (const seg of segs) {
        let yr = 0;
        let yi = 0;
        for (let i = 0; i < n; i++) {
          yr += gains[i] * seg.re[chans[i] * nb + j];
          yi += gains[i] * seg.im[chans[i] * nb + j];
        }
        p += yr * yr + yi * yi;
      }
      spec[j] = p;
      return p;
    };
    const floorBins: number[] = [];
    for (let j = 0; j < nb; j += SPEC_FLOOR_STRIDE) floorBins.push(specAt(j));
    const specFloor = medianOf(floorBins);
    const strengthAt = (j: number): number => peakDb(specAt(j), specFloor);
    if (strengthAt(bin) < o.minStrength) return { z: null, strengthAt };
    // y over the window, centred
    const y = new Float64Array(W);
    for (const c of chans) {
      const s = this.series[c];
      const x = s.data;
      const off = ws - s.base;
      const g = w[c] / ac.sd[c];
      const m = ac.mean[c];
      for (let t = 0; t < W; t++) y[t] += g * (x[off + t] - m);
    }
    // lag-product sums of y per jackknife group, lags 0…L−1 (grown on demand)
    let L = 0;
    let groups: Float64Array[] = [];
    let full = new Float64Array(0);
    let lineAcf = new Float64Array(0);
    const ensureLags = (need: number): void => {
      if (need <= L) return;
      const grown = groups.length ? groups : Array.from({ length: K }, () => new Float64Array(0));
      groups = grown.map((old, g) => {
        const acc = new Float64Array(need);
        acc.set(old);
        const a = g * G;
        const b = a + G;
        for (let k = L; k < need; k++) {
          let sum = 0;
          for (let t = Math.max(a, k); t < b; t++) sum += y[t] * y[t - k];
          acc[k] = sum;
        }
        return acc;
      });
      L = need;
      full = new Float64Array(L);
      for (const acc of groups) for (let k = 0; k < L; k++) full[k] += acc[k];
      // a detected line adds (|a_y|²/2)·cos(ωk) per sample pair, a_y its complex amplitude in y
      lineAcf = new Float64Array(L);
      for (const ln of lines) {
        let ar = 0;
        let ai = 0;
        for (const c of chans) {
          ar += (w[c] * ln.amp[c].re) / ac.sd[c];
          ai += (w[c] * ln.amp[c].im) / ac.sd[c];
        }
        const pw = 0.5 * (ar * ar + ai * ai);
        const om = (2 * Math.PI * ln.frequencyHz) / o.analysisRate;
        for (let k = 0; k < L; k++) lineAcf[k] += pw * Math.cos(om * k);
      }
    };
    const acfOf = (sum: Float64Array, count: number): Float64Array => {
      const r = new Float64Array(L);
      for (let k = 0; k < L; k++) r[k] = sum[k] / count - (lineAcf[k] * (count - k)) / count;
      return r;
    };
    const fsA = o.analysisRate;
    // the pole of a fit nearest the candidate's frequency (a decaying complex root)
    const nearestRoot = (a: Float64Array, fRef: number): Complex | null => {
      let z: Complex | null = null;
      let best = Infinity;
      for (const r of arRoots(a)) {
        if (!(r.im > 0)) continue;
        const mm = poleToMode(r, fsA);
        if (!(mm.dampingPercent > 0 && mm.dampingPercent < o.maxDampingPercent)) continue;
        const d = Math.abs(mm.frequencyHz - fRef);
        if (d < best) {
          best = d;
          z = r;
        }
      }
      return z;
    };
    const fit = (eq: number): Complex | null => {
      ensureLags(MYW_FIRST_LAG + eq);
      try {
        return nearestRoot(modifiedYuleWalker(acfOf(full, W), MYW_ORDER, MYW_FIRST_LAG, eq), poleToMode(z1, fsA).frequencyHz);
      } catch {
        return null;
      }
    };
    // equations spanning about MYW_DECAY_SPAN decay times (1/σ) of the mode, from a first fit
    const z0 = fit(MYW_MIN_EQUATIONS);
    if (!z0) return null;
    const decay = fsA / Math.max(1e-9, -poleToMode(z0, fsA).sigma);
    const eq = Math.min(MYW_MAX_EQUATIONS, Math.max(MYW_MIN_EQUATIONS, Math.round(MYW_DECAY_SPAN * decay)));
    const z = eq === MYW_MIN_EQUATIONS ? z0 : fit(eq);
    if (!z) return null;
    const reps = groups.map((acc) => {
      const rep = new Float64Array(L);
      for (let k = 0; k < L; k++) rep[k] = full[k] - acc[k];
      let ra: Float64Array | null;
      try {
        ra = modifiedYuleWalker(acfOf(rep, W - G), MYW_ORDER, MYW_FIRST_LAG, eq);
      } catch {
        ra = null;
      }
      return (zz: Complex) => (ra ? refineArRoot(ra, zz) : null);
    });
    return { z, reps, w, strengthAt, y };
  }

  /**
   * Mode shape from the residues of the channels' cross-correlation with the modal-filter output:
   * for τ ≥ 0, E[x(t+τ)·y(t)] = Σ_k (C·v_k)·b_k·e^{λ_k τ} (output covariance of a linear system
   * driven by white noise, R(τ) = C·e^{Aτ}·P·Cᵀ), so the coefficient of the mode's own exponential
   * is proportional to its eigenvector C·v in every channel, whatever the other modes and the
   * correlation of their excitation. The cross-correlations at lags 1 … RESIDUE_SECONDS (at least
   * twice the unknowns) are fitted by least squares on the exponentials of `basis`, the mode's own
   * pole first (the caller leaves out poles that stand for part of a reported mode's peak).
   */
  private residueShape(ws: number, ac: WindowAcf, y: Float64Array, basis: Complex[]): ShapeEntry[] | null {
    const o = this.o;
    const W = o.windowSamples;
    const poles = basis.filter((p, i) => i === 0 || (Math.hypot(p.re, p.im) > 0.05 && Math.hypot(p.re, p.im) < 1.2));
    let ncols = 0;
    for (const p of poles) ncols += p.im > 0 ? 2 : 1;
    // lags: RESIDUE_SECONDS, and at least twice the unknowns
    const Lx = Math.max(Math.round(RESIDUE_SECONDS * o.analysisRate), 2 * ncols);
    // basis columns: Re z^τ, Im z^τ per complex pole (first the mode's own), z^τ per real pole
    const cols: Float64Array[] = [];
    for (const p of poles) {
      const re = new Float64Array(Lx);
      const im = new Float64Array(Lx);
      let pr = p.re;
      let pi = p.im;
      for (let t = 0; t < Lx; t++) {
        re[t] = pr;
        im[t] = pi;
        const nr = pr * p.re - pi * p.im;
        pi = pr * p.im + pi * p.re;
        pr = nr;
      }
      cols.push(re);
      if (p.im > 0) cols.push(im);
    }
    const nc = cols.length;
    if (nc >= Lx) return null;
    // The mode's two coefficients are linear in the cross-correlations: (α, β) = Σ_τ h_τ·ρ_c(τ),
    // h the first two rows of the basis pseudo-inverse. And Σ_τ h_τ·Σ_t x_c[t+τ]·y[t] =
    // Σ_t x_c[t]·u[t] with u[t] = Σ_{τ ≤ t} h_τ·y[t−τ] (exactly, window edges included), so each
    // channel costs one inner product instead of a lag sum per lag.
    const A = new Float64Array(Lx * nc);
    for (let t = 0; t < Lx; t++) for (let j = 0; j < nc; j++) A[t * nc + j] = cols[j][t];
    const eye = new Float64Array(Lx * Lx);
    for (let t = 0; t < Lx; t++) eye[t * Lx + t] = 1;
    let pinv: Matrix;
    try {
      pinv = lstsqArrays(A, Lx, nc, eye, Lx, 1e-10, true).x;
    } catch {
      return null;
    }
    const u = [new Float64Array(W), new Float64Array(W)];
    for (let r = 0; r < 2; r++) {
      const ur = u[r];
      for (let tau = 1; tau <= Lx; tau++) {
        const h = pinv.get(r, tau - 1);
        for (let t = tau; t < W; t++) ur[t] += h * y[t - tau];
      }
    }
    const chans: number[] = [];
    for (let c = 0; c < this.nCh; c++) if (ac.active[c]) chans.push(c);
    // α·Re z^τ + β·Im z^τ = Re((α − iβ)·z^τ)
    const resp = chans.map((c) => {
      const s = this.series[c];
      const x = s.data;
      const off = ws - s.base;
      const m = ac.mean[c];
      let a = 0;
      let b = 0;
      for (let t = 0; t < W; t++) {
        const v = x[off + t] - m;
        a += v * u[0][t];
        b += v * u[1][t];
      }
      return { re: a / W, im: -b / W, part: Math.hypot(a, b) / (W * ac.sd[c]) };
    });
    return shapeEntries(
      chans.map((c) => o.channels[c]),
      resp,
      o.shapeReference,
    );
  }

  /** Normalised spectral trace per band bin: Σ over active channels and segments of |X/σ|². */
  private bandTrace(segs: SegmentData[], active: boolean[], sd: Float64Array): Float64Array {
    const nb = this.nb;
    const out = new Float64Array(nb);
    for (let c = 0; c < this.nCh; c++) {
      if (!active[c]) continue;
      const w = 1 / (sd[c] * sd[c]);
      for (const seg of segs) {
        const re = seg.re;
        const im = seg.im;
        const o = c * nb;
        for (let j = 0; j < nb; j++) out[j] += (re[o + j] * re[o + j] + im[o + j] * im[o + j]) * w;
      }
    }
    return out;
  }

  private shapeAndForced(
    segs: SegmentData[],
    segIdx: number[],
    bin: number,
    freq: number,
    dampingPercent: number,
    active: boolean[],
    sd: Float64Array,
    ws: number,
    filterW: Float64Array | null = null,
  ): { shape: ShapeEntry[]; forced: boolean; trace: number; coherence: number | null } {
    const o = this.o;
    const nb = this.nb;
    const chans: number[] = [];
    for (let c = 0; c < this.nCh; c++) if (active[c]) chans.push(c);
    const n = chans.length;
    const M = segs.length;
    // normalised segment DFTs at the bin: v[s][i] for active channel i
    const vr = new Float64Array(M * n);
    const vi = new Float64Array(M * n);
    for (let s = 0; s < M; s++) {
      for (let i = 0; i < n; i++) {
        const c = chans[i];
        vr[s * n + i] = segs[s].re[c * nb + bin] / sd[c];
        vi[s * n + i] = segs[s].im[c * nb + bin] / sd[c];
      }
    }
    const pv = principalVector(vr, vi, M, n);
    const trace = pv.trace;
    const { ur, ui } = filterW ? filterCrossSpectrum(vr, vi, M, n, chans.map((c) => filterW[c])) : pv;
    const shape = shapeEntries(
      chans.map((c) => this.o.channels[c]),
      Array.from(chans, (c, i) => ({ re: ur[i] * sd[c], im: ui[i] * sd[c], part: Math.hypot(ur[i], ui[i]) })),
      this.o.shapeReference,
    );
    let coherence: number | null = null;
    let forced = false;
    if (o.forced.enabled && dampingPercent < o.forced.maxDampingPercent) {
      const yr = new Float64Array(M);
      const yi = new Float64Array(M);
      for (let s = 0; s < M; s++) {
        let a = 0;
        let b = 0;
        for (let i = 0; i < n; i++) {
          // conj(u)·v
          a += ur[i] * vr[s * n + i] + ui[i] * vi[s * n + i];
          b += ur[i] * vi[s * n + i] - ui[i] * vr[s * n + i];
        }
        yr[s] = a;
        yi[s] = b;
      }
      const times = segIdx.map((sIdx) => (sIdx * o.segmentHop - ws) / o.analysisRate);
      const T = o.windowSamples / o.analysisRate;
      coherence = maxPhaseCoherence(yr, yi, times, freq, T);
      forced = coherence >= o.forced.minCoherence;
    }
    return { shape, forced, trace: trace / n, coherence };
  }
}

// ---------------------------------------------------------------------------------------------
// Helpers shared with modeShapeAt

/** 10·log10(peak / floor), dB; −100 dB when either is not positive (nothing stands out). */
function peakDb(peak: number, floor: number): number {
  return peak > 0 && floor > 0 ? Math.max(-100, 10 * Math.log10(peak / floor)) : -100;
}

function nearestPole(poles: Complex[], z: Complex, maxDist: number): Complex | null {
  let best: Complex | null = null;
  let bd = maxDist;
  for (const p of poles) {
    const d = Math.hypot(p.re - z.re, p.im - z.im);
    if (d < bd) {
      bd = d;
      best = p;
    }
  }
  return best;
}

/**
 * Principal eigenvector of the Hermitian cross-spectral matrix S = (1/M)·Σ_s v_s·v_sᴴ of M
 * complex vectors v_s (length n, row-major in vr/vi), by power iteration (S is n×n, small).
 * Returns the unit vector and trace(S).
 */
export function principalVector(
  vr: Float64Array,
  vi: Float64Array,
  M: number,
  n: number,
): { ur: Float64Array; ui: Float64Array; lambda: number; trace: number } {
  const sr = new Float64Array(n * n);
  const si = new Float64Array(n * n);
  for (let s = 0; s < M; s++) {
    const o = s * n;
    for (let i = 0; i < n; i++) {
      const ar = vr[o + i];
      const ai = vi[o + i];
      for (let j = 0; j < n; j++) {
        const br = vr[o + j];
        const bi = vi[o + j];
        // v_i·conj(v_j)
        sr[i * n + j] += ar * br + ai * bi;
        si[i * n + j] += ai * br - ar * bi;
      }
    }
  }
  let trace = 0;
  for (let i = 0; i < n; i++) trace += sr[i * n + i];
  trace /= Math.max(1, M);
  // start from the column of the largest diagonal entry
  let start = 0;
  for (let i = 1; i < n; i++) if (sr[i * n + i] > sr[start * n + start]) start = i;
  const ur = new Float64Array(n);
  const ui = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    ur[i] = sr[i * n + start];
    ui[i] = si[i * n + start];
  }
  let lambda = 0;
  const nr = new Float64Array(n);
  const ni = new Float64Array(n);
  for (let it = 0; it < 100; it++) {
    let norm = 0;
    for (let i = 0; i < n; i++) norm += ur[i] * ur[i] + ui[i] * ui[i];
    norm = Math.sqrt(norm);
    if (!(norm > 0)) break;
    for (let i = 0; i < n; i++) {
      ur[i] /= norm;
      ui[i] /= norm;
    }
    for (let i = 0; i < n; i++) {
      let a = 0;
      let b = 0;
      for (let j = 0; j < n; j++) {
        const mr = sr[i * n + j];
        const mi = si[i * n + j];
        a += mr * ur[j] - mi * ui[j];
        b += mr * ui[j] + mi * ur[j];
      }
      nr[i] = a;
      ni[i] = b;
    }
    let l = 0;
    let diff = 0;
    for (let i = 0; i < n; i++) l += nr[i] * ur[i] + ni[i] * ui[i];
    for (let i = 0; i < n; i++) {
      const dr = nr[i] - l * ur[i];
      const di = ni[i] - l * ui[i];
      diff += dr * dr + di * di;
    }
    lambda = l;
    for (let i = 0; i < n; i++) {
      ur[i] = nr[i];
      ui[i] = ni[i];
    }
    if (Math.sqrt(diff) <= 1e-10 * Math.abs(l)) break;
  }
  let norm = 0;
  for (let i = 0; i < n; i++) norm += ur[i] * ur[i] + ui[i] * ui[i];
  norm = Math.sqrt(norm) || 1;
  for (let i = 0; i < n; i++) {
    ur[i] /= norm;
    ui[i] /= norm;
  }
  return { ur, ui, lambda: lambda / Math.max(1, M), trace };
}

/**
 * Cross-spectrum of every channel with a modal filter's output y = Σ w_i·v_i at the bin,
 * S_iy = (1/M)·Σ_s v_{s,i}·conj(y_s) (normalised channels), as a unit vector like
 * principalVector's: the projection vector of the forced test for a mode found through a modal
 * filter, and its shape until the residue fit replaces it. (Not a shape estimate to trust next to
 * a strong mode: the neighbour's spectral tail still enters through its excitation's correlation
 * with the mode's — the residue fit removes it.)
 */
export function filterCrossSpectrum(
  vr: Float64Array,
  vi: Float64Array,
  M: number,
  n: number,
  w: ArrayLike<number>,
): { ur: Float64Array; ui: Float64Array } {
  const ur = new Float64Array(n);
  const ui = new Float64Array(n);
  for (let s = 0; s < M; s++) {
    let yr = 0;
    let yi = 0;
    for (let i = 0; i < n; i++) {
      yr += w[i] * vr[s * n + i];
      yi += w[i] * vi[s * n + i];
    }
    for (let i = 0; i < n; i++) {
      // v·conj(y)
      ur[i] += vr[s * n + i] * yr + vi[s * n + i] * yi;
      ui[i] += vi[s * n + i] * yr - vr[s * n + i] * yi;
    }
  }
  let norm = 0;
  for (let i = 0; i < n; i++) norm += ur[i] * ur[i] + ui[i] * ui[i];
  norm = Math.sqrt(norm) || 1;
  for (let i = 0; i < n; i++) {
    ur[i] /= norm;
    ui[i] /= norm;
  }
  return { ur, ui };
}

function unitGroup(name: string): string {
  const dot = name.lastIndexOf('.');
  return dot >= 0 ? name.slice(dot + 1) : '';
}

/**
 * Shape entries from complex channel responses: magnitudes scaled so the largest channel of each
 * unit group (name suffix: angle, freq, mw, …) is 1; angles relative to `reference` (default the
 * channel with the largest participation `part`), in (−180°, 180°].
 */
export function shapeEntries(
  names: string[],
  resp: { re: number; im: number; part: number }[],
  reference: string | null,
): ShapeEntry[] {
  let refIdx = reference === null ? -1 : names.indexOf(reference);
  if (refIdx < 0) {
    refIdx = 0;
    for (let i = 1; i < resp.length; i++) if (resp[i].part > resp[refIdx].part) refIdx = i;
  }
  const refAngle = Math.atan2(resp[refIdx]?.im ?? 0, resp[refIdx]?.re ?? 1);
  const groupMax = new Map<string, number>();
  resp.forEach((r, i) => {
    const g = unitGroup(names[i]);
    groupMax.set(g, Math.max(groupMax.get(g) ?? 0, Math.hypot(r.re, r.im)));
  });
  return resp.map((r, i) => {
    const mag = Math.hypot(r.re, r.im);
    const gm = groupMax.get(unitGroup(names[i])) ?? 0;
    let ang = ((Math.atan2(r.im, r.re) - refAngle) * 180) / Math.PI;
    ang = ((((ang + 180) % 360) + 360) % 360) - 180;
    if (ang === -180) ang = 180;
    if (i === refIdx) ang = 0;
    return { channel: names[i], magnitude: gm > 0 ? mag / gm : 0, angleDeg: ang };
  });
}

/**
 * max over f ∈ f0 ± 1/T (steps of 1/(4T)) of |Σ y_s e^{−2πi f t_s}|² / (M·Σ|y_s|²).
 */
export function maxPhaseCoherence(yr: Float64Array, yi: Float64Array, times: number[], f0: number, T: number): number {
  const M = yr.length;
  let p = 0;
  for (let s = 0; s < M; s++) p += yr[s] * yr[s] + yi[s] * yi[s];
  if (!(p > 0)) return 0;
  let best = 0;
  for (let j = -4; j <= 4; j++) {
    const f = f0 + j / (4 * T);
    let a = 0;
    let b = 0;
    for (let s = 0; s < M; s++) {
      const ph = -2 * Math.PI * f * times[s];
      const c = Math.cos(ph);
      const sn = Math.sin(ph);
      a += yr[s] * c - yi[s] * sn;
      b += yr[s] * sn + yi[s] * c;
    }
    const r = (a * a + b * b) / (M * p);
    if (r > best) best = r;
  }
  return best;
}

/** Σ_t (x[t] − m)·e^{−iωt} at ω = 2π·(normalised frequency f), by a rotation recurrence. */
export function dtft(x: ArrayLike<number>, m: number, f: number): Complex {
  const w = 2 * Math.PI * f;
  const cr = Math.cos(w);
  const ci = -Math.sin(w);
  let pr = 1;
  let pi = 0;
  let ar = 0;
  let ai = 0;
  for (let t = 0; t < x.length; t++) {
    const v = x[t] - m;
    ar += v * pr;
    ai += v * pi;
    const npr = pr * cr - pi * ci;
    pi = pr * ci + pi * cr;
    pr = npr;
    if ((t & 1023) === 1023) {
      // re-anchor the rotation to stop rounding drift
      pr = Math.cos(w * (t + 1));
      pi = -Math.sin(w * (t + 1));
    }
  }
  return { re: ar, im: ai };
}

function dtftPower(x: ArrayLike<number>, m: number, f: number): number {
  const d = dtft(x, m, f);
  return d.re * d.re + d.im * d.im;
}

/** Maximiser of a unimodal function on [a, b] by golden-section search. */
function goldenMax(fn: (x: number) => number, a: number, b: number, tol: number): number {
  const g = (Math.sqrt(5) - 1) / 2;
  let x1 = b - g * (b - a);
  let x2 = a + g * (b - a);
  let f1 = fn(x1);
  let f2 = fn(x2);
  for (let i = 0; i < 60 && b - a > tol; i++) {
    if (f1 < f2) {
      a = x1;
      x1 = x2;
      f1 = f2;
      x2 = a + g * (b - a);
      f2 = fn(x2);
    } else {
      b = x2;
      x2 = x1;
      f2 = f1;
      x1 = b - g * (b - a);
      f1 = fn(x1);
    }
  }
  return f1 > f2 ? x1 : x2;
}

/** Singular values below this fraction of the largest are noise for the pencil's order. */
export const PENCIL_REL_TOL = 0.01;
/** A ratio of consecutive singular values at least this marks the end of the signal subspace. */
export const PENCIL_GAP = 3;

/**
 * Matrix pencil on an autocorrelation sequence r[0…M] (lags 1…M used; lag 0 carries the
 * measurement noise): Hankel matrix with pencil L = ⌊M/3⌋ (paper: Sarkar & Pereira 1995, L in
 * N/3…N/2), SVD, the dominant right singular vectors, poles = eigenvalues of V1⁺·V2. The order is
 * where the singular values last drop clearly (see PENCIL_GAP), at most `order` (or exactly
 * `fixedOrder` when given, so jackknife replicates keep the full window's order): surplus orders
 * fit the estimation noise of the long lags with spurious, nearly undamped poles.
 */
export function acfPencilPoles(r: Float64Array, order: number, fixedOrder?: number): { poles: Complex[]; order: number } {
  const M = r.length - 1;
  const L = Math.floor(M / 3);
  const rows = M - L;
  const Y = new Matrix(rows, L + 1);
  for (let i = 0; i < rows; i++) for (let j = 0; j <= L; j++) Y.set(i, j, r[1 + i + j]);
  const dec = svd(Y, { computeLeftSingularVectors: false, computeRightSingularVectors: true });
  const V = dec.rightSingularVectors;
  const sv = dec.diagonal;
  let p = fixedOrder ?? 0;
  if (fixedOrder === undefined) {
    // the signal subspace ends at the last clear drop (≥ PENCIL_GAP) between consecutive singular
    // values above PENCIL_REL_TOL of the largest; noise singular values fall off gently
    const maxP = Math.min(order, L);
    p = 2;
    for (let k = 2; k <= maxP && sv[k - 1] >= PENCIL_REL_TOL * sv[0]; k++) {
      if (k < sv.length && sv[k - 1] / sv[k] >= PENCIL_GAP) p = k;
    }
  }
  p = Math.min(p, L);
  const V1 = new Matrix(L, p);
  const V2 = new Matrix(L, p);
  for (let i = 0; i < L; i++) {
    for (let j = 0; j < p; j++) {
      V1.set(i, j, V.get(i, j));
      V2.set(i, j, V.get(i + 1, j));
    }
  }
  const A = lstsq(V1, V2);
  return { poles: complexEigenvalues(A), order: p };
}
