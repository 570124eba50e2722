// Known-answer test signals: sums of damped sinusoids from known modal parameters (CHECKS.md §1).
// Test-only helper.
import { createRng } from '../../modal/random';

export interface TrueMode {
  /** Damped frequency, Hz. */
  frequencyHz: number;
  /** Damping ratio, fraction. */
  dampingRatio: number;
  amplitude: number;
  phaseDeg: number;
}

/** σ (1/s, positive for decay) and ω (rad/s) of a mode: ω = 2πf, σ = ζ·ω/√(1 − ζ²), so ζ = σ/|s|. */
export function sigmaOmega(m: TrueMode): { sigma: number; omega: number } {
  const omega = 2 * Math.PI * m.frequencyHz;
  return { sigma: (m.dampingRatio * omega) / Math.sqrt(1 - m.dampingRatio ** 2), omega };
}

/** x[n] = Σ A·e^{−σ t}·cos(ω t + φ), t = t0 + n / rate. */
export function dampedSum(modes: TrueMode[], rate: number, samples: number, t0 = 0): Float64Array {
  const x = new Float64Array(samples);
  for (const m of modes) {
    const { sigma, omega } = sigmaOmega(m);
    const ph = (m.phaseDeg * Math.PI) / 180;
    for (let n = 0; n < samples; n++) {
      const t = t0 + n / rate;
      x[n] += m.amplitude * Math.exp(-sigma * t) * Math.cos(omega * t + ph);
    }
  }
  return x;
}

/**
 * Adds white Gaussian noise for a given SNR, defined as signal power / noise power over the whole
 * array: noise variance = mean(x²) / 10^(snrDb/10).
 */
export function addNoise(x: Float64Array, snrDb: number, seed: number): Float64Array {
  let p = 0;
  for (const v of x) p += v * v;
  const std = Math.sqrt(p / x.length / 10 ** (snrDb / 10));
  const rng = createRng(seed);
  return x.map((v) => v + std * rng.normal());
}
