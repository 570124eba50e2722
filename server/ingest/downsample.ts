// Min/max decimation for plotting long records (DESIGN.md §4: "time series with min/max
// decimation for long spans"): the samples are cut into at most `maxPoints` equal buckets and
// each bucket keeps its smallest and largest finite value, so that spikes and the envelope survive
// where plain subsampling would drop them. A bucket with no finite sample is null (a gap to draw).

export interface MinMaxBuckets {
  /** Epoch seconds of each bucket's first sample. */
  t: number[];
  min: (number | null)[];
  max: (number | null)[];
  /** Samples per bucket (1: every sample is its own bucket, min = max). */
  bucketSamples: number;
  /** Seconds per bucket. */
  bucketSeconds: number;
}

export function downsampleMinMax(values: Float64Array, startTime: number, rate: number, maxPoints: number): MinMaxBuckets {
  if (!(rate > 0)) throw new RangeError(`downsampleMinMax: rate must be positive, got ${rate}`);
  if (!Number.isInteger(maxPoints) || maxPoints < 1) {
    throw new RangeError(`downsampleMinMax: maxPoints must be a whole number ≥ 1, got ${maxPoints}`);
  }
  const n = values.length;
  const per = Math.max(1, Math.ceil(n / maxPoints));
  const buckets = Math.ceil(n / per);
  const t: number[] = new Array(buckets);
  const min: (number | null)[] = new Array(buckets);
  const max: (number | null)[] = new Array(buckets);
  for (let b = 0; b < buckets; b++) {
    const s = b * per;
    const e = Math.min(n, s + per);
    let lo = Infinity;
    let hi = -Infinity;
    for (let i = s; i < e; i++) {
      const v = values[i];
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
    t[b] = startTime + s / rate;
    min[b] = lo === Infinity ? null : lo;
    max[b] = hi === -Infinity ? null : hi;
  }
  return { t, min, max, bucketSamples: per, bucketSeconds: per / rate };
}
