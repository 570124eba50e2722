// Transfer studies: the windows of a study (a track's estimates with their corridor's transfer and
// angle over a period), and saved studies (the computed answer stored as JSON: the same answer as
// GET /api/studies/transfer, whose `points` is a bounded display sample, so a row stays small).
import { desc, eq, sql, type SQL } from 'drizzle-orm';
import type { DbOrTx } from '../client';
import { corridors, modeEstimates, modeTracks, people, scanWindows, transferStudies } from '../schema';

// ---------------------------------------------------------------- the windows of a study

export interface StudyWindowParams {
  trackId: number;
  corridorCode: string;
  /** The period: windows that start at or after `from` and end at or before `to`. */
  from: Date;
  to: Date;
}

/** One window of a study as read from the database (times in epoch milliseconds). */
export interface StudyWindowRow {
  analysisId: number;
  startMs: number;
  endMs: number;
  dampingPercent: number;
  dampingLo: number | null;
  dampingHi: number | null;
  forced: boolean;
  /** Mean corridor transfer of the window, MW; null when the window has none for the corridor. */
  transferMw: number | null;
  angleDeg: number | null;
}

/**
 * The track's estimates of the period, one per window start (where scans overlap, the newest
 * analysis wins; then the lowest estimate id), oldest first — only the columns a study reads, times
 * as epoch milliseconds (no Date per row), the analyses' settings not at all. `startFrom` /
 * `startBefore` narrow it to the windows starting in [startFrom, startBefore) (a page of the CSV).
 *
 * Plain SQL through db.execute: the driver's row objects are used as they come. (The query
 * builder maps every field of every row once more; at 130 000 windows, 90 days, that doubled the
 * loader's CPU time: ~600 against ~290 ms measured here.)
 */
async function windowRows(db: DbOrTx, p: StudyWindowParams & { startFrom?: Date; startBefore?: Date }): Promise<StudyWindowRow[]> {
  const code = p.corridorCode;
  const e = modeEstimates;
  const w = scanWindows;
  const conds: SQL[] = [
    sql`${e.trackId} = ${p.trackId}`,
    // a window estimate stands at its window's end, so these bounds only let the
    // (track_id, at) index narrow the scan to the period
    sql`${e.at} >= ${p.from}`,
    sql`${e.at} <= ${p.to}`,
    sql`${w.startTime} >= ${p.from}`,
    sql`${w.endTime} <= ${p.to}`,
  ];
  // a page: its window starts found through the start-time index (at > start, so at > startFrom too)
  if (p.startFrom) conds.push(sql`${w.startTime} >= ${p.startFrom}`, sql`${e.at} > ${p.startFrom}`);
  if (p.startBefore) conds.push(sql`${w.startTime} < ${p.startBefore}`);
  // epoch ms floored, as the driver's Date parsing truncates microseconds
  const r = await db.execute<StudyWindowRow & Record<string, unknown>>(sql`
    select distinct on (${w.startTime})
           ${w.analysisId} as "analysisId",
           floor(extract(epoch from ${w.startTime}) * 1000)::float8 as "startMs",
           floor(extract(epoch from ${w.endTime}) * 1000)::float8 as "endMs",
           ${e.dampingPercent} as "dampingPercent",
           ${e.dampingLo} as "dampingLo",
           ${e.dampingHi} as "dampingHi",
           ${e.forced} as "forced",
           (${w.transferMw} ->> ${code})::float8 as "transferMw",
           (${w.angleDeg} ->> ${code})::float8 as "angleDeg"
      from ${e} join ${w} on ${w.id} = ${e.windowId}
     where ${sql.join(conds, sql` and `)}
     order by ${w.startTime}, ${w.analysisId} desc, ${e.id}`);
  return r.rows;
}

/**
 * A study's windows as parallel typed columns (index i = one window, oldest first), the windows
 * without a transfer reading for the corridor left out. NaN stands for a missing value.
 */
export interface StudyWindows {
  length: number;
  analysisId: Int32Array;
  /** Window start and end, epoch milliseconds. */
  startMs: Float64Array;
  endMs: Float64Array;
  /** Window start, epoch seconds, and length, s (what the study's statistics read). */
  windowStart: Float64Array;
  windowSeconds: Float64Array;
  dampingPercent: Float64Array;
  dampingLo: Float64Array;
  dampingHi: Float64Array;
  /** 1: a forced-oscillation estimate. */
  forced: Uint8Array;
  transferMw: Float64Array;
  angleDeg: Float64Array;
}

