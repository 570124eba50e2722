// Analyses (scans and fits: status, progress, failure reason) and the windows of ambient scans
// with their mode estimates and mode shapes.
//
// Idempotence of a scan: a window is stored in ONE transaction together with its estimates and
// shapes, and (analysis_id, start_time) is unique. A worker that is killed mid-scan leaves only
// whole windows behind; the restarted job skips the starts already stored and inserts the rest
// (ON CONFLICT DO NOTHING guards against two workers racing on the same window).
import { and, asc, desc, eq, inArray, sql, type SQL } from 'drizzle-orm';
import { alias } from 'drizzle-orm/pg-core';
import type { Db, DbOrTx } from '../client';
import { analyses, channels, corridors, modeEstimates, modeShapes, recordingChannels, recordings, scanWindows } from '../schema';

export type AnalysisRow = typeof analyses.$inferSelect;
export type AnalysisKind = AnalysisRow['kind'];
export type AnalysisStatus = AnalysisRow['status'];
export type ScanWindowRow = typeof scanWindows.$inferSelect;
export type EstimateRow = typeof modeEstimates.$inferSelect;

export async function createAnalysis(
  db: DbOrTx,
  params: { kind: AnalysisKind; recordingId: number; method?: string | null; settings: Record<string, unknown>; createdBy: number | null },
): Promise<AnalysisRow> {
  const [row] = await db
    .insert(analyses)
    .values({
      kind: params.kind,
      recordingId: params.recordingId,
      method: params.method ?? null,
      settings: params.settings,
      createdBy: params.createdBy,
    })
    .returning();
  return row;
}

export async function getAnalysis(db: DbOrTx, params: { id: number }): Promise<AnalysisRow | undefined> {
  const [row] = await db.select().from(analyses).where(eq(analyses.id, params.id));
  return row;
}

export async function listAnalyses(
  db: DbOrTx,
  params: { recordingId?: number; kind?: AnalysisKind; status?: AnalysisStatus; limit?: number } = {},
): Promise<AnalysisRow[]> {
  const conds: SQL[] = [];
  if (params.recordingId !== undefined) conds.push(eq(analyses.recordingId, params.recordingId));
  if (params.kind) conds.push(eq(analyses.kind, params.kind));
  if (params.status) conds.push(eq(analyses.status, params.status));
  return db
    .select()
    .from(analyses)
    .where(conds.length ? and(...conds) : undefined)
    .orderBy(desc(analyses.createdAt), desc(analyses.id))
    .limit(params.limit ?? 200);
}

export async function setAnalysisJob(db: DbOrTx, params: { id: number; jobId: string }): Promise<void> {
  await db.update(analyses).set({ jobId: params.jobId }).where(eq(analyses.id, params.id));
}

/** Running again after a restart keeps the first start time and clears an old error. */
export async function markAnalysisRunning(db: DbOrTx, params: { id: number; now?: Date }): Promise<AnalysisRow | undefined> {
  const [row] = await db
    .update(analyses)
    .set({ status: 'running', error: null, startedAt: sql`coalesce(${analyses.startedAt}, ${(params.now ?? new Date()).toISOString()}::timestamptz)` })
    .where(eq(analyses.id, params.id))
    .returning();
  return row;
}

/**
 * Marks a scan running unless it has ended (done or failed): a block of a split scan that starts
 * after another block failed for good must not bring the analysis back. Undefined when ended.
 */
export async function markScanRunning(db: DbOrTx, params: { id: number; now?: Date }): Promise<AnalysisRow | undefined> {
  const [row] = await db
    .update(analyses)
    .set({ status: 'running', startedAt: sql`coalesce(${analyses.startedAt}, ${(params.now ?? new Date()).toISOString()}::timestamptz)` })
    .where(and(eq(analyses.id, params.id), inArray(analyses.status, ['queued', 'running'])))
    .returning();
  return row;
}

/** Raises the progress (never lowers it: blocks of a split scan report counts taken at different times). */
export async function raiseAnalysisProgress(db: DbOrTx, params: { id: number; progress: number }): Promise<void> {
  const p = Math.min(1, Math.max(0, params.progress));
  await db
    .update(analyses)
    .set({ progress: sql`greatest(${analyses.progress}, ${p})` })
    .where(eq(analyses.id, params.id));
}

