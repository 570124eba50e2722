// Mode estimates of tracks over time: raw ranges, time buckets for long spans (from the rollups,
// estimate_rollups, where whole rollup buckets fit), one estimate with its shape and source, and the
// newest estimate of each track with its scan step.
import { and, asc, desc, eq, getTableColumns, gte, lte, sql, type SQL } from 'drizzle-orm';
import type { DbOrTx } from '../client';
import { analyses, areas, channels, estimateRollups, fits, modeEstimates, modeShapes, modeTracks, ROLLUP_SPANS, scanWindows, sites } from '../schema';

export type EstimateRow = typeof modeEstimates.$inferSelect;

function rangeConds(p: { trackId: number; from: Date; to: Date; naturalOnly?: boolean }): SQL[] {
  const c: SQL[] = [eq(modeEstimates.trackId, p.trackId), gte(modeEstimates.at, p.from), lte(modeEstimates.at, p.to)];
  if (p.naturalOnly) c.push(eq(modeEstimates.forced, false));
  return c;
}

/** Number of a track's estimates in [from, to]: full rollup buckets plus the estimates at the edges. */
export async function countTrackEstimates(db: DbOrTx, params: { trackId: number; from: Date; to: Date; naturalOnly?: boolean }): Promise<number> {
  const plan = planRollupCover(params.from.getTime(), params.to.getTime(), ROLLUP_SPANS_DESC);
  const parts: SQL[] = [];
  const raw = rawEdgeCondition(plan);
  if (raw) {
    const c = [eq(modeEstimates.trackId, params.trackId), raw];
    if (params.naturalOnly) c.push(eq(modeEstimates.forced, false));
    parts.push(sql`select count(*)::float8 as n from ${modeEstimates} where ${and(...c)}`);
  }
  const roll = rollupCondition(plan);
  if (roll) {
    const n = params.naturalOnly ? estimateRollups.naturalCount : estimateRollups.count;
    parts.push(sql`select coalesce(sum(${n}), 0)::float8 as n from ${estimateRollups} where ${estimateRollups.trackId} = ${params.trackId} and ${roll}`);
  }
  if (parts.length === 0) return 0;
  const r = await db.execute<{ n: number }>(sql`select coalesce(sum(n), 0)::int as n from (${sql.join(parts, sql` union all `)}) p`);
  return Number(r.rows[0].n);
}

/** Raw estimates of a track in [from, to], oldest first; `afterId` pages (keyset on at, id). */
export async function trackEstimates(
  db: DbOrTx,
  params: { trackId: number; from: Date; to: Date; naturalOnly?: boolean; limit?: number; after?: { at: Date; id: number } },
): Promise<EstimateRow[]> {
  const conds = rangeConds(params);
  if (params.after) conds.push(sql`(${modeEstimates.at}, ${modeEstimates.id}) > (${params.after.at.toISOString()}::timestamptz, ${params.after.id})`);
  const q = db.select().from(modeEstimates).where(and(...conds)).orderBy(asc(modeEstimates.at), asc(modeEstimates.id));
  return params.limit ? q.limit(params.limit) : q;
}

export interface BucketRow {
  start: Date;
  count: number;
  dampingMin: number | null;
  dampingMean: number | null;
  dampingMax: number | null;
  dampingLoMean: number | null;
  dampingHiMean: number | null;
  frequencyMean: number;
  forcedCount: number;
}

// ---------------------------------------------------------------- rollups (db/schema.ts estimateRollups)

const ROLLUP_SPANS_DESC = [...ROLLUP_SPANS].sort((a, b) => b - a);

/** A cover of [fromMs, toMs] (both inclusive): full rollup buckets, and the estimates left at the two edges. */
export interface RollupCover {
  /** Full buckets of `span` seconds whose starts lie in [fromMs, toMs), epoch ms. */
  rollups: { span: number; fromMs: number; toMs: number }[];
  /** Edges read from the estimates: at in [fromMs, toMs) for the first, [fromMs, toMs] for the second. */
  head: { fromMs: number; toMs: number } | null;
  tail: { fromMs: number; toMs: number } | null;
}

