// Mode estimates of tracks over time: raw ranges, time buckets for long spans, one estimate with
// its shape and source, and the newest estimate of each track with its scan step.
import { and, asc, desc, eq, gte, inArray, isNotNull, lte, sql, type SQL } from 'drizzle-orm';
import type { DbOrTx } from '../client';
import { analyses, areas, channels, fits, modeEstimates, modeShapes, modeTracks, scanWindows, sites } from '../schema';

export type EstimateRow = typeof modeEstimates.$inferSelect;

function rangeConds(p: { trackId: number; from: Date; to: Date; naturalOnly?: boolean }): SQL[] {
  const c: SQL[] = [eq(modeEstimates.trackId, p.trackId), gte(modeEstimates.at, p.from), lte(modeEstimates.at, p.to)];
  if (p.naturalOnly) c.push(eq(modeEstimates.forced, false));
  return c;
}

export async function countTrackEstimates(db: DbOrTx, params: { trackId: number; from: Date; to: Date; naturalOnly?: boolean }): Promise<number> {
  const [row] = await db
    .select({ n: sql<number>`count(*)::int` })
    .from(modeEstimates)
    .where(and(...rangeConds(params)));
  return row.n;
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

/** Time buckets of `bucketSeconds` (aligned to the epoch); damping statistics over natural estimates. */
export async function trackEstimateBuckets(
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

/** The newest estimate of each track, with the step of its scan (Watch's staleness). */
export async function latestByTrack(db: DbOrTx, params: { trackIds: number[] }): Promise<Map<number, LatestWithStep>> {
  if (params.trackIds.length === 0) return new Map();
  const rows = await db
    .selectDistinctOn([modeEstimates.trackId], { estimate: modeEstimates, settings: analyses.settings })
    .from(modeEstimates)
    .leftJoin(scanWindows, eq(scanWindows.id, modeEstimates.windowId))
    .leftJoin(analyses, eq(analyses.id, scanWindows.analysisId))
    .where(and(inArray(modeEstimates.trackId, params.trackIds), isNotNull(modeEstimates.trackId)))
    .orderBy(modeEstimates.trackId, desc(modeEstimates.at), desc(modeEstimates.id));
  const out = new Map<number, LatestWithStep>();
  for (const r of rows) {
    const step = (r.settings as { stepSeconds?: unknown } | null)?.stepSeconds;
    out.set(r.estimate.trackId!, {
      estimate: r.estimate,
      stepSeconds: r.estimate.windowId === null ? null : typeof step === 'number' ? step : 60,
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

/** The natural-mode estimates of a track with the corridor transfer and angle of their windows. */
export async function studyRows(
  db: DbOrTx,
  params: { trackId: number; corridorCode: string; from: Date; to: Date },
): Promise<
  {
    analysisId: number;
    start: Date;
    end: Date;
    settings: Record<string, unknown>;
    dampingPercent: number;
    dampingLo: number | null;
    dampingHi: number | null;
    forced: boolean;
    transferMw: number | null;
    angleDeg: number | null;
  }[]
> {
  const code = params.corridorCode;
  const rows = await db
    .select({
      analysisId: scanWindows.analysisId,
      start: scanWindows.startTime,
      end: scanWindows.endTime,
      settings: analyses.settings,
      dampingPercent: modeEstimates.dampingPercent,
      dampingLo: modeEstimates.dampingLo,
      dampingHi: modeEstimates.dampingHi,
      forced: modeEstimates.forced,
      transferMw: sql<number | null>`(${scanWindows.transferMw} ->> ${code})::float8`,
      angleDeg: sql<number | null>`(${scanWindows.angleDeg} ->> ${code})::float8`,
    })
    .from(modeEstimates)
    .innerJoin(scanWindows, eq(scanWindows.id, modeEstimates.windowId))
    .innerJoin(analyses, eq(analyses.id, scanWindows.analysisId))
    .where(
      and(
        eq(modeEstimates.trackId, params.trackId),
        gte(scanWindows.startTime, params.from),
        lte(scanWindows.endTime, params.to),
      ),
    )
    .orderBy(asc(scanWindows.startTime), asc(scanWindows.analysisId));
  return rows.map((r) => ({
    ...r,
    transferMw: r.transferMw === null ? null : Number(r.transferMw),
    angleDeg: r.angleDeg === null ? null : Number(r.angleDeg),
  }));
}