/**
 * Marks a running scan done; undefined when it was not running (already finished by another block
 * of the same scan, or failed) — so exactly one block finishes it and queues the alert evaluation.
 */
export async function finishRunningAnalysis(db: DbOrTx, params: { id: number; timings?: Record<string, number>; now?: Date }): Promise<AnalysisRow | undefined> {
  const [row] = await db
    .update(analyses)
    .set({ status: 'done', progress: 1, error: null, finishedAt: params.now ?? new Date(), timings: params.timings ?? null })
    .where(and(eq(analyses.id, params.id), eq(analyses.status, 'running')))
    .returning();
  return row;
}

/** Number of windows stored for an analysis. */
export async function storedWindowCount(db: DbOrTx, params: { analysisId: number }): Promise<number> {
  const [row] = await db.select({ n: sql<number>`count(*)::int` }).from(scanWindows).where(eq(scanWindows.analysisId, params.analysisId));
  return row.n;
}

export async function setAnalysisProgress(db: DbOrTx, params: { id: number; progress: number }): Promise<void> {
  const p = Math.min(1, Math.max(0, params.progress));
  await db.update(analyses).set({ progress: p }).where(eq(analyses.id, params.id));
}

export async function finishAnalysis(db: DbOrTx, params: { id: number; timings?: Record<string, number>; now?: Date }): Promise<AnalysisRow | undefined> {
  const [row] = await db
    .update(analyses)
    .set({ status: 'done', progress: 1, error: null, finishedAt: params.now ?? new Date(), timings: params.timings ?? null })
    .where(eq(analyses.id, params.id))
    .returning();
  return row;
}

export async function failAnalysis(db: DbOrTx, params: { id: number; error: string; now?: Date }): Promise<AnalysisRow | undefined> {
  const [row] = await db
    .update(analyses)
    .set({ status: 'failed', error: params.error.slice(0, 2000), finishedAt: params.now ?? new Date() })
    .where(eq(analyses.id, params.id))
    .returning();
  return row;
}

/** Window starts already stored for an analysis, epoch ms. */
export async function storedWindowStarts(db: DbOrTx, params: { analysisId: number }): Promise<Set<number>> {
  const rows = await db.select({ start: scanWindows.startTime }).from(scanWindows).where(eq(scanWindows.analysisId, params.analysisId));
  return new Set(rows.map((r) => r.start.getTime()));
}

export interface EstimateInput {
  trackId: number | null;
  at: Date;
  frequencyHz: number;
  dampingPercent: number;
  dampingLo: number | null;
  dampingHi: number | null;
  frequencyLo: number | null;
  frequencyHi: number | null;
  amplitude: number | null;
  fitQuality: number | null;
  method: string;
  forced: boolean;
  shape: { channelId: number; magnitude: number; angleDeg: number }[];
}

/**
 * Stores estimates of one scan window or one fit method, each with its mode shape. The caller's
 * transaction keeps an estimate and its shape together.
 */
export async function insertEstimates(
  tx: DbOrTx,
  params: { source: { windowId: number } | { fitId: number }; estimates: EstimateInput[] },
): Promise<void> {
  if (params.estimates.length === 0) return;
  const ids = await tx
    .insert(modeEstimates)
    .values(
      params.estimates.map((e) => ({
        ...params.source,
        trackId: e.trackId,
        at: e.at,
        frequencyHz: e.frequencyHz,
        dampingPercent: e.dampingPercent,
        dampingLo: e.dampingLo,
        dampingHi: e.dampingHi,
        frequencyLo: e.frequencyLo,
        frequencyHi: e.frequencyHi,
        amplitude: e.amplitude,
        fitQuality: e.fitQuality,
        method: e.method,
        forced: e.forced,
      })),
    )
    .returning({ id: modeEstimates.id });
  const shapes = params.estimates.flatMap((e, i) =>
    e.shape.map((s) => ({ estimateId: ids[i].id, channelId: s.channelId, magnitude: s.magnitude, angleDeg: s.angleDeg })),
  );
  if (shapes.length) await tx.insert(modeShapes).values(shapes);
}

export interface WindowInput {
  analysisId: number;
  start: Date;
  end: Date;
  quality: Record<string, unknown> | null;
  transferMw: Record<string, number> | null;
  angleDeg: Record<string, number> | null;
  estimates: EstimateInput[];
}

