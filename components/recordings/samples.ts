// Turning the samples endpoint's min/max buckets into chart points, and plain sample arrays for
// the spectrum.
import type { SamplesResponse } from '@/shared/api/recordings';
import type { XY } from '../charts';

/**
 * Chart points (x in epoch ms) from min/max buckets: every sample when a bucket holds one,
 * else each bucket's minimum then its maximum half a bucket later — the trace then covers the
 * signal's envelope at the resolution asked for. Empty buckets become breaks (NaN).
 */
export function samplePoints(s: SamplesResponse): XY[] {
  const out: XY[] = [];
  const half = (s.bucketSeconds * 1000) / 2;
  for (let i = 0; i < s.t.length; i++) {
    const x = s.t[i] * 1000;
    const lo = s.min[i];
    const hi = s.max[i];
    if (lo === null || hi === null) {
      out.push({ x, y: Number.NaN });
      continue;
    }
    if (s.bucketSamples <= 1 || lo === hi) out.push({ x, y: lo });
    else {
      out.push({ x, y: lo });
      out.push({ x: x + half, y: hi });
    }
  }
  return out;
}

/** The samples as a plain array when the answer holds every sample (bucketSamples 1), else null. */
export function rawValues(s: SamplesResponse): Float64Array | null {
  if (s.bucketSamples !== 1) return null;
  const v = new Float64Array(s.min.length);
  for (let i = 0; i < v.length; i++) v[i] = s.min[i] ?? Number.NaN;
  return v;
}

/**
 * The time (epoch s) of the largest step in a channel: the bucket whose range (max − min) is the
 * widest relative to the median range. A ring-down starts there; an ambient recording has none
 * worth the name (ratio near 1), so null then.
 */
export function largestStep(s: SamplesResponse): number | null {
  // Per bucket: its own range, or the jump from the previous bucket's middle, whichever is larger
  // (with one sample per bucket only the jump says anything).
  const steps: number[] = [];
  let prevMid = Number.NaN;
  for (let i = 0; i < s.t.length; i++) {
    const lo = s.min[i];
    const hi = s.max[i];
    if (lo === null || hi === null) {
      steps.push(Number.NaN);
      prevMid = Number.NaN;
      continue;
    }
    const mid = (lo + hi) / 2;
    const jump = Number.isFinite(prevMid) ? Math.abs(mid - prevMid) : 0;
    steps.push(Math.max(hi - lo, jump));
    prevMid = mid;
  }
  const finite = steps.filter(Number.isFinite).sort((a, b) => a - b);
  if (finite.length < 8) return null;
  const median = finite[Math.floor(finite.length / 2)];
  let best = -1;
  for (let i = 0; i < steps.length; i++) if (Number.isFinite(steps[i]) && (best < 0 || steps[i] > steps[best])) best = i;
  // A step stands out well above the typical bucket (several times the median).
  if (best < 0 || !(steps[best] > 5 * Math.max(median, 1e-12))) return null;
  return s.t[best];
}
