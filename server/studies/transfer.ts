// The transfer study of one mode track: damping against the corridor's transfer (MW) over a period,
// a least-squares line with its confidence band, the projected transfer at which the line reaches
// the track's low and poor thresholds (5 % and 3 % by default) with a Fieller interval, and the
// corridor angle against transfer with the transfer at the 45° practical limit (common practice:
// a steady-state angle of about 45° across a corridor, against the 90° of the lossless curve).
//
// Points are the track's natural-mode estimates (forced ones are left out: they say nothing about
// the mode's damping) in windows where the corridor transfer is known.
import { confidenceBand, fitLine, inversePrediction, StudyInputError, type BandPoint, type InversePrediction, type LineFit } from './regression';

export const PRACTICAL_ANGLE_LIMIT_DEG = 45;

export interface StudyPoint {
  analysisId: number;
  /** Window start, epoch seconds. */
  windowStart: number;
  windowSeconds: number;
  stepSeconds: number;
  dampingPercent: number;
  ciLow: number;
  ciHigh: number;
  transferMw: number;
  /** From-end minus to-end angle, degrees; null when an angle channel is missing. */
  angleDeg: number | null;
  forced: boolean;
}

/**
 * How many independent estimates the points are worth: windows of one analysis overlap when the
 * step is shorter than the window, so each analysis contributes about (span of its window starts) /
 * window + 1 independent windows, capped by its count.
 */
export function effectiveSampleSize(points: readonly Pick<StudyPoint, 'analysisId' | 'windowStart' | 'windowSeconds'>[]): number {
  const groups = new Map<number, { first: number; last: number; count: number; window: number }>();
  for (const p of points) {
    const g = groups.get(p.analysisId);
    if (!g) groups.set(p.analysisId, { first: p.windowStart, last: p.windowStart, count: 1, window: p.windowSeconds });
    else {
      g.first = Math.min(g.first, p.windowStart);
      g.last = Math.max(g.last, p.windowStart);
      g.count++;
    }
  }
  let total = 0;
  for (const g of groups.values()) total += Math.min(g.count, (g.last - g.first) / g.window + 1);
  return total;
}

export interface FitSummary {
  n: number;
  nEffective: number;
  intercept: number;
  slope: number;
  interceptSe: number;
  slopeSe: number;
  residualSd: number;
  r2: number;
  confidenceLevel: number;
}

export interface TransferStudyResult {
  method: 'ols-fieller';
  confidenceLevel: number;
  points: StudyPoint[];
  pointsUsed: number;
  pointsForced: number;
  nEffective: number;
  damping: {
    fit: FitSummary | null;
    /** Line and confidence band of the mean damping, sampled across the plotted MW range. */
    line: BandPoint[];
    /** For each threshold (lowBelow, poorBelow): the projected MW and its interval. */
    projections: (InversePrediction & { threshold: 'low' | 'poor' })[];
    note: string | null;
  };
  angle: {
    fit: FitSummary | null;
    line: BandPoint[];
    limitDeg: number;
    atLimit: InversePrediction | null;
    note: string | null;
  };
}

function summary(f: LineFit): FitSummary {
  return {
    n: f.n,
    nEffective: f.nEffective,
    intercept: f.intercept,
    slope: f.slope,
    interceptSe: f.interceptSe,
    slopeSe: f.slopeSe,
    residualSd: f.residualSd,
    r2: f.r2,
    confidenceLevel: f.confidenceLevel,
  };
}

/** MW values to draw a line at: the data range widened to include the projections (at most 2× the range). */
function lineXs(f: LineFit, extra: (number | null)[], count = 60): number[] {
  const span = f.xMax - f.xMin;
  let lo = f.xMin;
  let hi = f.xMax;
  for (const x of extra) {
    if (x === null || !Number.isFinite(x)) continue;
    lo = Math.min(lo, Math.max(x, f.xMin - span));
    hi = Math.max(hi, Math.min(x, f.xMax + span));
  }
  return Array.from({ length: count }, (_, i) => lo + ((hi - lo) * i) / (count - 1));
}

function clampEffective(nEff: number, n: number): number {
  return Math.min(n, Math.max(nEff, Math.min(n, 3)));
}

export function buildTransferStudy(
  allPoints: readonly StudyPoint[],
  thresholds: { poorBelow: number; lowBelow: number },
  options: { confidenceLevel?: number } = {},
): TransferStudyResult {
  const level = options.confidenceLevel ?? 0.95;
  const used = allPoints.filter((p) => !p.forced && Number.isFinite(p.transferMw) && Number.isFinite(p.dampingPercent));
  const nEffRaw = effectiveSampleSize(used);
  const result: TransferStudyResult = {
    method: 'ols-fieller',
    confidenceLevel: level,
    points: [...allPoints],
    pointsUsed: used.length,
    pointsForced: allPoints.filter((p) => p.forced).length,
    nEffective: nEffRaw,
    damping: { fit: null, line: [], projections: [], note: null },
    angle: { fit: null, line: [], limitDeg: PRACTICAL_ANGLE_LIMIT_DEG, atLimit: null, note: null },
  };
  try {
    const f = fitLine(
      used.map((p) => ({ x: p.transferMw, y: p.dampingPercent })),
      { confidenceLevel: level, nEffective: clampEffective(nEffRaw, used.length) },
    );
    const proj = [
      { ...inversePrediction(f, thresholds.lowBelow), threshold: 'low' as const },
      { ...inversePrediction(f, thresholds.poorBelow), threshold: 'poor' as const },
    ];
    result.damping = {
      fit: summary(f),
      line: confidenceBand(f, lineXs(f, proj.map((p) => p.x))),
      projections: proj,
      note: nEffRaw < 3 ? 'Fewer than 3 independent windows: the interval is very wide' : null,
    };
  } catch (err) {
    if (!(err instanceof StudyInputError)) throw err;
    result.damping.note = err.message;
  }
  const withAngle = used.filter((p) => p.angleDeg !== null && Number.isFinite(p.angleDeg));
  try {
    const nEffA = effectiveSampleSize(withAngle);
    const f = fitLine(
      withAngle.map((p) => ({ x: p.transferMw, y: p.angleDeg as number })),
      { confidenceLevel: level, nEffective: clampEffective(nEffA, withAngle.length) },
    );
    const atLimit = inversePrediction(f, PRACTICAL_ANGLE_LIMIT_DEG);
    result.angle = {
      fit: summary(f),
      line: confidenceBand(f, lineXs(f, [atLimit.x])),
      limitDeg: PRACTICAL_ANGLE_LIMIT_DEG,
      atLimit,
      note: null,
    };
  } catch (err) {
    if (!(err instanceof StudyInputError)) throw err;
    result.angle.note = err.message;
  }
  return result;
}
