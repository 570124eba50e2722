// Per-window data-quality flags of the ambient scan, built from summaries of fixed blocks of raw
// samples so that a day of sliding windows costs one pass over the data. A block summary keeps
// the runs touching its edges, so runs crossing block boundaries merge exactly; the window's
// dropouts, gap count, longest gap and flat-line samples are the same as a direct count over the
// window (modal/preprocess.ts windowQuality). Outliers are the one approximation: each block's
// finite samples are compared with that block's own median and MAD (6 robust standard deviations,
// robust σ = 1.4826·MAD, common practice) instead of the whole window's.
import { quickselect } from './ambient-stats';
import type { WindowQuality } from './types';

export interface QualitySummary {
  n: number;
  dropouts: number;
  /** Runs of missing samples counted inside this span alone. */
  runs: number;
  maxRun: number;
  prefixNan: number;
  suffixNan: number;
  /** Equal-value runs touching the edges (length and value; length 0 when the edge is missing). */
  prefixEqLen: number;
  prefixEqVal: number;
  suffixEqLen: number;
  suffixEqVal: number;
  /** Samples in closed equal-value runs (not touching an edge) of at least minFlat samples. */
  flatInternal: number;
  outliers: number;
}

/** Summary of raw samples x[from..to) (NaN/±Inf = missing). `scratch` ≥ to − from. */
export function summarizeBlock(x: Float64Array, from: number, to: number, minFlat: number, scratch: Float64Array): QualitySummary {
  const n = to - from;
  let dropouts = 0;
  let runs = 0;
  let maxRun = 0;
  let cur = 0;
  let finiteCount = 0;
  // equal-value runs: the current run [runStart, i) of value runVal (NaN when the last sample was missing)
  let runStart = from;
  let runVal = NaN;
  let prefixEqLen = -1;
  let flatInternal = 0;
  for (let i = from; i < to; i++) {
    const v = x[i];
    if (v - v !== 0) {
      dropouts++;
      if (cur === 0) runs++;
      cur++;
      if (cur > maxRun) maxRun = cur;
      if (runVal === runVal) {
        // a finite run ends at a missing sample
        if (runStart === from) prefixEqLen = i - from;
        else if (i - runStart >= minFlat) flatInternal += i - runStart;
      } else if (runStart === from && prefixEqLen < 0) prefixEqLen = 0;
      runVal = NaN;
      runStart = i + 1;
      continue;
    }
    cur = 0;
    scratch[finiteCount++] = v;
    if (v !== runVal) {
      if (runVal === runVal) {
        if (runStart === from) prefixEqLen = i - from;
        else if (i - runStart >= minFlat) flatInternal += i - runStart;
      } else if (runStart === from && prefixEqLen < 0 && i > from) prefixEqLen = 0;
      runVal = v;
      runStart = i;
    }
  }
  // the last run touches the right edge
  let suffixEqLen = 0;
  let suffixEqVal = NaN;
  if (runVal === runVal && n > 0) {
    suffixEqLen = to - runStart;
    suffixEqVal = runVal;
    if (runStart === from) prefixEqLen = n;
  }
  if (prefixEqLen < 0) prefixEqLen = 0;
  const prefixEqVal = prefixEqLen > 0 ? x[from] : NaN;
  let prefixNan = 0;
  while (prefixNan < n && x[from + prefixNan] - x[from + prefixNan] !== 0) prefixNan++;
  let suffixNan = 0;
  while (suffixNan < n && x[to - 1 - suffixNan] - x[to - 1 - suffixNan] !== 0) suffixNan++;

  let outliers = 0;
  if (finiteCount > 0) {
    const k = finiteCount;
    const med = medianInPlace(scratch, k);
    for (let i = 0; i < k; i++) scratch[i] = Math.abs(scratch[i] - med);
    const mad = medianInPlace(scratch, k);
    if (mad > 0) {
      const limit = 6 * 1.4826 * mad;
      for (let i = 0; i < k; i++) if (scratch[i] > limit) outliers++;
    }
  }
  return { n, dropouts, runs, maxRun, prefixNan, suffixNan, prefixEqLen, prefixEqVal, suffixEqLen, suffixEqVal, flatInternal, outliers };
}

function medianInPlace(a: Float64Array, n: number): number {
  const h = n >> 1;
  const hi = quickselect(a, n, h);
  if (n % 2) return hi;
  let lo = -Infinity;
  for (let i = 0; i < h; i++) if (a[i] > lo) lo = a[i];
  return 0.5 * (lo + hi);
}

/** Summary of the concatenation A·B. */
export function mergeSummaries(a: QualitySummary, b: QualitySummary, minFlat: number): QualitySummary {
  if (a.n === 0) return b;
  if (b.n === 0) return a;
  const aAllNan = a.prefixNan === a.n;
  const bAllNan = b.prefixNan === b.n;
  const joinNan = a.suffixNan > 0 && b.prefixNan > 0 ? a.suffixNan + b.prefixNan : 0;
  const aAllEq = a.n > 0 && a.prefixEqLen === a.n;
  const bAllEq = b.n > 0 && b.prefixEqLen === b.n;
  const join = a.suffixEqLen > 0 && b.prefixEqLen > 0 && a.suffixEqVal === b.prefixEqVal;
  let flatInternal = a.flatInternal + b.flatInternal;
  let prefixEqLen = a.prefixEqLen;
  let prefixEqVal = a.prefixEqVal;
  let suffixEqLen = b.suffixEqLen;
  let suffixEqVal = b.suffixEqVal;
  if (join) {
    const joint = a.suffixEqLen + b.prefixEqLen;
    if (aAllEq && bAllEq) {
      prefixEqLen = suffixEqLen = joint;
    } else if (aAllEq) {
      prefixEqLen = joint;
    } else if (bAllEq) {
      suffixEqLen = joint;
    } else if (joint >= minFlat) {
      flatInternal += joint;
    }
  } else {
    // A's suffix run and B's prefix run are closed by the junction
    if (!aAllEq && a.suffixEqLen >= minFlat) flatInternal += a.suffixEqLen;
    if (!bAllEq && b.prefixEqLen >= minFlat) flatInternal += b.prefixEqLen;
  }
  return {
    n: a.n + b.n,
    dropouts: a.dropouts + b.dropouts,
    runs: a.runs + b.runs - (joinNan > 0 ? 1 : 0),
    maxRun: Math.max(a.maxRun, b.maxRun, joinNan),
    prefixNan: aAllNan ? a.n + b.prefixNan : a.prefixNan,
    suffixNan: bAllNan ? b.n + a.suffixNan : b.suffixNan,
    prefixEqLen,
    prefixEqVal,
    suffixEqLen,
    suffixEqVal,
    flatInternal,
    outliers: a.outliers + b.outliers,
  };
}

/** Closes the edge runs of a window's summary into WindowQuality. */
export function finalizeSummary(s: QualitySummary, minFlat: number): WindowQuality {
  let flat = s.flatInternal;
  if (s.n > 0 && s.prefixEqLen === s.n) {
    if (s.n >= minFlat) flat += s.n;
  } else {
    if (s.prefixEqLen >= minFlat) flat += s.prefixEqLen;
    if (s.suffixEqLen >= minFlat) flat += s.suffixEqLen;
  }
  return { samples: s.n, dropouts: s.dropouts, gaps: s.runs, longestGap: s.maxRun, flatLine: flat, outliers: s.outliers };
}
