// Small statistics helpers for the ambient estimator's confidence intervals (the Student-t
// quantile is in student-t.ts, shared with the transfer study).

/**
 * Delete-a-group jackknife standard error of an estimate from its K leave-one-group-out
 * replicates (textbook: Efron & Tibshirani, An Introduction to the Bootstrap, 1993, §11):
 * se² = (K − 1)/K · Σ (θ_(g) − θ̄)².
 */
export function jackknifeSe(replicates: ArrayLike<number>): number {
  const k = replicates.length;
  if (k < 2) return NaN;
  let mean = 0;
  for (let i = 0; i < k; i++) mean += replicates[i];
  mean /= k;
  let ss = 0;
  for (let i = 0; i < k; i++) ss += (replicates[i] - mean) ** 2;
  return Math.sqrt(((k - 1) / k) * ss);
}

/** Median by sorting a copy (small arrays). */
export function medianOf(values: ArrayLike<number>): number {
  const a = Float64Array.from(values).sort();
  const n = a.length;
  if (n === 0) return NaN;
  const h = n >> 1;
  return n % 2 ? a[h] : 0.5 * (a[h - 1] + a[h]);
}

/** k-th smallest (0-based) of a[0..n) by quickselect; reorders `a`. O(n) expected. */
export function quickselect(a: Float64Array, n: number, k: number): number {
  let lo = 0;
  let hi = n - 1;
  while (hi > lo) {
    const mid = (lo + hi) >> 1;
    // median of three as pivot
    const x = a[lo];
    const y0 = a[mid];
    const z = a[hi];
    const y = x < y0 ? (y0 < z ? y0 : x < z ? z : x) : x < z ? x : y0 < z ? z : y0;
    const pivot = y;
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (a[i] < pivot) i++;
      while (a[j] > pivot) j--;
      if (i <= j) {
        const t = a[i];
        a[i] = a[j];
        a[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return a[k];
  }
  return a[k];
}
