// Small statistics helpers for the ambient estimator's confidence intervals.
// Student-t quantiles through the regularised incomplete beta function (continued fraction,
// textbook: Press et al., Numerical Recipes, §6.4), checked against scipy.stats.t.ppf in tests.

function logGamma(x: number): number {
  // Lanczos approximation (g = 7, n = 9), relative error ~1e-15 (textbook).
  const g = 7;
  const c = [
    0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
    12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
  ];
  if (x < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * x)) - logGamma(1 - x);
  x -= 1;
  let a = c[0];
  const t = x + g + 0.5;
  for (let i = 1; i < g + 2; i++) a += c[i] / (x + i);
  return 0.5 * Math.log(2 * Math.PI) + (x + 0.5) * Math.log(t) - t + Math.log(a);
}

function betaContinuedFraction(a: number, b: number, x: number): number {
  const TINY = 1e-300;
  let c = 1;
  let d = 1 - ((a + b) * x) / (a + 1);
  if (Math.abs(d) < TINY) d = TINY;
  d = 1 / d;
  let h = d;
  for (let m = 1; m <= 300; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((a - 1 + m2) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (a + b + m) * x) / ((a + m2) * (a + 1 + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < 1e-15) break;
  }
  return h;
}

/** Regularised incomplete beta I_x(a, b). */
export function incompleteBeta(a: number, b: number, x: number): number {
  if (x <= 0) return 0;
  if (x >= 1) return 1;
  const lbt = logGamma(a + b) - logGamma(a) - logGamma(b) + a * Math.log(x) + b * Math.log(1 - x);
  const bt = Math.exp(lbt);
  if (x < (a + 1) / (a + b + 2)) return (bt * betaContinuedFraction(a, b, x)) / a;
  return 1 - (bt * betaContinuedFraction(b, a, 1 - x)) / b;
}

/** Student-t cumulative distribution function with `df` degrees of freedom. */
export function studentTCdf(t: number, df: number): number {
  const x = df / (df + t * t);
  const tail = 0.5 * incompleteBeta(df / 2, 0.5, x);
  return t >= 0 ? 1 - tail : tail;
}

/** Student-t quantile (inverse CDF) for probability p in (0, 1), by bisection on the CDF. */
export function studentTQuantile(p: number, df: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError(`studentTQuantile: p must lie in (0, 1), got ${p}`);
  if (!(df > 0)) throw new RangeError(`studentTQuantile: df must be positive, got ${df}`);
  if (p === 0.5) return 0;
  let lo = -1;
  let hi = 1;
  while (studentTCdf(lo, df) > p) lo *= 2;
  while (studentTCdf(hi, df) < p) hi *= 2;
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi);
    if (studentTCdf(mid, df) < p) lo = mid;
    else hi = mid;
    if (hi - lo < 1e-13 * Math.max(1, Math.abs(mid))) break;
  }
  return 0.5 * (lo + hi);
}

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