/**
 * Covers [fromMs, toMs] with the coarsest epoch-aligned rollup buckets that fit wholly inside it,
 * then finer ones towards both edges; what no bucket covers (less than the finest span at each
 * end) is left to the estimates. `spans` are in seconds, coarsest first, each a multiple of the
 * next (so a bucket of one span is a union of buckets of the finer ones).
 */
export function planRollupCover(fromMs: number, toMs: number, spans: readonly number[]): RollupCover {
  const rollups: RollupCover['rollups'] = [];
  if (!(toMs >= fromMs)) return { rollups, head: null, tail: null };
  // the part not yet covered: [lo, hi) on the left edge and [hi2, toMs] on the right edge
  let lo = fromMs;
  let hi = Infinity; // left edge not yet split off
  let hi2 = Infinity;
  for (const span of spans) {
    const s = span * 1000;
    if (hi === Infinity) {
      const a = Math.ceil(fromMs / s) * s;
      const b = Math.floor(toMs / s) * s;
      if (a < b) {
        rollups.push({ span, fromMs: a, toMs: b });
        hi = a;
        hi2 = b;
      }
      continue;
    }
    // left edge [lo, hi): hi is a multiple of s
    const a = Math.ceil(lo / s) * s;
    if (a < hi) {
      rollups.push({ span, fromMs: a, toMs: hi });
      hi = a;
    }
    // right edge [hi2, toMs]
    const b = Math.floor(toMs / s) * s;
    if (hi2 < b) {
      rollups.push({ span, fromMs: hi2, toMs: b });
      hi2 = b;
    }
  }
  if (hi === Infinity) return { rollups, head: null, tail: { fromMs, toMs } };
  return { rollups, head: lo < hi ? { fromMs: lo, toMs: hi } : null, tail: { fromMs: hi2, toMs } };
}

const ts = (ms: number) => sql`${new Date(ms).toISOString()}::timestamptz`;

function rawEdgeCondition(plan: RollupCover): SQL | null {
  const c: SQL[] = [];
  if (plan.head) c.push(sql`(${modeEstimates.at} >= ${ts(plan.head.fromMs)} and ${modeEstimates.at} < ${ts(plan.head.toMs)})`);
  if (plan.tail) c.push(sql`(${modeEstimates.at} >= ${ts(plan.tail.fromMs)} and ${modeEstimates.at} <= ${ts(plan.tail.toMs)})`);
  return c.length ? sql`(${sql.join(c, sql` or `)})` : null;
}

function rollupCondition(plan: RollupCover): SQL | null {
  if (plan.rollups.length === 0) return null;
  const c = plan.rollups.map(
    (r) => sql`(${estimateRollups.spanSeconds} = ${r.span} and ${estimateRollups.start} >= ${ts(r.fromMs)} and ${estimateRollups.start} < ${ts(r.toMs)})`,
  );
  return sql`(${sql.join(c, sql` or `)})`;
}

/**
 * Time buckets of `bucketSeconds` (aligned to the epoch); damping statistics over natural estimates.
 * Reads the rollups for every whole rollup bucket inside [from, to] whose span divides
 * bucketSeconds (so it nests in one output bucket), and the estimates for the rest.
 */
export async function trackEstimateBuckets(
  db: DbOrTx,
  params: { trackId: number; from: Date; to: Date; bucketSeconds: number; naturalOnly?: boolean },
): Promise<BucketRow[]> {
  const byTrack = await tracksEstimateBuckets(db, {
    ranges: [{ trackId: params.trackId, from: params.from, to: params.to }],
    bucketSeconds: params.bucketSeconds,
    naturalOnly: params.naturalOnly,
  });
  return byTrack.get(params.trackId) ?? [];
}

