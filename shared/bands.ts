// Damping bands (DESIGN.md §3): poor < poorBelow %, low < lowBelow %, ample otherwise; an estimate
// flagged as a forced oscillation is 'forced' and never counted as poor damping.
// Defaults follow the common 3–5 % alert rule (common practice; set per mode track).

export const BANDS = ['poor', 'low', 'ample', 'forced'] as const;
export type Band = (typeof BANDS)[number];

export const BAND_LABELS: Record<Band, string> = {
  poor: 'poor',
  low: 'low',
  ample: 'ample',
  forced: 'forced',
};

export const DEFAULT_POOR_BELOW = 3;
export const DEFAULT_LOW_BELOW = 5;

export interface BandThresholds {
  /** Damping ratio in percent below which a mode is poorly damped. */
  poorBelow: number;
  /** Damping ratio in percent below which a mode is low (and at or above which it is ample). */
  lowBelow: number;
}

export const DEFAULT_THRESHOLDS: BandThresholds = { poorBelow: DEFAULT_POOR_BELOW, lowBelow: DEFAULT_LOW_BELOW };

/** Band of a damping estimate (percent). Forced oscillations are their own band. */
export function bandOf(dampingPercent: number, thresholds: BandThresholds = DEFAULT_THRESHOLDS, forced = false): Band {
  if (forced) return 'forced';
  if (dampingPercent < thresholds.poorBelow) return 'poor';
  if (dampingPercent < thresholds.lowBelow) return 'low';
  return 'ample';
}
