// The display sample of a transfer study: which windows the scatter draws when the period holds
// more than the answer may carry. The statistics never use it (they run over every window); it only
// bounds the answer's size. The rule is the one documented in shared/api/studies.ts:
//   at most maxPoints windows; when there are that many or fewer, all of them in their order;
//   otherwise, over `bins` equal transfer bins: each bin's lowest- and highest-damping natural
//   window, and the windows at the lowest and highest transfer, always; the rest of the budget
//   shared among the bins in proportion to their remaining windows (largest remainders), taken at
//   evenly spaced damping ranks within each bin; the chosen windows returned in input order.
// Deterministic: no randomness, ties broken by input position.
import { STUDY_MAX_POINTS, STUDY_SAMPLE_BINS } from '../../shared/api/studies';
import { StudyInputError } from './regression';

export interface DisplaySampleOptions {
  /** Most windows drawn (default STUDY_MAX_POINTS = 2000); a whole number ≥ 2 × bins + 2. */
  maxPoints?: number;
  /** Equal-width transfer bins (default STUDY_SAMPLE_BINS = 40); a whole number ≥ 1. */
  bins?: number;
}

export const DEFAULT_DISPLAY_SAMPLE_OPTIONS: Required<DisplaySampleOptions> = { maxPoints: STUDY_MAX_POINTS, bins: STUDY_SAMPLE_BINS };

export function checkDisplaySampleOptions(options: DisplaySampleOptions = {}): Required<DisplaySampleOptions> {
  const o = { ...DEFAULT_DISPLAY_SAMPLE_OPTIONS, ...options };
  if (!Number.isInteger(o.bins) || o.bins < 1) throw new StudyInputError(`bins must be a whole number of at least 1 (got ${o.bins})`);
  // the windows kept always (two per bin and the two transfer extremes) must fit in the budget
  const least = 2 * o.bins + 2;
  if (!Number.isInteger(o.maxPoints) || o.maxPoints < least) {
    throw new StudyInputError(`maxPoints must be a whole number of at least 2 × bins + 2 = ${least} (got ${o.maxPoints})`);
  }
  return o;
}

/** Columns the sample looks at; index i is one window. */
export interface SampleColumns {
  length: number;
  transferMw: ArrayLike<number>;
  dampingPercent: ArrayLike<number>;
  /** Non-zero / true: a forced-oscillation window (never a bin's damping extreme unless the bin has no natural window). */
  forced: ArrayLike<number | boolean>;
}

/** Indices (ascending) of the windows to draw. */
export function displaySampleIndices(cols: SampleColumns, options: DisplaySampleOptions = {}): number[] {
  const { maxPoints, bins } = checkDisplaySampleOptions(options);
  const n = cols.length;
  if (n <= maxPoints) return Array.from({ length: n }, (_, i) => i);
  const x = cols.transferMw;
  const y = cols.dampingPercent;

  // Bins: `bins` equal ones over the finite transfers, plus one last bin for any non-finite transfer.
  let xMin = Infinity;
  let xMax = -Infinity;
  let iMin = -1;
  let iMax = -1;
  for (let i = 0; i < n; i++) {
    const v = x[i];
    if (!Number.isFinite(v)) continue;
    if (v < xMin) [xMin, iMin] = [v, i];
    if (v > xMax) [xMax, iMax] = [v, i];
  }
  const span = xMax - xMin;
  const binOf = new Int32Array(n);
  const counts = new Int32Array(bins + 1);
  for (let i = 0; i < n; i++) {
    const v = x[i];
    const b = !Number.isFinite(v) ? bins : span > 0 ? Math.min(bins - 1, Math.floor(((v - xMin) / span) * bins)) : 0;
    binOf[i] = b;
    counts[b]++;
  }
  // members of each bin, in input order (a counting sort)
  const start = new Int32Array(bins + 2);
  for (let b = 0; b <= bins; b++) start[b + 1] = start[b] + counts[b];
  const members = new Int32Array(n);
  const fill = start.slice(0, bins + 1);
  for (let i = 0; i < n; i++) members[fill[binOf[i]]++] = i;

  const kept = new Uint8Array(n);
  const keptPerBin = new Int32Array(bins + 1);
  const keep = (i: number) => {
    if (i < 0 || kept[i]) return;
    kept[i] = 1;
    keptPerBin[binOf[i]]++;
  };
  // damping as a sort key (non-finite last), read once into a typed array: the ranking below
  // compares it n·log n times
  const key = new Float64Array(n);
  for (let i = 0; i < n; i++) key[i] = Number.isFinite(y[i]) ? y[i] : Infinity;
  for (let b = 0; b <= bins; b++) {
    let anyNatural = false;
    for (let k = start[b]; k < start[b + 1]; k++) if (!cols.forced[members[k]]) anyNatural = true;
    let lo = -1;
    let hi = -1;
    for (let k = start[b]; k < start[b + 1]; k++) {
      const i = members[k];
      if (anyNatural && cols.forced[i]) continue;
      if (lo < 0 || key[i] < key[lo]) lo = i;
      if (hi < 0 || key[i] > key[hi]) hi = i;
    }
    keep(lo);
    keep(hi);
  }
  keep(iMin);
  keep(iMax);

  // The rest of the budget, in proportion to what each bin has left (largest-remainder rounding;
  // integer arithmetic throughout, so the split is exact).
  let keptTotal = 0;
  for (let b = 0; b <= bins; b++) keptTotal += keptPerBin[b];
  const budget = maxPoints - keptTotal;
  const left = (b: number) => counts[b] - keptPerBin[b];
  const leftTotal = n - keptTotal; // > budget, since n > maxPoints
  const quota = new Int32Array(bins + 1);
  const remainder = new Float64Array(bins + 1);
  let given = 0;
  for (let b = 0; b <= bins; b++) {
    const a = budget * left(b);
    quota[b] = Math.floor(a / leftTotal);
    remainder[b] = a - quota[b] * leftTotal;
    given += quota[b];
  }
  const byRemainder = Array.from({ length: bins + 1 }, (_, b) => b).sort((p, q) => remainder[q] - remainder[p] || p - q);
  for (let k = 0; given < budget; k++, given++) quota[byRemainder[k]]++;

  // Within a bin: the windows not yet kept, ranked by damping (ties: input order), taken at the
  // middles of q equal rank intervals (ranks ⌊(2j + 1)·m / 2q⌋, strictly increasing since m ≥ q).
  for (let b = 0; b <= bins; b++) {
    const q = quota[b];
    if (q === 0) continue;
    const rest: number[] = [];
    for (let k = start[b]; k < start[b + 1]; k++) if (!kept[members[k]]) rest.push(members[k]);
    rest.sort((i, j) => key[i] - key[j] || i - j);
    const m = rest.length;
    for (let j = 0; j < q; j++) kept[rest[Math.floor(((2 * j + 1) * m) / (2 * q))]] = 1;
  }

  const out: number[] = [];
  for (let i = 0; i < n; i++) if (kept[i]) out.push(i);
  return out;
}

/** The display sample of a list of windows (the same objects, in their order). */
export function sampleDisplayPoints<T extends { transferMw: number; dampingPercent: number; forced: boolean }>(points: readonly T[], options: DisplaySampleOptions = {}): T[] {
  const idx = displaySampleIndices(
    {
      length: points.length,
      transferMw: points.map((p) => p.transferMw),
      dampingPercent: points.map((p) => p.dampingPercent),
      forced: points.map((p) => p.forced),
    },
    options,
  );
  return idx.length === points.length ? [...points] : idx.map((i) => points[i]);
}
