// Ambient mode estimation: the public entry points.
//
//   estimateAmbientWindow(record, options?)           one window from the start of the record
//   scanAmbient(record, options?, onProgress?)        sliding windows over the whole record
//   createAmbientScanner(meta, options?, onWindow)    the same scan fed chunk by chunk (jobs that
//                                                     read samples from storage; bounded memory)
//   modeShapeAt(signals, frequencyHz, options?)       mode shape from the cross-spectral matrix
//
// Method, confidence intervals and forced-oscillation test: see modal/ambient-engine.ts.
// Options, defaults and the one options check: modal/ambient-options.ts (re-exported here).
import { AmbientEngine } from './ambient-engine';
import { principalVector, shapeEntries, maxPhaseCoherence } from './ambient-engine';
import { checkAmbientOptions, type AmbientOptionsInput, type ResolvedAmbientOptions } from './ambient-options';
import { ModalInputError } from './errors';
import { hannWindow } from './spectral';
import type { AmbientWindowResult, SampledRecord, ShapeEntry } from './types';

export {
  DEFAULT_AMBIENT_OPTIONS,
  checkAmbientOptions,
  type AmbientContext,
  type AmbientMethod,
  type AmbientOptions,
  type AmbientOptionsInput,
  type ForcedDetectionOptions,
  type ResolvedAmbientOptions,
} from './ambient-options';

/** Checks the record's structure (not its values); returns the common sample count. */
export function checkRecord(record: SampledRecord): number {
  if (typeof record !== 'object' || record === null) throw new ModalInputError('the record must be an object');
  if (!Number.isFinite(record.rate) || record.rate <= 0) {
    throw new ModalInputError(`record.rate must be a positive number of samples/s, got ${record.rate}`);
  }
  if (!Number.isFinite(record.startTime)) throw new ModalInputError(`record.startTime must be a finite number of epoch seconds, got ${record.startTime}`);
  if (!Array.isArray(record.channels) || record.channels.length === 0) throw new ModalInputError('the record has no channels');
  const names = new Set<string>();
  const n = record.channels[0].values?.length ?? 0;
  for (const ch of record.channels) {
    if (typeof ch.name !== 'string' || ch.name === '') throw new ModalInputError('every channel needs a non-empty name');
    if (names.has(ch.name)) throw new ModalInputError(`the record has two channels named '${ch.name}'`);
    names.add(ch.name);
    if (!(ch.values instanceof Float64Array)) throw new ModalInputError(`channel '${ch.name}': values must be a Float64Array`);
    if (ch.values.length !== n) {
      throw new ModalInputError(
        `channel '${ch.name}' has ${ch.values.length} samples but '${record.channels[0].name}' has ${n}; all channels must have the same length`,
      );
    }
  }
  if (n === 0) throw new ModalInputError('the record has no samples');
  return n;
}

/** Rejects channels that are entirely missing or constant (they carry no oscillation). */
function checkChannelValues(record: SampledRecord, names: string[]): void {
  for (const name of names) {
    const x = record.channels.find((c) => c.name === name)!.values;
    let first = NaN;
    let varies = false;
    for (let i = 0; i < x.length; i++) {
      const v = x[i];
      if (!Number.isFinite(v)) continue;
      if (Number.isNaN(first)) first = v;
      else if (v !== first) {
        varies = true;
        break;
      }
    }
    if (Number.isNaN(first)) throw new ModalInputError(`channel '${name}' has no valid samples (all are missing)`);
    if (!varies) throw new ModalInputError(`channel '${name}' is constant (every sample is ${first}); no oscillation can be estimated from it`);
  }
}

function usedChannels(o: ResolvedAmbientOptions): string[] {
  const names = o.channels.slice();
  if (o.angleReference !== null && o.channels.some((c) => o.angleChannels.includes(c))) names.push(o.angleReference);
  return names;
}

function runEngine(
  record: SampledRecord,
  o: ResolvedAmbientOptions,
  samples: number,
  onWindow: (w: AmbientWindowResult) => void,
): void {
  const names = usedChannels(o);
  checkChannelValues(record, names);
  const arrays = names.map((n) => record.channels.find((c) => c.name === n)!.values);
  const engine = new AmbientEngine(o, { rate: record.rate, startTime: record.startTime, inputNames: names }, onWindow);
  const chunk = Math.max(1, Math.round(600 * record.rate));
  for (let i = 0; i < samples; i += chunk) engine.push(arrays, i, Math.min(samples, i + chunk));
  engine.finish();
}

/**
 * Estimates the ambient modes of ONE window: the first `windowSeconds` of the record (pass
 * `windowSeconds` equal to the record length to use all of it). Gives the same result as the
 * first window of scanAmbient on the same record.
 */
