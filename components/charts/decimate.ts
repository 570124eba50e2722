// Min/max decimation for long series (DESIGN.md §4): a line drawn through tens of thousands of
// points on a few hundred pixels shows nothing more than one drawn through each pixel column's
// first, lowest, highest and last point — so keep exactly those, in x order. Peaks survive (a
// plain every-n-th thinning would drop them), and the drawn shape is the same at screen
// resolution. Gaps (a NaN y) are kept as breaks.

export interface XY {
  x: number;
  y: number;
}

/**
 * Reduces `points` (sorted by x) to at most about 4 × `buckets` points: per bucket of equal x
 * width the first, minimum, maximum and last point (duplicates dropped, x order kept). Series
 * already short enough come back unchanged. A point with a non-finite y ends its bucket's run and
 * is kept, so a line breaks there instead of bridging a gap.
 */
export function decimateMinMax<T extends XY>(points: readonly T[], buckets: number): T[] {
  const n = points.length;
  const b = Math.max(1, Math.floor(buckets));
  if (n <= b * 4) return points.slice();
  const x0 = points[0].x;
  const x1 = points[n - 1].x;
  const span = x1 - x0;
  if (!(span > 0)) return points.slice();
  const out: T[] = [];
  let i = 0;
  while (i < n) {
    const bucket = Math.min(b - 1, Math.floor(((points[i].x - x0) / span) * b));
    const end = bucket === b - 1 ? x1 : x0 + ((bucket + 1) * span) / b;
    let first = -1;
    let last = -1;
    let lo = -1;
    let hi = -1;
    const flush = () => {
      if (first < 0) return;
      const keep = [first, lo, hi, last].filter((k, j, a) => a.indexOf(k) === j).sort((p, q) => p - q);
      for (const k of keep) out.push(points[k]);
      first = last = lo = hi = -1;
    };
    // A bucket is [start, end); the last bucket includes x1.
    while (i < n && (points[i].x < end || bucket === b - 1)) {
      const p = points[i];
      if (!Number.isFinite(p.y)) {
        flush();
        out.push(p);
      } else {
        if (first < 0) first = lo = hi = i;
        if (p.y < points[lo].y) lo = i;
        if (p.y > points[hi].y) hi = i;
        last = i;
      }
      i++;
    }
    flush();
  }
  return out;
}

/** Points whose x lies in [from, to], plus one neighbour either side so lines reach the edges. */
export function clipToDomain<T extends { x: number }>(points: readonly T[], from: number, to: number): T[] {
  let a = 0;
  while (a < points.length && points[a].x < from) a++;
  let b = points.length - 1;
  while (b >= 0 && points[b].x > to) b--;
  return points.slice(Math.max(0, a - 1), Math.min(points.length, b + 2));
}
