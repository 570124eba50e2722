// Damping bands of a mode estimate (DESIGN.md §3): poor below `poorBelow` %, low below
// `lowBelow` %, ample otherwise. Defaults are the common 3–5 % alert rule (common practice;
// utilities set them per mode track, so they are settings). An estimate flagged as a forced
// oscillation is not a damping measurement: callers give it the band 'forced' (bandOfEstimate
// does), never 'poor'.
import { ModalInputError } from './errors';

export type DampingBand = 'poor' | 'low' | 'ample';
export type EstimateBand = DampingBand | 'forced';

export interface BandThresholds {
  /** Damping ratio, percent, below which a mode is poorly damped. */
  poorBelow: number;
  /** Damping ratio, percent, below which a mode is low (at or above it: ample). */
  lowBelow: number;
}

export const DEFAULT_BAND_THRESHOLDS: Readonly<BandThresholds> = Object.freeze({ poorBelow: 3, lowBelow: 5 });

/** The one check of band thresholds: finite percentages with 0 ≤ poorBelow ≤ lowBelow ≤ 100. */
export function checkBandThresholds(t: Partial<BandThresholds> | undefined): BandThresholds {
  const poorBelow = t?.poorBelow ?? DEFAULT_BAND_THRESHOLDS.poorBelow;
  const lowBelow = t?.lowBelow ?? DEFAULT_BAND_THRESHOLDS.lowBelow;
  if (typeof poorBelow !== 'number' || !Number.isFinite(poorBelow) || poorBelow < 0 || poorBelow > 100) {
    throw new ModalInputError(`poorBelow must be a damping ratio in percent from 0 to 100, got ${String(poorBelow)}`);
  }
  if (typeof lowBelow !== 'number' || !Number.isFinite(lowBelow) || lowBelow < 0 || lowBelow > 100) {
    throw new ModalInputError(`lowBelow must be a damping ratio in percent from 0 to 100, got ${String(lowBelow)}`);
  }
  if (poorBelow > lowBelow) {
    throw new ModalInputError(`poorBelow (${poorBelow} %) must not exceed lowBelow (${lowBelow} %)`);
  }
  return { poorBelow, lowBelow };
}

/** Band of a damping ratio in percent. NaN is refused (an estimate without damping has no band). */
export function bandOf(dampingPercent: number, thresholds: Partial<BandThresholds> = DEFAULT_BAND_THRESHOLDS): DampingBand {
  const { poorBelow, lowBelow } = checkBandThresholds(thresholds);
  if (typeof dampingPercent !== 'number' || Number.isNaN(dampingPercent)) {
    throw new ModalInputError(`dampingPercent must be a number, got ${String(dampingPercent)}`);
  }
  if (dampingPercent < poorBelow) return 'poor';
  if (dampingPercent < lowBelow) return 'low';
  return 'ample';
}

/** Band of an estimate: 'forced' when flagged as a forced oscillation, else bandOf its damping. */
export function bandOfEstimate(
  estimate: { dampingPercent: number; forced: boolean },
  thresholds: Partial<BandThresholds> = DEFAULT_BAND_THRESHOLDS,
): EstimateBand {
  if (estimate.forced) {
    checkBandThresholds(thresholds);
    return 'forced';
  }
  return bandOf(estimate.dampingPercent, thresholds);
}
