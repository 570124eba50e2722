// Options of the ambient mode estimator: the documented defaults and the ONE options check.
import { TARROW_ANGLE_REFERENCE } from '../fixtures/tarrow-network';
import { ModalInputError } from './errors';

export type AmbientMethod = 'yule-walker' | 'acf-matrix-pencil';

/** Forced-oscillation detection (see modal/ambient-engine.ts for the test). */
export interface ForcedDetectionOptions {
  /** Run the test at all. Default true. */
  enabled: boolean;
  /**
   * An AR pole damped less than this, percent, is tested and can be marked forced (a sinusoid fitted
   * by an AR model looks undamped); a line found by the periodogram search needs no such check.
   * Default 1.5.
   */
  maxDampingPercent: number;
  /**
   * Minimum phase coherence of the peak across the window's spectral segments, 0…1: the
   * segments' DFTs at the peak, de-rotated by the peak frequency, add up in phase for a sustained
   * sinusoid (→ 1) and at random for a mode excited by random load changes (→ about 1/segments).
   * Default 0.5.
   */
  minCoherence: number;
}

/**
 * Options of estimateAmbientWindow / scanAmbient. Every field has a default
 * (DEFAULT_AMBIENT_OPTIONS); pass only what differs.
 */
export interface AmbientOptions {
  /** Analysis window, s. Default 1200 (20 min; common practice 10–20 min). */
  windowSeconds: number;
  /** Window step of scanAmbient, s. Default 60. */
  stepSeconds: number;
  /**
   * Band of reported modes, Hz [low, high]. The decimation keeps [0, high] free of aliases; offsets
   * and drifts slower than low/20 are removed. Default [0.1, 2.0].
   */
  bandHz: [number, number];
  /**
   * Rate after anti-alias decimation, samples/s; must divide the record rate by a whole number and
   * be at least 2.5 × bandHz[1]. Default null: the lowest such rate (5 samples/s for 30 frames/s
   * and the default band).
   */
  analysisRate: number | null;
  /**
   * 'yule-walker' (default): an AR polynomial fitted to pooled normalised autocorrelations by
   * Levinson–Durbin finds the candidate poles; each candidate is then estimated from its modal
   * filter's output by a low-order modified Yule-Walker fit, and its shape from residues
   * (modal/ambient-engine.ts); on simulated Tarrow data the more accurate of the two.
   * 'acf-matrix-pencil': matrix pencil on the pooled autocorrelation (lags 1 … acfLagSeconds;
   * SVD per window and per jackknife replicate, so about 10× slower), refitted with channel
   * weights per mode; shapes from the cross-spectral matrix.
   */
  method: AmbientMethod;
  /**
   * AR order of the pooled fit that finds the candidate modes (yule-walker) or signal-subspace
   * order (acf-matrix-pencil). Default 30.
   */
  arOrder: number;
  /** acf-matrix-pencil: autocorrelation lags used, s. Default 30. */
  acfLagSeconds: number;
  /** Confidence level of the damping and frequency intervals. Default 0.9. */
  confidenceLevel: number;
  /**
   * Number of contiguous groups of the delete-a-group jackknife behind the confidence intervals.
   * Default 10 (2-minute groups in a 20-minute window).
   */
  jackknifeGroups: number;
  /** Poles damped more than this, percent, are not reported as modes. Default 20. */
  maxDampingPercent: number;
  /**
   * Least spectral peak-to-floor ratio of a reported mode, dB (= AmbientMode.strength): the Welch
   * density of the mode's modal-filter output at the mode's frequency over its median across the
   * band (yule-walker), or of the channels' normalised densities summed (acf-matrix-pencil). Poles
   * of the AR model that only shape the noise floor (≈ 0 dB) are not modes. Default 4.8 dB (a
   * density ratio of 3).
   */
  minStrength: number;
  forced: ForcedDetectionOptions;
  /** Channels to analyse. Default null: every channel of the record except the angle reference. */
  channels: string[] | null;
  /**
   * Angle reference channel: angle channels are unwrapped and taken relative to it. Default
   * TARROW_ANGLE_REFERENCE when the record has it (else none); null: absolute (unwrapped) angles.
   */
  angleReference: string | null;
  /** Channels holding angles in degrees. Default null: names ending in '.angle'. */
  angleChannels: string[] | null;
  /** Runs of missing samples up to this long, s, are interpolated; longer ones skip windows. Default 1. */
  maxGapSeconds: number;
  /** A window where any channel misses more than this share of samples, percent, is skipped. Default 10. */
  maxMissingPercent: number;
  /** Welch segment length for spectra, mode shapes and the forced test, s (50 % overlap). Default 60. */
  segmentSeconds: number;
  /** Channel whose angle is 0 in mode shapes. Default null: the channel with the largest participation. */
  shapeReference: string | null;
}