/** Stores one window with its estimates and shapes atomically; false when it was already stored. */
export async function storeScanWindow(db: Db, params: WindowInput): Promise<{ stored: boolean; windowId: number | null }> {
  return db.transaction(async (tx) => {
    const [w] = await tx
      .insert(scanWindows)
      .values({
        analysisId: params.analysisId,
        startTime: params.start,
        endTime: params.end,
        quality: params.quality,
        transferMw: params.transferMw,
        angleDeg: params.angleDeg,
      })
      .onConflictDoNothing({ target: [scanWindows.analysisId, scanWindows.startTime] })
      .returning({ id: scanWindows.id });
    if (!w) return { stored: false, windowId: null };
    await insertEstimates(tx, { source: { windowId: w.id }, estimates: params.estimates });
    return { stored: true, windowId: w.id };
  });
}

export interface ScanWindowWithEstimates extends ScanWindowRow {
  estimates: EstimateRow[];
}

/** Every window of a scan in time order with its estimates (by frequency). */
export async function scanResults(db: DbOrTx, params: { analysisId: number }): Promise<ScanWindowWithEstimates[]> {
  const windows = await db.select().from(scanWindows).where(eq(scanWindows.analysisId, params.analysisId)).orderBy(asc(scanWindows.startTime));
  if (windows.length === 0) return [];
  const ests = await db
    .select()
    .from(modeEstimates)
    .where(inArray(modeEstimates.windowId, windows.map((w) => w.id)))
    .orderBy(asc(modeEstimates.frequencyHz));
  const by = new Map<number, EstimateRow[]>();
  for (const e of ests) {
    const list = by.get(e.windowId!) ?? [];
    list.push(e);
    by.set(e.windowId!, list);
  }
  return windows.map((w) => ({ ...w, estimates: by.get(w.id) ?? [] }));
}

/** Window counts per analysis (for the analyses list). */
export async function windowCounts(db: DbOrTx, params: { analysisIds: number[] }): Promise<Map<number, number>> {
  if (params.analysisIds.length === 0) return new Map();
  const rows = await db
    .select({ id: scanWindows.analysisId, n: sql<number>`count(*)::int` })
    .from(scanWindows)
    .where(inArray(scanWindows.analysisId, params.analysisIds))
    .groupBy(scanWindows.analysisId);
  return new Map(rows.map((r) => [r.id, r.n]));
}

// ---------------------------------------------------------------- what a scan or fit reads

export type RecordingRow = typeof recordings.$inferSelect;

export async function getRecording(db: DbOrTx, params: { id: number }): Promise<RecordingRow | undefined> {
  const [row] = await db.select().from(recordings).where(eq(recordings.id, params.id));
  return row;
}

/** Network channels of a recording, in file column order. */
export async function recordingChannelList(db: DbOrTx, params: { recordingId: number }): Promise<{ id: number; name: string; kind: string; unit: string }[]> {
  return db
    .select({ id: channels.id, name: channels.name, kind: channels.kind, unit: channels.unit })
    .from(recordingChannels)
    .innerJoin(channels, eq(channels.id, recordingChannels.channelId))
    .where(eq(recordingChannels.recordingId, params.recordingId))
    .orderBy(asc(recordingChannels.columnIndex));
}

export interface CorridorChannels {
  id: number;
  code: string;
  name: string;
  flow: string | null;
  fromAngle: string | null;
  toAngle: string | null;
}

/** Corridors with the names of their flow and end-angle channels. */
export async function corridorChannelNames(db: DbOrTx): Promise<CorridorChannels[]> {
  const flow = alias(channels, 'flow');
  const fromA = alias(channels, 'from_angle');
  const toA = alias(channels, 'to_angle');
  return db
    .select({ id: corridors.id, code: corridors.code, name: corridors.name, flow: flow.name, fromAngle: fromA.name, toAngle: toA.name })
    .from(corridors)
    .leftJoin(flow, eq(flow.id, corridors.flowChannelId))
    .leftJoin(fromA, eq(fromA.id, corridors.fromAngleChannelId))
    .leftJoin(toA, eq(toA.id, corridors.toAngleChannelId))
    .orderBy(asc(corridors.id));
}

/** Channel ids by name (mode shapes are stored per channel id). */
export async function channelIdsByName(db: DbOrTx): Promise<Map<string, number>> {
  const rows = await db.select({ id: channels.id, name: channels.name }).from(channels);
  return new Map(rows.map((r) => [r.name, r.id]));
}