/** trackEstimateBuckets for several tracks, each over its own period, in one statement (Watch). */
export async function tracksEstimateBuckets(
  db: DbOrTx,
  params: { ranges: { trackId: number; from: Date; to: Date }[]; bucketSeconds: number; naturalOnly?: boolean },
): Promise<Map<number, BucketRow[]>> {
  const b = params.bucketSeconds;
  const spans = ROLLUP_SPANS_DESC.filter((s) => b % s === 0);
  const parts: SQL[] = [];
  const natural = sql`not ${modeEstimates.forced}`;
  const r = estimateRollups;
  for (const range of params.ranges) {
    const plan = planRollupCover(range.from.getTime(), range.to.getTime(), spans);
    const raw = rawEdgeCondition(plan);
    if (raw) {
      parts.push(sql`
        select ${modeEstimates.trackId} as track, floor(extract(epoch from ${modeEstimates.at}) / ${b}) * ${b} as bucket,
               count(*) as n, count(*) filter (where ${natural}) as nn,
               sum(${modeEstimates.frequencyHz}) as fs, sum(${modeEstimates.frequencyHz}) filter (where ${natural}) as nfs,
               min(${modeEstimates.dampingPercent}) filter (where ${natural}) as dmin, max(${modeEstimates.dampingPercent}) filter (where ${natural}) as dmax,
               sum(${modeEstimates.dampingPercent}) filter (where ${natural}) as ds,
               sum(${modeEstimates.dampingLo}) filter (where ${natural}) as los, count(${modeEstimates.dampingLo}) filter (where ${natural}) as lon,
               sum(${modeEstimates.dampingHi}) filter (where ${natural}) as his, count(${modeEstimates.dampingHi}) filter (where ${natural}) as hin
          from ${modeEstimates}
         where ${modeEstimates.trackId} = ${range.trackId} and ${raw}
         group by 1, 2`);
    }
    const roll = rollupCondition(plan);
    if (roll) {
      parts.push(sql`
        select ${r.trackId} as track, floor(extract(epoch from ${r.start}) / ${b}) * ${b} as bucket,
               sum(${r.count}) as n, sum(${r.naturalCount}) as nn, sum(${r.frequencySum}) as fs, sum(${r.naturalFrequencySum}) as nfs,
               min(${r.dampingMin}) as dmin, max(${r.dampingMax}) as dmax, sum(${r.dampingSum}) as ds,
               sum(${r.dampingLoSum}) as los, sum(${r.dampingLoCount}) as lon, sum(${r.dampingHiSum}) as his, sum(${r.dampingHiCount}) as hin
          from ${r}
         where ${r.trackId} = ${range.trackId} and ${roll}
         group by 1, 2`);
    }
  }
  const out = new Map<number, BucketRow[]>(params.ranges.map((x) => [x.trackId, []]));
  if (parts.length === 0) return out;
  const res = await db.execute<Record<string, number | null>>(sql`
    select track, bucket::float8 as bucket, sum(n)::float8 as n, sum(nn)::float8 as nn, sum(fs)::float8 as fs, sum(nfs)::float8 as nfs,
           min(dmin)::float8 as dmin, max(dmax)::float8 as dmax, sum(ds)::float8 as ds,
           sum(los)::float8 as los, sum(lon)::float8 as lon, sum(his)::float8 as his, sum(hin)::float8 as hin
      from (${sql.join(parts, sql` union all `)}) p
     group by track, bucket
     order by track, bucket`);
  const num = (v: unknown) => (v === null || v === undefined ? 0 : Number(v));
  for (const row of res.rows) {
    const n = num(row.n);
    const nn = num(row.nn);
    const count = params.naturalOnly ? nn : n;
    if (count === 0) continue; // only forced estimates, and those are left out
    const lon = num(row.lon);
    const hin = num(row.hin);
    out.get(Number(row.track))?.push({
      start: new Date(num(row.bucket) * 1000),
      count,
      dampingMin: nn > 0 ? Number(row.dmin) : null,
      dampingMean: nn > 0 ? num(row.ds) / nn : null,
      dampingMax: nn > 0 ? Number(row.dmax) : null,
      dampingLoMean: lon > 0 ? num(row.los) / lon : null,
      dampingHiMean: hin > 0 ? num(row.his) / hin : null,
      frequencyMean: params.naturalOnly ? num(row.nfs) / nn : num(row.fs) / n,
      forcedCount: params.naturalOnly ? 0 : n - nn,
    });
  }
  return out;
}