export function estimateAmbientWindow(record: SampledRecord, options?: AmbientOptionsInput): AmbientWindowResult {
  const n = checkRecord(record);
  const o = checkAmbientOptions(options, {
    rate: record.rate,
    channelNames: record.channels.map((c) => c.name),
    durationSeconds: n / record.rate,
  });
  // one window; blocks as a scan with the same options would cut them, so the sums (and the
  // result) are identical to the scan's first window
  const single: ResolvedAmbientOptions = { ...o, stepSamples: o.windowSamples, stepSeconds: o.windowSamples / o.analysisRate };
  // the FIR looks ahead by its delay: feed a little past the window so the end is real data
  const needed = Math.min(n, o.windowSamples * o.factor + 64 * o.factor + 512);
  let result: AmbientWindowResult | null = null;
  runEngine(record, single, needed, (w) => {
    if (!result) result = w;
  });
  if (!result) throw new ModalInputError(`the record is too short for one window of ${o.windowSeconds} s`);
  return result;
}

/**
 * Sliding-window ambient scan of a whole record: windows of `windowSeconds` every `stepSeconds`
 * from the record start, each as estimateAmbientWindow would give it (decimated once for all
 * windows). Windows touching a gap longer than maxGapSeconds, or missing too many samples, are
 * returned with skipped = true and the reason. `onProgress(done, total)` after each window.
 */
export function scanAmbient(
  record: SampledRecord,
  options?: AmbientOptionsInput,
  onProgress?: (done: number, total: number) => void,
): AmbientWindowResult[] {
  const n = checkRecord(record);
  const o = checkAmbientOptions(options, {
    rate: record.rate,
    channelNames: record.channels.map((c) => c.name),
    durationSeconds: n / record.rate,
  });
  const total = AmbientEngine.windowCount(o, n);
  const out: AmbientWindowResult[] = [];
  runEngine(record, o, n, (w) => {
    out.push(w);
    onProgress?.(out.length, total);
  });
  return out;
}

export interface AmbientScanner {
  /** Feeds the next samples: one array per channel of `meta.channelNames`, equal lengths. */
  push(values: ArrayLike<number>[]): void;
  /** Ends the stream, emitting the last complete windows. */
  finish(): void;
}

/**
 * Streaming form of scanAmbient for data that arrives in chunks: windows are passed to `onWindow`
 * as soon as they are complete; memory stays at about one window whatever the record length.
 */
export function createAmbientScanner(
  meta: { rate: number; startTime: number; channelNames: string[] },
  options: AmbientOptionsInput | undefined,
  onWindow: (w: AmbientWindowResult) => void,
): AmbientScanner {
  const o = checkAmbientOptions(options, { rate: meta.rate, channelNames: meta.channelNames });
  if (!Number.isFinite(meta.startTime)) throw new ModalInputError(`startTime must be a finite number of epoch seconds, got ${meta.startTime}`);
  const engine = new AmbientEngine(o, { rate: meta.rate, startTime: meta.startTime, inputNames: meta.channelNames }, onWindow);
  return {
    push(values) {
      if (values.length !== meta.channelNames.length) {
        throw new ModalInputError(`push: expected ${meta.channelNames.length} channel arrays, got ${values.length}`);
      }
      const n = values[0]?.length ?? 0;
      for (const v of values) {
        if (v.length !== n) throw new ModalInputError(`push: the channel arrays differ in length (${n} and ${v.length})`);
      }
      engine.push(values, 0, n);
    },
    finish() {
      engine.finish();
    },
  };
}

// ---------------------------------------------------------------------------------------------
// Mode shape

export interface ModeShapeOptions {
  /** Welch segment length, s. Default 60 (cut to the record length). */
  segmentSeconds?: number;
  /** Channel whose angle is 0. Default: the channel with the largest participation. */
  reference?: string | null;
}

export interface ModeShapeResult {
  frequencyHz: number;
  shape: ShapeEntry[];
  /** Share of the cross-spectral matrix's trace in its first eigenvalue (1 = one coherent mode). */
  dominance: number;
  /** Phase coherence of the projected peak across segments (the forced-oscillation statistic). */
  coherence: number;
  segments: number;
}

export type ShapeInput = SampledRecord | { rate: number; signals: ArrayLike<number>[]; names: string[] };

/**
 * Mode shape at one frequency from the cross-spectral matrix S(f) = E[X(f)·X(f)ᴴ] of the channels
 * (Welch: Hann segments, 50 % overlap, each detrended; DFT evaluated exactly at `frequencyHz`):
 * the first eigenvector (= first singular vector) of S with every channel first scaled to unit
 * variance, scaled back to channel units, magnitudes normalised per unit group (name suffix) and
 * angles relative to the reference channel. Signals are used as given (no unwrapping; pass
 * relative angles for angle channels).
 */
