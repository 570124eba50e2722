// Shared result and input types of the estimators. Pure data: no I/O, no Node-only imports,
// so the web client can import them too.
//
// Units, everywhere in modal/:
//   time in seconds, frequency in Hz, damping ratio as a fraction (0.03 = 3 %),
//   dampingPercent = 100 · dampingRatio, angles in degrees where a name ends in `Deg`,
//   radians otherwise. A continuous pole s = −σ + jω (rad/s); ζ = σ / |s| (CHECKS.md §1).

/** One channel of uniformly sampled data. NaN marks a missing sample (dropout). */
export interface ChannelData {
  name: string;
  values: Float64Array;
}

/** Uniformly sampled multi-channel record: all channels share `startTime` and `rate`. */
export interface SampledRecord {
  /** Epoch seconds (UTC) of the first sample. */
  startTime: number;
  /** Samples per second (the PMU reporting rate, or the analysis rate after decimation). */
  rate: number;
  channels: ChannelData[];
}

/** A continuous-time pole with its derived modal quantities. */
export interface ModePole {
  /** Damped frequency, Hz (ω / 2π). */
  frequencyHz: number;
  /** Damping ratio as a fraction, ζ = −Re(s)/|s|. */
  dampingRatio: number;
  /** 100 · dampingRatio. */
  dampingPercent: number;
  /** Re(s), 1/s (negative for a decaying mode). */
  sigma: number;
  /** Im(s), rad/s (positive: only the upper half-plane member of a conjugate pair is kept). */
  omega: number;
}

/** Per-channel residue of one mode in a ring-down fit. */
export interface ChannelResidue {
  channel: string;
  /** Peak amplitude of the real damped cosine at the interval start, in the channel's unit. */
  amplitude: number;
  /** Phase of that cosine at the interval start, degrees in (−180, 180]. */
  phaseDeg: number;
}

export interface RingdownMode extends ModePole {
  /** Share of the reconstructed signal energy (all channels) carried by this mode, 0..1. */
  energyShare: number;
  channels: ChannelResidue[];
}

export type RingdownMethod = 'prony' | 'matrix-pencil';

export interface RingdownResult {
  method: RingdownMethod;
  /** Model order actually used (number of complex exponentials, conjugates counted). */
  order: number;
  /** Sampling rate of the fitted data, samples/s. */
  rate: number;
  /** Modes in the analysis band, sorted by energyShare descending. */
  modes: RingdownMode[];
  /** Signal-to-noise ratio of the fit, dB: 10·log10(Σ signal² / Σ residual²) over all channels. */
  snrDb: number;
  /** Per channel: the detrended input, the total reconstruction, the residual, each mode's part. */
  reconstruction: {
    channel: string;
    input: Float64Array;
    total: Float64Array;
    residual: Float64Array;
    /** perMode[k] is mode k's contribution (same order as `modes`). */
    perMode: Float64Array[];
  }[];
  /** Sampling rate of `reconstruction` (the record's own rate), samples/s. Set by fitRingdown. */
  recordRate?: number;
  /** The fitted interval as record sample indices [startIndex, endIndex). Set by fitRingdown. */
  startIndex?: number;
  endIndex?: number;
}

/** A mode-shape entry: the channel's response at the modal frequency relative to the reference. */
export interface ShapeEntry {
  channel: string;
  /** Relative magnitude, the largest channel = 1. */
  magnitude: number;
  /** Angle relative to the reference channel, degrees in (−180, 180]. */
  angleDeg: number;
}

export interface AmbientMode extends ModePole {
  /** Confidence interval of the damping, percent [lo, hi], at `confidenceLevel`. */
  dampingCi: [number, number];
  /** Confidence interval of the frequency, Hz [lo, hi]. */
  frequencyCi: [number, number];
  confidenceLevel: number;
  /** True when the peak looks like a sustained forced oscillation, not a natural mode. */
  forced: boolean;
  shape: ShapeEntry[];
  /**
   * How far the mode stands out of the spectral floor, dB (10·log10 of a density ratio): for the
   * Yule-Walker method, the Welch density of the mode's modal-filter output at its frequency over
   * its median across the band; otherwise the channels' normalised densities summed. About 0 dB
   * for noise, ~10 dB for a weak well-damped local mode, 40–50 dB for a lightly damped inter-area
   * mode. Used for ranking; options.minStrength is its least value.
   */
  strength: number;
  /**
   * Phase coherence of the peak across the window's spectral segments, 0…1 (the forced-oscillation
   * statistic; near 1 for a sustained sinusoid). Present when the forced test ran on this mode.
   */
  coherence?: number;
}

export interface WindowQuality {
  samples: number;
  /** Samples that were NaN (dropouts) before interpolation. */
  dropouts: number;
  /** Count of gaps (runs of missing samples). */
  gaps: number;
  /** Longest run of missing samples, in samples. */
  longestGap: number;
  /** Samples in runs where the value did not change for ≥ 1 s (frozen PMU output). */
  flatLine: number;
  /** Samples more than 6 robust standard deviations (MAD) from the median. */
  outliers: number;
}

export interface AmbientWindowResult {
  /** Epoch seconds of the window start and end. */
  start: number;
  end: number;
  modes: AmbientMode[];
  quality: Record<string, WindowQuality>;
  /** True when the window was not estimated (too many missing samples); `reason` says why. */
  skipped: boolean;
  reason?: string;
}