/**
 * The same buckets computed from the estimates alone (what trackEstimateBuckets did before the
 * rollups): kept as the reference the rollup path is measured and checked against.
 */
export async function trackEstimateBucketsFromEstimates(
  db: DbOrTx,
  params: { trackId: number; from: Date; to: Date; bucketSeconds: number; naturalOnly?: boolean },
): Promise<BucketRow[]> {
  const b = params.bucketSeconds;
  const bucket = sql<number>`floor(extract(epoch from ${modeEstimates.at}) / ${b}) * ${b}`;
  const natural = sql`not ${modeEstimates.forced}`;
  const rows = await db
    .select({
      bucket,
      count: sql<number>`count(*)::int`,
      dampingMin: sql<number | null>`min(${modeEstimates.dampingPercent}) filter (where ${natural})`,
      dampingMean: sql<number | null>`avg(${modeEstimates.dampingPercent}) filter (where ${natural})`,
      dampingMax: sql<number | null>`max(${modeEstimates.dampingPercent}) filter (where ${natural})`,
      dampingLoMean: sql<number | null>`avg(${modeEstimates.dampingLo}) filter (where ${natural})`,
      dampingHiMean: sql<number | null>`avg(${modeEstimates.dampingHi}) filter (where ${natural})`,
      frequencyMean: sql<number>`avg(${modeEstimates.frequencyHz})`,
      forcedCount: sql<number>`(count(*) filter (where ${modeEstimates.forced}))::int`,
    })
    .from(modeEstimates)
    .where(and(...rangeConds(params)))
    .groupBy(sql`1`)
    .orderBy(sql`1`);
  const num = (v: unknown) => (v === null || v === undefined ? null : Number(v));
  return rows.map((r) => ({
    start: new Date(Number(r.bucket) * 1000),
    count: r.count,
    dampingMin: num(r.dampingMin),
    dampingMean: num(r.dampingMean),
    dampingMax: num(r.dampingMax),
    dampingLoMean: num(r.dampingLoMean),
    dampingHiMean: num(r.dampingHiMean),
    frequencyMean: Number(r.frequencyMean),
    forcedCount: r.forcedCount,
  }));
}

/** Newest estimate time of a track (any kind), or null. */
export async function latestEstimateAt(db: DbOrTx, params: { trackId: number }): Promise<Date | null> {
  const [row] = await db
    .select({ at: modeEstimates.at })
    .from(modeEstimates)
    .where(eq(modeEstimates.trackId, params.trackId))
    .orderBy(desc(modeEstimates.at))
    .limit(1);
  return row?.at ?? null;
}

export interface LatestWithStep {
  estimate: EstimateRow;
  /** Step of the scan that produced it (seconds); null for a ring-down fit. */
  stepSeconds: number | null;
}

/**
 * The newest estimate of each track, with the step of its scan (Watch's staleness): one statement,
 * one backward probe of mode_estimates_track_at_id_idx per track (LATERAL … LIMIT 1), not a pass
 * over every estimate.
 */
export async function latestByTrack(db: DbOrTx, params: { trackIds: number[] }): Promise<Map<number, LatestWithStep>> {
  const out = new Map<number, LatestWithStep>();
  if (params.trackIds.length === 0) return out;
  const cols = Object.entries(getTableColumns(modeEstimates));
  const list = sql.join(
    cols.map(([key, col]) => sql`e.${sql.identifier(col.name)} as ${sql.identifier(key)}`),
    sql`, `,
  );
  const ids = sql.join(params.trackIds.map((id) => sql`${id}::int`), sql`, `);
  const res = await db.execute<Record<string, unknown>>(sql`
    select ${list}, a.settings as "_settings"
      from unnest(array[${ids}]) as t(id)
      cross join lateral (
        select * from ${modeEstimates} x where x.track_id = t.id order by x.at desc, x.id desc limit 1
      ) e
      left join ${scanWindows} w on w.id = e.window_id
      left join ${analyses} a on a.id = w.analysis_id`);
  for (const row of res.rows) {
    const estimate = Object.fromEntries(cols.map(([key, col]) => [key, row[key] === null || row[key] === undefined ? null : col.mapFromDriverValue(row[key])])) as EstimateRow;
    const settings = row._settings as { stepSeconds?: unknown } | null;
    const step = settings?.stepSeconds;
    out.set(estimate.trackId!, {
      estimate,
      stepSeconds: estimate.windowId === null ? null : typeof step === 'number' ? step : 60,
    });
  }
  return out;
}