export type AmbientOptionsInput = Partial<Omit<AmbientOptions, 'forced'>> & { forced?: Partial<ForcedDetectionOptions> };

export const DEFAULT_AMBIENT_OPTIONS: Readonly<AmbientOptions> = Object.freeze({
  windowSeconds: 1200,
  stepSeconds: 60,
  bandHz: [0.1, 2.0] as [number, number],
  analysisRate: null,
  method: 'yule-walker' as AmbientMethod,
  arOrder: 30,
  acfLagSeconds: 30,
  confidenceLevel: 0.9,
  jackknifeGroups: 10,
  maxDampingPercent: 20,
  minStrength: 4.8,
  forced: Object.freeze({ enabled: true, maxDampingPercent: 1.5, minCoherence: 0.5 }) as ForcedDetectionOptions,
  channels: null,
  angleReference: TARROW_ANGLE_REFERENCE,
  angleChannels: null,
  maxGapSeconds: 1,
  maxMissingPercent: 10,
  segmentSeconds: 60,
  shapeReference: null,
});

/** What the options are checked against. */
export interface AmbientContext {
  /** Record sample rate, samples/s. */
  rate: number;
  /** Names of the record's channels. */
  channelNames: string[];
  /** Record length, s (checked against windowSeconds when given). */
  durationSeconds?: number;
}

/** Options with every default applied and the derived sample counts. */
export interface ResolvedAmbientOptions extends AmbientOptions {
  analysisRate: number;
  /** Decimation factor rate / analysisRate. */
  factor: number;
  channels: string[];
  angleChannels: string[];
  /** Window, step, block, jackknife-group, segment and hop lengths in analysis samples. */
  windowSamples: number;
  stepSamples: number;
  blockSamples: number;
  groupSamples: number;
  segmentSamples: number;
  segmentHop: number;
  /** Autocorrelation lags kept per block. */
  maxLag: number;
}

const KNOWN_KEYS = new Set(Object.keys(DEFAULT_AMBIENT_OPTIONS));
const FORCED_KEYS = new Set(Object.keys(DEFAULT_AMBIENT_OPTIONS.forced));

function isPositive(v: unknown): v is number {
  return typeof v === 'number' && Number.isFinite(v) && v > 0;
}

function fmt(v: unknown): string {
  if (typeof v === 'string') return `'${v}'`;
  if (Array.isArray(v)) return `[${v.map(fmt).join(', ')}]`;
  return String(v);
}

function gcd(a: number, b: number): number {
  while (b) [a, b] = [b, a % b];
  return a;
}

function wholeSamples(seconds: number, rate: number): number | null {
  const n = seconds * rate;
  const r = Math.round(n);
  return Math.abs(n - r) <= 1e-9 * Math.max(1, n) ? r : null;
}

/**
 * The one check of ambient options: applies defaults, validates every field against the record
 * (`context`) and returns the resolved options. Throws ModalInputError with a message naming the
 * offending option and value.
 */