export function modeShapeAt(input: ShapeInput, frequencyHz: number, options: ModeShapeOptions = {}): ModeShapeResult {
  const rate = input.rate;
  const names = 'channels' in input ? input.channels.map((c) => c.name) : input.names;
  const signals = 'channels' in input ? input.channels.map((c) => c.values) : input.signals;
  if (!Number.isFinite(rate) || rate <= 0) throw new ModalInputError(`modeShapeAt: rate must be a positive number of samples/s, got ${rate}`);
  if (signals.length === 0) throw new ModalInputError('modeShapeAt: no channels given');
  if (names.length !== signals.length) throw new ModalInputError(`modeShapeAt: ${names.length} names for ${signals.length} signals`);
  if (!Number.isFinite(frequencyHz) || frequencyHz <= 0 || frequencyHz >= rate / 2) {
    throw new ModalInputError(`modeShapeAt: frequencyHz must lie between 0 and half the rate (${rate / 2} Hz), got ${frequencyHz}`);
  }
  const n = signals[0].length;
  signals.forEach((x, c) => {
    if (x.length !== n) throw new ModalInputError(`modeShapeAt: channel '${names[c]}' has ${x.length} samples, '${names[0]}' has ${n}`);
    for (let i = 0; i < x.length; i++) {
      if (!Number.isFinite(x[i])) throw new ModalInputError(`modeShapeAt: channel '${names[c]}' has a missing sample at index ${i}; fill gaps first`);
    }
  });
  const segSec = options.segmentSeconds ?? 60;
  if (!(segSec > 0)) throw new ModalInputError(`modeShapeAt: segmentSeconds must be positive, got ${segSec}`);
  const nper = Math.min(n, Math.max(2, Math.round(segSec * rate)));
  const hop = Math.max(1, Math.floor(nper / 2));
  const M = Math.floor((n - (nper - hop)) / hop);
  const ref = options.reference ?? null;
  if (ref !== null && !names.includes(ref)) throw new ModalInputError(`modeShapeAt: reference '${ref}' is not one of the channels`);
  const C = signals.length;
  const win = hannWindow(nper);
  const w = (2 * Math.PI * frequencyHz) / rate;
  const cw = new Float64Array(nper);
  const sw = new Float64Array(nper);
  for (let j = 0; j < nper; j++) {
    cw[j] = win[j] * Math.cos(w * j);
    sw[j] = -win[j] * Math.sin(w * j);
  }
  const sd = new Float64Array(C);
  signals.forEach((x, c) => {
    let m = 0;
    for (let i = 0; i < n; i++) m += x[i];
    m /= n;
    let v = 0;
    for (let i = 0; i < n; i++) v += (x[i] - m) ** 2;
    sd[c] = Math.sqrt(v / n);
    if (!(sd[c] > 0)) throw new ModalInputError(`modeShapeAt: channel '${names[c]}' is constant`);
  });
  const vr = new Float64Array(M * C);
  const vi = new Float64Array(M * C);
  for (let s = 0; s < M; s++) {
    const off = s * hop;
    for (let c = 0; c < C; c++) {
      const x = signals[c];
      let mean = 0;
      for (let j = 0; j < nper; j++) mean += x[off + j];
      mean /= nper;
      let a = 0;
      let b = 0;
      for (let j = 0; j < nper; j++) {
        const v = x[off + j] - mean;
        a += v * cw[j];
        b += v * sw[j];
      }
      vr[s * C + c] = a / sd[c];
      vi[s * C + c] = b / sd[c];
    }
  }
  const { ur, ui, lambda, trace } = principalVector(vr, vi, M, C);
  const shape = shapeEntries(
    names,
    Array.from({ length: C }, (_, i) => ({ re: ur[i] * sd[i], im: ui[i] * sd[i], part: Math.hypot(ur[i], ui[i]) })),
    ref,
  );
  const yr = new Float64Array(M);
  const yi = new Float64Array(M);
  for (let s = 0; s < M; s++) {
    let a = 0;
    let b = 0;
    for (let i = 0; i < C; i++) {
      a += ur[i] * vr[s * C + i] + ui[i] * vi[s * C + i];
      b += ur[i] * vi[s * C + i] - ui[i] * vr[s * C + i];
    }
    yr[s] = a;
    yi[s] = b;
  }
  const times = Array.from({ length: M }, (_, s) => (s * hop) / rate);
  const coherence = maxPhaseCoherence(yr, yi, times, frequencyHz, n / rate);
  return { frequencyHz, shape, dominance: trace > 0 ? lambda / trace : 0, coherence, segments: M };
}
