// The transfer study of one mode track: damping against the corridor's transfer (MW) over a period,
// a least-squares line with its confidence band, the projected transfer at which the line reaches
// the track's low and poor thresholds (5 % and 3 % by default) with a Fieller interval, and the
// corridor angle against transfer with the transfer at the 45° practical limit (common practice:
// a steady-state angle of about 45° across a corridor, against the 90° of the lossless curve).
//
// The fits use the track's natural-mode estimates (forced ones are left out: they say nothing about
// the mode's damping) in windows where the corridor transfer is known — every one of the period's
// windows, however many. Only the points drawn are a bounded display sample (./sample.ts).
import { confidenceBand, fitLineColumns, inversePrediction, StudyInputError, type BandPoint, type InversePrediction, type LineFit } from './regression';
import { displaySampleIndices, type DisplaySampleOptions } from './sample';

export const PRACTICAL_ANGLE_LIMIT_DEG = 45;

export interface StudyPoint {
  analysisId: number;
  /** Window start, epoch seconds. */
  windowStart: number;
  windowSeconds: number;
  /** Not used by the computation (kept for callers that carry it). */
  stepSeconds?: number;
  dampingPercent: number;
  /** Not used by the computation (kept for callers that carry them). */
  ciLow?: number;
  ciHigh?: number;
  transferMw: number;
  /** From-end minus to-end angle, degrees; null when an angle channel is missing. */
  angleDeg: number | null;
  forced: boolean;
}

/**
 * A study's windows as parallel columns (index i is one window, oldest first): what the database
 * loader gives (db/queries/studies.ts), with no object per window.
 */
export interface StudyColumns {
  length: number;
  analysisId: ArrayLike<number>;
  /** Window start, epoch seconds. */
  windowStart: ArrayLike<number>;
  windowSeconds: ArrayLike<number>;
  dampingPercent: ArrayLike<number>;
  transferMw: ArrayLike<number>;
  /** Degrees; NaN where an angle channel is missing. */
  angleDeg: ArrayLike<number>;
  /** 1 for a forced-oscillation window, 0 for a natural mode. */
  forced: ArrayLike<number>;
}

export function columnsOfPoints(points: readonly StudyPoint[]): StudyColumns {
  return {
    length: points.length,
    analysisId: points.map((p) => p.analysisId),
    windowStart: points.map((p) => p.windowStart),
    windowSeconds: points.map((p) => p.windowSeconds),
    dampingPercent: points.map((p) => p.dampingPercent),
    transferMw: points.map((p) => p.transferMw),
    angleDeg: points.map((p) => p.angleDeg ?? NaN),
    forced: points.map((p) => (p.forced ? 1 : 0)),
  };
}

/**
 * How many independent estimates the points are worth: windows of one analysis overlap when the
 * step is shorter than the window, so each analysis contributes about (span of its window starts) /
 * window + 1 independent windows, capped by its count.
 */
export function effectiveSampleSize(points: readonly Pick<StudyPoint, 'analysisId' | 'windowStart' | 'windowSeconds'>[]): number {
  return effectiveSampleSizeOf(
    { analysisId: points.map((p) => p.analysisId), windowStart: points.map((p) => p.windowStart), windowSeconds: points.map((p) => p.windowSeconds) },
    Array.from({ length: points.length }, (_, i) => i),
  );
}

/** effectiveSampleSize of the windows at `indices` of the columns. */
export function effectiveSampleSizeOf(c: Pick<StudyColumns, 'analysisId' | 'windowStart' | 'windowSeconds'>, indices: ArrayLike<number>): number {
  const groups = new Map<number, { first: number; last: number; count: number; window: number }>();
  for (let k = 0; k < indices.length; k++) {
    const i = indices[k];
    const g = groups.get(c.analysisId[i]);
    if (!g) groups.set(c.analysisId[i], { first: c.windowStart[i], last: c.windowStart[i], count: 1, window: c.windowSeconds[i] });
    else {
      g.first = Math.min(g.first, c.windowStart[i]);
      g.last = Math.max(g.last, c.windowStart[i]);
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

interface StudyFigures {
  method: 'ols-fieller';
  confidenceLevel: number;
  /** Windows of the study (all of them, forced included). */
  pointsTotal: number;
  /** Windows in the display sample, and whether it is a sample (pointsShown < pointsTotal). */
  pointsShown: number;
  pointsSampled: boolean;
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

/** The study over columns: every figure over all windows, and the display sample as indices. */
export interface TransferStudyCore extends StudyFigures {
  /** The display sample (shared/api/studies.ts): ascending indices into the columns. */
  shown: number[];
}

/** The study over a list of points: every figure over all of them, `points` the display sample. */
export interface TransferStudyResult extends StudyFigures {
  points: StudyPoint[];
}

export interface TransferStudyOptions {
  /** Two-sided confidence level of every band and interval (default 0.95). */
  confidenceLevel?: number;
  /** Size and bins of the display sample (defaults in shared/api/studies.ts). */
  sample?: DisplaySampleOptions;
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
  options: TransferStudyOptions = {},
): TransferStudyResult {
  const { shown, ...figures } = computeTransferStudy(columnsOfPoints(allPoints), thresholds, options);
  return { ...figures, points: shown.length === allPoints.length ? [...allPoints] : shown.map((i) => allPoints[i]) };
}

export function computeTransferStudy(
  c: StudyColumns,
  thresholds: { poorBelow: number; lowBelow: number },
  options: TransferStudyOptions = {},
): TransferStudyCore {
  const level = options.confidenceLevel ?? 0.95;
  const n = c.length;
  // natural-mode windows with finite readings, in order (the fits' points)
  const used: number[] = [];
  let forced = 0;
  for (let i = 0; i < n; i++) {
    if (c.forced[i]) forced++;
    else if (Number.isFinite(c.transferMw[i]) && Number.isFinite(c.dampingPercent[i])) used.push(i);
  }
  const shown = displaySampleIndices({ length: n, transferMw: c.transferMw, dampingPercent: c.dampingPercent, forced: c.forced }, options.sample);
  const nEffRaw = effectiveSampleSizeOf(c, used);
  const result: TransferStudyCore = {
    method: 'ols-fieller',
    confidenceLevel: level,
    pointsTotal: n,
    pointsShown: shown.length,
    pointsSampled: shown.length < n,
    shown,
    pointsUsed: used.length,
    pointsForced: forced,
    nEffective: nEffRaw,
    damping: { fit: null, line: [], projections: [], note: null },
    angle: { fit: null, line: [], limitDeg: PRACTICAL_ANGLE_LIMIT_DEG, atLimit: null, note: null },
  };
  const column = (values: ArrayLike<number>, at: readonly number[]) => {
    const out = new Float64Array(at.length);
    for (let k = 0; k < at.length; k++) out[k] = values[at[k]];
    return out;
  };
  try {
    const f = fitLineColumns(column(c.transferMw, used), column(c.dampingPercent, used), {
      confidenceLevel: level,
      nEffective: clampEffective(nEffRaw, used.length),
    });
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
  const withAngle = used.filter((i) => Number.isFinite(c.angleDeg[i]));
  try {
    const nEffA = effectiveSampleSizeOf(c, withAngle);
    const f = fitLineColumns(column(c.transferMw, withAngle), column(c.angleDeg, withAngle), {
      confidenceLevel: level,
      nEffective: clampEffective(nEffA, withAngle.length),
    });
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
