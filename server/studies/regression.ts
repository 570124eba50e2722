// Ordinary least-squares line y = a + b·x with its confidence band and inverse prediction (the x at
// which the line reaches a given y), for the transfer study: damping (%) against corridor MW, and
// corridor angle (°) against corridor MW.
//
// Formulas (textbook: Draper & Smith, "Applied Regression Analysis", 3rd ed., ch. 1 and §3.2;
// the inverse-prediction interval is Fieller's theorem applied to x₀ = (y₀ − a)/b):
//   b = Sxy/Sxx, a = ȳ − b·x̄, s² = SSE/(n − 2)
//   Var(a + b·x) = s²·(1/n + (x − x̄)²/Sxx)
//   Fieller: the x with |y₀ − a − b·x| ≤ t·√Var(a + b·x); finite when g = t²s²/(b²Sxx) < 1.
//
// Overlapping scan windows (20-min windows stepped by 1 min) are strongly correlated, so n windows
// carry about nEffective ≈ n·step/window independent estimates. With nEffective < n every variance
// above is multiplied by κ = n/nEffective and the t quantile uses nEffective − 2 degrees of freedom
// (a design-effect correction, stated as an approximation: it assumes the correlation is the same
// along the whole line).
import { studentTQuantile } from '../../modal/student-t';

export interface XY {
  x: number;
  y: number;
}

export class StudyInputError extends Error {
  readonly code = 'STUDY_INPUT' as const;
  constructor(message: string) {
    super(message);
    this.name = 'StudyInputError';
  }
}

export interface LineFitOptions {
  /** Two-sided confidence level of bands and intervals (default 0.95). */
  confidenceLevel?: number;
  /** Independent points the sample is worth (default n); must be > 2 and ≤ n. */
  nEffective?: number;
}

export interface LineFit {
  n: number;
  nEffective: number;
  /** Degrees of freedom of the t quantile: nEffective − 2. */
  dof: number;
  intercept: number;
  slope: number;
  interceptSe: number;
  slopeSe: number;
  /** Residual standard deviation s, in y units. */
  residualSd: number;
  r2: number;
  xMean: number;
  yMean: number;
  sxx: number;
  xMin: number;
  xMax: number;
  confidenceLevel: number;
  /** The two-sided t quantile used for every interval. */
  tCrit: number;
}

export function fitLine(points: readonly XY[], options: LineFitOptions = {}): LineFit {
  return fitLineColumns(
    points.map((p) => p.x),
    points.map((p) => p.y),
    options,
  );
}

/**
 * fitLine on two parallel columns (x[i], y[i]) — plain or typed arrays — so a study of 100 000
 * windows needs no object per point. Same sums in the same order, so the same numbers to the bit.
 */
export function fitLineColumns(xs: ArrayLike<number>, ys: ArrayLike<number>, options: LineFitOptions = {}): LineFit {
  const level = options.confidenceLevel ?? 0.95;
  if (!(level > 0 && level < 1)) throw new StudyInputError(`confidenceLevel must be between 0 and 1 (got ${level})`);
  if (xs.length !== ys.length) throw new StudyInputError(`x and y must have the same length (got ${xs.length} and ${ys.length})`);
  const n = xs.length;
  if (n < 3) throw new StudyInputError(`A regression line needs at least 3 points (got ${n})`);
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(xs[i]) || !Number.isFinite(ys[i])) throw new StudyInputError(`Every point must be finite (got x=${xs[i]}, y=${ys[i]})`);
  }
  const nEff = options.nEffective ?? n;
  if (!(nEff > 2 && nEff <= n)) throw new StudyInputError(`nEffective must be above 2 and at most the number of points ${n} (got ${nEff})`);
  let sx = 0;
  let sy = 0;
  let xMin = Infinity;
  let xMax = -Infinity;
  for (let i = 0; i < n; i++) {
    const x = xs[i];
    sx += x;
    sy += ys[i];
    if (x < xMin) xMin = x;
    if (x > xMax) xMax = x;
  }
  const xMean = sx / n;
  const yMean = sy / n;
  let sxx = 0;
  let sxy = 0;
  let syy = 0;
  for (let i = 0; i < n; i++) {
    const dx = xs[i] - xMean;
    const dy = ys[i] - yMean;
    sxx += dx * dx;
    sxy += dx * dy;
    syy += dy * dy;
  }
  if (!(sxx > 1e-12 * Math.max(1, xMean * xMean) * n)) {
    throw new StudyInputError(`All points have the same x (${xMean}); a line needs a spread of transfer levels`);
  }
  const slope = sxy / sxx;
  const intercept = yMean - slope * xMean;
  let sse = 0;
  for (let i = 0; i < n; i++) {
    const r = ys[i] - (intercept + slope * xs[i]);
    sse += r * r;
  }
  const s2 = sse / (n - 2);
  const kappa = n / nEff;
  const dof = nEff - 2;
  return {
    n,
    nEffective: nEff,
    dof,
    intercept,
    slope,
    interceptSe: Math.sqrt(kappa * s2 * (1 / n + (xMean * xMean) / sxx)),
    slopeSe: Math.sqrt((kappa * s2) / sxx),
    residualSd: Math.sqrt(s2),
    r2: syy > 0 ? 1 - sse / syy : 1,
    xMean,
    yMean,
    sxx,
    xMin,
    xMax,
    confidenceLevel: level,
    tCrit: studentTQuantile(0.5 + level / 2, dof),
  };
}