export async function studyWindows(db: DbOrTx, params: StudyWindowParams): Promise<StudyWindows> {
  const rows = await windowRows(db, params);
  let n = 0;
  for (const r of rows) if (r.transferMw !== null) n++;
  const w: StudyWindows = {
    length: n,
    analysisId: new Int32Array(n),
    startMs: new Float64Array(n),
    endMs: new Float64Array(n),
    windowStart: new Float64Array(n),
    windowSeconds: new Float64Array(n),
    dampingPercent: new Float64Array(n),
    dampingLo: new Float64Array(n),
    dampingHi: new Float64Array(n),
    forced: new Uint8Array(n),
    transferMw: new Float64Array(n),
    angleDeg: new Float64Array(n),
  };
  let i = 0;
  for (const r of rows) {
    if (r.transferMw === null) continue;
    w.analysisId[i] = r.analysisId;
    w.startMs[i] = r.startMs;
    w.endMs[i] = r.endMs;
    w.windowStart[i] = r.startMs / 1000;
    w.windowSeconds[i] = (r.endMs - r.startMs) / 1000;
    w.dampingPercent[i] = r.dampingPercent;
    w.dampingLo[i] = r.dampingLo ?? NaN;
    w.dampingHi[i] = r.dampingHi ?? NaN;
    w.forced[i] = r.forced ? 1 : 0;
    w.transferMw[i] = r.transferMw;
    w.angleDeg[i] = r.angleDeg ?? NaN;
    i++;
  }
  return w;
}

/** Width of one page of studyWindowPages: the windows starting within one day. */
const PAGE_MS = 86_400_000;

/**
 * The same windows as studyWindows (transfer known), oldest first, a day of window starts at a
 * time — for the CSV export, so a long period never sits in memory whole. Each page is its own
 * bounded query (window starts in [t, t + 1 day), found through the start-time index), so the
 * work per page does not grow with the period.
 */
export async function* studyWindowPages(db: DbOrTx, params: StudyWindowParams): AsyncGenerator<StudyWindowRow[]> {
  for (let t = params.from.getTime(); t < params.to.getTime(); t += PAGE_MS) {
    const rows = await windowRows(db, { ...params, startFrom: new Date(t), startBefore: new Date(t + PAGE_MS) });
    const page = rows.filter((r) => r.transferMw !== null);
    if (page.length) yield page;
  }
}

// ---------------------------------------------------------------- saved studies

export type StudyRow = typeof transferStudies.$inferSelect;

/** A saved study without its stored answer (what the list shows). */
export interface SavedStudyListRow {
  id: number;
  name: string;
  periodFrom: Date;
  periodTo: Date;
  createdAt: Date;
  createdBy: number | null;
  trackCode: string;
  corridorCode: string | null;
  createdByName: string | null;
  /** Projected MW at the poor and low thresholds, read out of the stored answer by the database. */
  poorAtMw: number | null;
  lowAtMw: number | null;
}

export interface StudyWithNames extends SavedStudyListRow {
  result: Record<string, unknown>;
}

export async function insertStudy(
  db: DbOrTx,
  params: { name: string; trackId: number; corridorId: number | null; from: Date; to: Date; result: Record<string, unknown>; createdBy: number | null },
): Promise<StudyRow> {
  const [row] = await db
    .insert(transferStudies)
    .values({
      name: params.name,
      trackId: params.trackId,
      corridorId: params.corridorId,
      periodFrom: params.from,
      periodTo: params.to,
      result: params.result,
      createdBy: params.createdBy,
    })
    .returning();
  return row;
}

/** The x of the stored answer's projection at one threshold (null when absent or not a number). */
function projectionMw(threshold: 'low' | 'poor') {
  return sql<number | null>`(select case when jsonb_typeof(p -> 'x') = 'number' then (p ->> 'x')::float8 end
      from jsonb_array_elements(case when jsonb_typeof(${transferStudies.result} #> '{damping,projections}') = 'array'
                                     then ${transferStudies.result} #> '{damping,projections}' else '[]'::jsonb end) p
     where p ->> 'threshold' = ${threshold} limit 1)`;
}

const listColumns = {
  id: transferStudies.id,
  name: transferStudies.name,
  periodFrom: transferStudies.periodFrom,
  periodTo: transferStudies.periodTo,
  createdAt: transferStudies.createdAt,
  createdBy: transferStudies.createdBy,
  trackCode: modeTracks.code,
  corridorCode: corridors.code,
  createdByName: people.displayName,
  poorAtMw: projectionMw('poor'),
  lowAtMw: projectionMw('low'),
};

/** Saved studies, newest first — without their stored answers (an older one may hold every window). */
export async function listStudies(db: DbOrTx, params: { limit?: number } = {}): Promise<SavedStudyListRow[]> {
  return db
    .select(listColumns)
    .from(transferStudies)
    .innerJoin(modeTracks, eq(modeTracks.id, transferStudies.trackId))
    .leftJoin(corridors, eq(corridors.id, transferStudies.corridorId))
    .leftJoin(people, eq(people.id, transferStudies.createdBy))
    .orderBy(desc(transferStudies.createdAt), desc(transferStudies.id))
    .limit(params.limit ?? 200);
}

export async function getStudy(db: DbOrTx, params: { id: number }): Promise<StudyWithNames | undefined> {
  const [row] = await db
    .select({ ...listColumns, result: transferStudies.result })
    .from(transferStudies)
    .innerJoin(modeTracks, eq(modeTracks.id, transferStudies.trackId))
    .leftJoin(corridors, eq(corridors.id, transferStudies.corridorId))
    .leftJoin(people, eq(people.id, transferStudies.createdBy))
    .where(eq(transferStudies.id, params.id));
  return row;
}
