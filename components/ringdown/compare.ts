// Pairing the modes Prony and the matrix pencil found in the same interval, and saying where the
// two disagree by more than their uncertainty.
//
// The fit API gives no interval per ring-down mode, so each estimate's uncertainty is taken as a
// stated tolerance (from memory of ring-down practice: at 20 dB SNR or better the two methods
// agree on damping within a few tenths of a point and on frequency within a few mHz; agreement
// loosens as the damping rises and as the noise grows):
//   damping   u_ζ = 0.3 point + 10 % of the estimate, doubled when the method's fit SNR < 20 dB
//   frequency u_f = max(0.002 Hz, 0.5 % of the estimate), doubled likewise
// Two estimates disagree when |Δζ| > √(u_ζ1² + u_ζ2²) or |Δf| > √(u_f1² + u_f2²).
import type { FitMethodResult, FitMode } from '@/shared/api/fits';

export const TOLERANCE_RULE =
  'Marked ≠ where the two methods differ by more than their combined tolerance √(u₁² + u₂²): for damping u = 0.3 point + 10 % of the estimate, for frequency u = the larger of 0.002 Hz and 0.5 % — each doubled when that fit’s SNR is under 20 dB.';

const LOW_SNR_DB = 20;

function noiseFactor(snrDb: number | null): number {
  return snrDb !== null && snrDb < LOW_SNR_DB ? 2 : 1;
}

export function dampingTolerance(dampingPercent: number, snrDb: number | null): number {
  return (0.3 + 0.1 * Math.abs(dampingPercent)) * noiseFactor(snrDb);
}

export function frequencyTolerance(frequencyHz: number, snrDb: number | null): number {
  return Math.max(0.002, 0.005 * Math.abs(frequencyHz)) * noiseFactor(snrDb);
}

export interface ModePair {
  /** Index into each method's modes (null: that method has no such mode). */
  a: number | null;
  b: number | null;
  /** Track code both (or either) were assigned to. */
  trackCode: string | null;
  /** Set when both exist. */
  dFrequency: number | null;
  dDamping: number | null;
  tolFrequency: number | null;
  tolDamping: number | null;
  verdict: 'agree' | 'differ' | 'only-a' | 'only-b';
}

/** Two modes are the same physical mode when on the same track, or close in frequency. */
function sameMode(x: FitMode, y: FitMode): boolean {
  if (x.trackCode && y.trackCode) return x.trackCode === y.trackCode;
  return Math.abs(x.frequencyHz - y.frequencyHz) <= Math.max(0.05, 0.1 * Math.min(x.frequencyHz, y.frequencyHz));
}

/**
 * Pairs the modes of two methods (strongest first, each used once), then lists the unpaired.
 * Sorted by frequency.
 */
export function pairModes(a: FitMethodResult, b: FitMethodResult): ModePair[] {
  const order = a.modes.map((_, i) => i).sort((i, j) => a.modes[j].energyShare - a.modes[i].energyShare);
  const usedB = new Set<number>();
  const pairs: ModePair[] = [];
  for (const i of order) {
    const x = a.modes[i];
    let best = -1;
    for (let j = 0; j < b.modes.length; j++) {
      if (usedB.has(j) || !sameMode(x, b.modes[j])) continue;
      if (best < 0 || Math.abs(b.modes[j].frequencyHz - x.frequencyHz) < Math.abs(b.modes[best].frequencyHz - x.frequencyHz)) best = j;
    }
    if (best < 0) {
      pairs.push({ a: i, b: null, trackCode: x.trackCode, dFrequency: null, dDamping: null, tolFrequency: null, tolDamping: null, verdict: 'only-a' });
      continue;
    }
    usedB.add(best);
    const y = b.modes[best];
    const dF = y.frequencyHz - x.frequencyHz;
    const dZ = y.dampingPercent - x.dampingPercent;
    const tolF = Math.hypot(frequencyTolerance(x.frequencyHz, a.snrDb), frequencyTolerance(y.frequencyHz, b.snrDb));
    const tolZ = Math.hypot(dampingTolerance(x.dampingPercent, a.snrDb), dampingTolerance(y.dampingPercent, b.snrDb));
    pairs.push({
      a: i,
      b: best,
      trackCode: x.trackCode ?? y.trackCode,
      dFrequency: dF,
      dDamping: dZ,
      tolFrequency: tolF,
      tolDamping: tolZ,
      verdict: Math.abs(dF) > tolF || Math.abs(dZ) > tolZ ? 'differ' : 'agree',
    });
  }
  b.modes.forEach((y, j) => {
    if (!usedB.has(j)) pairs.push({ a: null, b: j, trackCode: y.trackCode, dFrequency: null, dDamping: null, tolFrequency: null, tolDamping: null, verdict: 'only-b' });
  });
  const f = (p: ModePair) => (p.a !== null ? a.modes[p.a].frequencyHz : b.modes[p.b!].frequencyHz);
  return pairs.sort((p, q) => f(p) - f(q));
}