/** Standard error of the fitted mean a + b·x. */
export function meanSe(fit: LineFit, x: number): number {
  const kappa = fit.n / fit.nEffective;
  const d = x - fit.xMean;
  return fit.residualSd * Math.sqrt(kappa * (1 / fit.n + (d * d) / fit.sxx));
}

export interface BandPoint {
  x: number;
  y: number;
  lo: number;
  hi: number;
}

/** The fitted line and its confidence band for the mean at each x. */
export function confidenceBand(fit: LineFit, xs: readonly number[]): BandPoint[] {
  return xs.map((x) => {
    const y = fit.intercept + fit.slope * x;
    const h = fit.tCrit * meanSe(fit, x);
    return { x, y, lo: y - h, hi: y + h };
  });
}

export interface InversePrediction {
  /** The y asked for. */
  y: number;
  /** Point estimate x̂ = (y − a)/b; null when the slope is exactly zero. */
  x: number | null;
  /** Delta-method standard error of x̂: s/|b|·√(κ(1/n + (x̂ − x̄)²/Sxx)). */
  se: number | null;
  /** Fieller confidence interval at the fit's level; null when unbounded (slope not significant). */
  lo: number | null;
  hi: number | null;
  /** x̂ lies outside the range of the data (the line is extrapolated). */
  extrapolated: boolean;
  /** Why the interval is missing, when it is. */
  note: string | null;
}

export function inversePrediction(fit: LineFit, y0: number): InversePrediction {
  const b = fit.slope;
  if (b === 0) return { y: y0, x: null, se: null, lo: null, hi: null, extrapolated: true, note: 'The fitted line is flat; it never reaches this value' };
  const x = (y0 - fit.intercept) / b;
  const kappa = fit.n / fit.nEffective;
  const u = x - fit.xMean;
  const se = (fit.residualSd / Math.abs(b)) * Math.sqrt(kappa * (1 / fit.n + (u * u) / fit.sxx));
  const q = fit.tCrit * fit.tCrit * kappa * fit.residualSd * fit.residualSd;
  const g = q / (b * b * fit.sxx);
  const extrapolated = x < fit.xMin || x > fit.xMax;
  if (g >= 1) {
    return {
      y: y0,
      x,
      se,
      lo: null,
      hi: null,
      extrapolated,
      note: `The slope is not significantly different from zero at the ${Math.round(fit.confidenceLevel * 100)} % level, so the interval is unbounded`,
    };
  }
  const centre = fit.xMean + u / (1 - g);
  const half = (Math.sqrt(q) / (Math.abs(b) * (1 - g))) * Math.sqrt((u * u) / fit.sxx + (1 - g) / fit.n);
  return { y: y0, x, se, lo: centre - half, hi: centre + half, extrapolated, note: null };
}