export function checkAmbientOptions(options: AmbientOptionsInput | undefined, context: AmbientContext): ResolvedAmbientOptions {
  const o = (options ?? {}) as Record<string, unknown>;
  if (typeof o !== 'object' || o === null || Array.isArray(o)) throw new ModalInputError('ambient options must be an object');
  for (const key of Object.keys(o)) {
    if (!KNOWN_KEYS.has(key)) throw new ModalInputError(`unknown ambient option '${key}'`);
  }
  const forcedIn = (o.forced ?? {}) as Record<string, unknown>;
  if (typeof forcedIn !== 'object' || forcedIn === null || Array.isArray(forcedIn)) {
    throw new ModalInputError('forced must be an object');
  }
  for (const key of Object.keys(forcedIn)) {
    if (!FORCED_KEYS.has(key)) throw new ModalInputError(`unknown forced-detection option '${key}'`);
  }
  const d = DEFAULT_AMBIENT_OPTIONS;
  const pick = <K extends keyof AmbientOptions>(k: K): unknown => (o[k] === undefined ? d[k] : o[k]);

  const { rate, channelNames } = context;
  if (!isPositive(rate)) throw new ModalInputError(`the record rate must be a positive number of samples/s, got ${fmt(rate)}`);

  const windowSeconds = pick('windowSeconds');
  if (!isPositive(windowSeconds)) throw new ModalInputError(`windowSeconds must be a positive number of seconds, got ${fmt(windowSeconds)}`);
  const stepSeconds = pick('stepSeconds');
  if (!isPositive(stepSeconds)) throw new ModalInputError(`stepSeconds must be a positive number of seconds, got ${fmt(stepSeconds)}`);

  const band = pick('bandHz');
  if (
    !Array.isArray(band) ||
    band.length !== 2 ||
    !isPositive(band[0]) ||
    !isPositive(band[1]) ||
    !(band[0] < band[1])
  ) {
    throw new ModalInputError(`bandHz must be [low, high] in Hz with 0 < low < high, got ${fmt(band)}`);
  }
  const [lowHz, highHz] = band as [number, number];

  let analysisRate = pick('analysisRate');
  if (analysisRate === null) {
    const q = Math.max(1, Math.floor(rate / (2.5 * highHz) + 1e-9));
    analysisRate = rate / q;
    if ((analysisRate as number) < 2.5 * highHz) {
      throw new ModalInputError(
        `bandHz upper edge ${highHz} Hz needs a record rate of at least ${2.5 * highHz} samples/s (2.5 × the edge); the record has ${rate}`,
      );
    }
  } else {
    if (!isPositive(analysisRate)) {
      throw new ModalInputError(`analysisRate must be a positive number of samples/s or null, got ${fmt(analysisRate)}`);
    }
    const q = rate / analysisRate;
    if (Math.abs(q - Math.round(q)) > 1e-9 * q || Math.round(q) < 1) {
      throw new ModalInputError(`analysisRate ${analysisRate} samples/s must divide the record rate ${rate} samples/s by a whole number`);
    }
    if (analysisRate < 2.5 * highHz) {
      throw new ModalInputError(
        `analysisRate ${analysisRate} samples/s is too low for bandHz up to ${highHz} Hz: it must be at least 2.5 × ${highHz} = ${2.5 * highHz} samples/s`,
      );
    }
  }
  const fsA = analysisRate as number;
  const factor = Math.round(rate / fsA);

  const method = pick('method');
  if (method !== 'yule-walker' && method !== 'acf-matrix-pencil') {
    throw new ModalInputError(`method must be 'yule-walker' or 'acf-matrix-pencil', got ${fmt(method)}`);
  }
  const arOrder = pick('arOrder');
  if (typeof arOrder !== 'number' || !Number.isInteger(arOrder) || arOrder < 2 || arOrder > 200) {
    throw new ModalInputError(`arOrder must be an integer from 2 to 200, got ${fmt(arOrder)}`);
  }
  const acfLagSeconds = pick('acfLagSeconds');
  if (!isPositive(acfLagSeconds)) throw new ModalInputError(`acfLagSeconds must be a positive number of seconds, got ${fmt(acfLagSeconds)}`);
  const confidenceLevel = pick('confidenceLevel');
  if (typeof confidenceLevel !== 'number' || !(confidenceLevel > 0 && confidenceLevel < 1)) {
    throw new ModalInputError(`confidenceLevel must lie strictly between 0 and 1, got ${fmt(confidenceLevel)}`);
  }
  const groups = pick('jackknifeGroups');
  if (typeof groups !== 'number' || !Number.isInteger(groups) || groups < 3 || groups > 100) {
    throw new ModalInputError(`jackknifeGroups must be an integer from 3 to 100, got ${fmt(groups)}`);
  }
  const maxDampingPercent = pick('maxDampingPercent');
  if (!isPositive(maxDampingPercent) || maxDampingPercent >= 100) {
    throw new ModalInputError(`maxDampingPercent must lie between 0 and 100 (exclusive), got ${fmt(maxDampingPercent)}`);
  }
  const minStrength = pick('minStrength');
  if (typeof minStrength !== 'number' || !Number.isFinite(minStrength) || minStrength < 0) {
    throw new ModalInputError(`minStrength must be a non-negative number of dB, got ${fmt(minStrength)}`);
  }
  const maxGapSeconds = pick('maxGapSeconds');
  if (typeof maxGapSeconds !== 'number' || !Number.isFinite(maxGapSeconds) || maxGapSeconds < 0) {
    throw new ModalInputError(`maxGapSeconds must be a non-negative number of seconds, got ${fmt(maxGapSeconds)}`);
  }
  const maxMissingPercent = pick('maxMissingPercent');
  if (typeof maxMissingPercent !== 'number' || !(maxMissingPercent >= 0 && maxMissingPercent <= 100)) {
    throw new ModalInputError(`maxMissingPercent must lie between 0 and 100, got ${fmt(maxMissingPercent)}`);
  }
  const segmentSeconds = pick('segmentSeconds');
  if (!isPositive(segmentSeconds)) throw new ModalInputError(`segmentSeconds must be a positive number of seconds, got ${fmt(segmentSeconds)}`);

  const fEnabled = forcedIn.enabled === undefined ? d.forced.enabled : forcedIn.enabled;
  if (typeof fEnabled !== 'boolean') throw new ModalInputError(`forced.enabled must be true or false, got ${fmt(fEnabled)}`);
  const fMaxDamp = forcedIn.maxDampingPercent === undefined ? d.forced.maxDampingPercent : forcedIn.maxDampingPercent;
  if (!isPositive(fMaxDamp) || fMaxDamp >= 100) {
    throw new ModalInputError(`forced.maxDampingPercent must lie between 0 and 100 (exclusive), got ${fmt(fMaxDamp)}`);
  }
  const fCoh = forcedIn.minCoherence === undefined ? d.forced.minCoherence : forcedIn.minCoherence;
  if (typeof fCoh !== 'number' || !(fCoh > 0 && fCoh < 1)) {
    throw new ModalInputError(`forced.minCoherence must lie strictly between 0 and 1, got ${fmt(fCoh)}`);
  }

  // channels
  if (!Array.isArray(channelNames) || channelNames.length === 0) throw new ModalInputError('the record has no channels');
  const known = new Set(channelNames);
  const refIn = o.angleReference;
  let angleReference: string | null;
  if (refIn === undefined) {
    angleReference = known.has(d.angleReference as string) ? d.angleReference : null;
  } else if (refIn === null) {
    angleReference = null;
  } else if (typeof refIn !== 'string' || !known.has(refIn)) {
    throw new ModalInputError(`angleReference ${fmt(refIn)} is not a channel of the record`);
  } else {
    angleReference = refIn;
  }
  const chIn = pick('channels');
  let channels: string[];
  if (chIn === null) {
    channels = channelNames.filter((c) => c !== angleReference);
    if (channels.length === 0) throw new ModalInputError(`no channel to analyse: the record's only channel is the angle reference '${angleReference}'`);
  } else {
    if (!Array.isArray(chIn) || chIn.length === 0) throw new ModalInputError('channels must be a non-empty list of channel names, or null for all');
    const seen = new Set<string>();
    for (const c of chIn) {
      if (typeof c !== 'string' || !known.has(c)) throw new ModalInputError(`unknown channel ${fmt(c)}: the record has no such channel`);
      if (seen.has(c)) throw new ModalInputError(`channel '${c}' is listed twice in channels`);
      if (c === angleReference) {
        throw new ModalInputError(`channel '${c}' is the angle reference; relative to itself it is identically zero, so it cannot be analysed`);
      }
      seen.add(c);
    }
    channels = chIn.slice();
  }
  const angIn = pick('angleChannels');
  let angleChannels: string[];
  if (angIn === null) {
    angleChannels = channelNames.filter((c) => c.endsWith('.angle'));
  } else {
    if (!Array.isArray(angIn)) throw new ModalInputError('angleChannels must be a list of channel names, or null');
    for (const c of angIn) {
      if (typeof c !== 'string' || !known.has(c)) throw new ModalInputError(`angleChannels: unknown channel ${fmt(c)}`);
    }
    angleChannels = angIn.slice();
  }
  if (angleReference !== null && !angleChannels.includes(angleReference)) {
    throw new ModalInputError(`angleReference '${angleReference}' is not an angle channel (see angleChannels)`);
  }
  const shapeReference = pick('shapeReference');
  if (shapeReference !== null && (typeof shapeReference !== 'string' || !channels.includes(shapeReference))) {
    throw new ModalInputError(`shapeReference ${fmt(shapeReference)} is not one of the analysed channels`);
  }

  // sample counts
  let windowSamples = wholeSamples(windowSeconds, fsA);
  if (windowSamples === null) {
    throw new ModalInputError(`windowSeconds ${windowSeconds} s is not a whole number of samples at the analysis rate ${fsA} samples/s`);
  }
  const stepSamples = wholeSamples(stepSeconds, fsA);
  if (stepSamples === null) {
    throw new ModalInputError(`stepSeconds ${stepSeconds} s is not a whole number of samples at the analysis rate ${fsA} samples/s`);
  }
  // the jackknife needs equal contiguous groups: trim the window to a multiple of the group count
  windowSamples -= windowSamples % groups;
  const groupSamples = windowSamples / groups;
  const maxLag = method === 'yule-walker' ? arOrder : Math.max(arOrder, Math.round(acfLagSeconds * fsA));
  if (method === 'acf-matrix-pencil' && Math.floor(maxLag / 3) < arOrder) {
    throw new ModalInputError(
      `acfLagSeconds ${acfLagSeconds} s gives ${maxLag} lags; the matrix pencil of order ${arOrder} needs at least ${3 * arOrder} lags (${(3 * arOrder) / fsA} s)`,
    );
  }
  if (groupSamples < 4 * maxLag) {
    throw new ModalInputError(
      `windowSeconds ${windowSeconds} s is too short: each of the ${groups} jackknife groups needs at least 4 × ${maxLag} lags = ${4 * maxLag} samples, so the window must last at least ${(4 * maxLag * groups) / fsA} s`,
    );
  }
  const segmentSamples = Math.max(8, Math.round(segmentSeconds * fsA));
  if (segmentSamples > windowSamples / 4) {
    throw new ModalInputError(`segmentSeconds ${segmentSeconds} s is too long: a window needs at least 4 segments (at most ${windowSamples / 4 / fsA} s each)`);
  }
  if (lowHz * segmentSamples < 2 * fsA) {
    throw new ModalInputError(
      `segmentSeconds ${segmentSeconds} s is too short to resolve bandHz from ${lowHz} Hz: a segment must last at least 2 periods (${2 / lowHz} s)`,
    );
  }
  if (highHz >= fsA / 2) throw new ModalInputError(`bandHz upper edge ${highHz} Hz must be below half the analysis rate (${fsA / 2} Hz)`);
  const durationSeconds = context.durationSeconds;
  if (durationSeconds !== undefined && durationSeconds * fsA < windowSamples - 1e-9) {
    throw new ModalInputError(
      `the record lasts ${+durationSeconds.toFixed(3)} s; one window needs windowSeconds = ${windowSeconds} s`,
    );
  }

  return {
    windowSeconds: windowSeconds as number,
    stepSeconds: stepSeconds as number,
    bandHz: [lowHz, highHz],
    analysisRate: fsA,
    factor,
    method,
    arOrder,
    acfLagSeconds: acfLagSeconds as number,
    confidenceLevel,
    jackknifeGroups: groups,
    maxDampingPercent,
    minStrength,
    forced: { enabled: fEnabled, maxDampingPercent: fMaxDamp, minCoherence: fCoh },
    channels,
    angleReference,
    angleChannels,
    maxGapSeconds,
    maxMissingPercent,
    segmentSeconds: segmentSamples / fsA,
    shapeReference: shapeReference as string | null,
    windowSamples,
    stepSamples,
    blockSamples: gcd(stepSamples, groupSamples),
    groupSamples,
    segmentSamples,
    segmentHop: Math.max(1, Math.floor(segmentSamples / 2)),
    maxLag,
  };
}
