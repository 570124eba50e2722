// Student's t distribution: the ambient estimator's confidence intervals and the transfer study's
// regression intervals (one implementation for both; pure TypeScript, as everything in modal/).
//
// Regularized incomplete beta I_x(a, b) by its continued fraction evaluated with the modified Lentz
// method, and ln Γ by the Lanczos approximation (g = 7, 9 terms) — textbook: Press et al.,
// "Numerical Recipes", 3rd ed., §6.1 and §6.4. Checked against scipy.stats (library) in the tests.

const LANCZOS = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059, 12.507343278686905,
  -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
];

export function logGamma(x: number): number {
  if (x < 0.5) return Math.log(Math.PI / Math.abs(Math.sin(Math.PI * x))) - logGamma(1 - x);
  const z = x - 1;
  let a = LANCZOS[0];
  const t = z + 7.5;
  for (let i = 1; i < 9; i++) a += LANCZOS[i] / (z + i);
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(a);
}

function betaContinuedFraction(a: number, b: number, x: number): number {
  const TINY = 1e-300;
  const EPS = 1e-15;
  const qab = a + b;
  const qap = a + 1;
  const qam = a - 1;
  let c = 1;
  let d = 1 - (qab * x) / qap;
  if (Math.abs(d) < TINY) d = TINY;
  d = 1 / d;
  let h = d;
  for (let m = 1; m <= 10_000; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((qam + m2) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (qab + m) * x) / ((a + m2) * (qap + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < EPS) break;
  }
  return h;
}

/** Regularized incomplete beta function I_x(a, b), a, b > 0, 0 ≤ x ≤ 1. */
export function incompleteBeta(x: number, a: number, b: number): number {
  if (x <= 0) return 0;
  if (x >= 1) return 1;
  const lnFront = logGamma(a + b) - logGamma(a) - logGamma(b) + a * Math.log(x) + b * Math.log(1 - x);
  const front = Math.exp(lnFront);
  // The continued fraction converges fast for x < (a + 1) / (a + b + 2); use the symmetry otherwise.
  if (x < (a + 1) / (a + b + 2)) return (front * betaContinuedFraction(a, b, x)) / a;
  return 1 - (front * betaContinuedFraction(b, a, 1 - x)) / b;
}

/** Cumulative distribution of Student's t with `dof` degrees of freedom (dof > 0, may be fractional). */
export function studentTCdf(t: number, dof: number): number {
  if (!(dof > 0)) throw new RangeError(`studentTCdf: degrees of freedom must be positive (got ${dof})`);
  const x = dof / (dof + t * t);
  const tail = 0.5 * incompleteBeta(x, dof / 2, 0.5);
  return t >= 0 ? 1 - tail : tail;
}

/** Quantile (inverse CDF) of Student's t: the t with P(T ≤ t) = p. */
export function studentTQuantile(p: number, dof: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError(`studentTQuantile: p must be between 0 and 1 (got ${p})`);
  if (!(dof > 0)) throw new RangeError(`studentTQuantile: degrees of freedom must be positive (got ${dof})`);
  if (p === 0.5) return 0;
  if (p < 0.5) return -studentTQuantile(1 - p, dof);
  // Bracket, then bisect on the monotone CDF to full double precision (a few dozen CDF calls).
  let lo = 0;
  let hi = 1;
  while (studentTCdf(hi, dof) < p) {
    lo = hi;
    hi *= 2;
    if (hi > 1e12) return Infinity;
  }
  for (let i = 0; i < 200 && hi - lo > 1e-13 * Math.max(1, hi); i++) {
    const mid = 0.5 * (lo + hi);
    if (studentTCdf(mid, dof) < p) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}
