// The reconstruction drawn in the ring-down view: the sum of the parts of the modes switched on
// (all of them: the fit's own reconstruction), and what is left of the signal after it.
import type { FitMethodResult } from '@/shared/api/fits';
import type { XY } from '../charts';

type Series = FitMethodResult['reconstruction']['series'][number];

/** Σ over the enabled modes of each mode's part, sample by sample. */
export function sumOfModes(s: Series, enabled: readonly boolean[]): Float64Array {
  const n = s.input.length;
  const out = new Float64Array(n);
  s.perMode.forEach((part, k) => {
    if (!enabled[k]) return;
    for (let i = 0; i < n && i < part.length; i++) out[i] += part[i];
  });
  return out;
}

/** The signal minus the reconstruction drawn. */
export function residualOf(s: Series, recon: Float64Array): Float64Array {
  const out = new Float64Array(s.input.length);
  for (let i = 0; i < out.length; i++) out[i] = s.input[i] - recon[i];
  return out;
}

/** Chart points on the fit's grid: x = seconds after the interval start. */
export function gridPoints(values: ArrayLike<number>, stepSeconds: number): XY[] {
  const pts: XY[] = new Array(values.length);
  for (let i = 0; i < values.length; i++) pts[i] = { x: i * stepSeconds, y: values[i] };
  return pts;
}

/** Root mean square of a series (the residual's size in the channel's unit). */
export function rms(values: ArrayLike<number>): number {
  let s = 0;
  let n = 0;
  for (let i = 0; i < values.length; i++) {
    if (!Number.isFinite(values[i])) continue;
    s += values[i] * values[i];
    n++;
  }
  return n ? Math.sqrt(s / n) : Number.NaN;
}