export interface ShapeRow {
  channel: string;
  site: string;
  siteName: string;
  area: string;
  x: number;
  y: number;
  magnitude: number;
  angleDeg: number;
}

export async function shapeOf(db: DbOrTx, params: { estimateId: number }): Promise<ShapeRow[]> {
  return db
    .select({
      channel: channels.name,
      site: sites.code,
      siteName: sites.name,
      area: areas.code,
      x: sites.x,
      y: sites.y,
      magnitude: modeShapes.magnitude,
      angleDeg: modeShapes.angleDeg,
    })
    .from(modeShapes)
    .innerJoin(channels, eq(channels.id, modeShapes.channelId))
    .innerJoin(sites, eq(sites.id, channels.siteId))
    .innerJoin(areas, eq(areas.id, sites.areaId))
    .where(eq(modeShapes.estimateId, params.estimateId))
    .orderBy(desc(modeShapes.magnitude), asc(channels.name));
}

export interface EstimateDetail {
  estimate: EstimateRow;
  track: { code: string; name: string; poorBelow: number; lowBelow: number } | null;
  window: { id: number; analysisId: number; start: Date; end: Date } | null;
  fit: { id: number; analysisId: number; from: Date; to: Date } | null;
}

export async function estimateDetail(db: DbOrTx, params: { id: number }): Promise<EstimateDetail | undefined> {
  const [r] = await db
    .select({
      estimate: modeEstimates,
      trackCode: modeTracks.code,
      trackName: modeTracks.name,
      poorBelow: modeTracks.poorBelow,
      lowBelow: modeTracks.lowBelow,
      wId: scanWindows.id,
      wAnalysis: scanWindows.analysisId,
      wStart: scanWindows.startTime,
      wEnd: scanWindows.endTime,
      fId: fits.id,
      fAnalysis: fits.analysisId,
      fFrom: fits.fromTime,
      fTo: fits.toTime,
    })
    .from(modeEstimates)
    .leftJoin(modeTracks, eq(modeTracks.id, modeEstimates.trackId))
    .leftJoin(scanWindows, eq(scanWindows.id, modeEstimates.windowId))
    .leftJoin(fits, eq(fits.id, modeEstimates.fitId))
    .where(eq(modeEstimates.id, params.id));
  if (!r) return undefined;
  return {
    estimate: r.estimate,
    track: r.trackCode ? { code: r.trackCode, name: r.trackName!, poorBelow: r.poorBelow!, lowBelow: r.lowBelow! } : null,
    window: r.wId ? { id: r.wId, analysisId: r.wAnalysis!, start: r.wStart!, end: r.wEnd! } : null,
    fit: r.fId ? { id: r.fId, analysisId: r.fAnalysis!, from: r.fFrom!, to: r.fTo! } : null,
  };
}

/** Track id → (code, thresholds) for turning estimate rows into API shapes. */
export async function trackIndex(db: DbOrTx): Promise<Map<number, { code: string; name: string; poorBelow: number; lowBelow: number }>> {
  const rows = await db
    .select({ id: modeTracks.id, code: modeTracks.code, name: modeTracks.name, poorBelow: modeTracks.poorBelow, lowBelow: modeTracks.lowBelow })
    .from(modeTracks);
  return new Map(rows.map((r) => [r.id, r]));
}

/** The transfer study's loader lives with the studies (db/queries/studies.ts); this name stays for the query benchmark. */
export { studyWindows as studyRows } from './studies';
