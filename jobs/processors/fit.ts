// The ring-down fit job: one interval of a recording fitted with BOTH Prony and the matrix pencil
// (modal/ringdown.ts), each stored with its modes (as mode estimates with shapes) and its
// reconstruction thinned for the ring-down view. Sandboxed (./fit-sandbox.ts): CPU-heavy.
// Idempotent: a retried job replaces the analysis's fits in one transaction.
import { UnrecoverableError } from 'bullmq';
import { listTracks, type TrackRow } from '../../db/queries/alerts';
import { replaceFits, type FitMethodInput, type StoredReconstruction } from '../../db/queries/fits';
import { readRecordingSamples } from '../../db/queries/recordings';
import { channelIdsByName, finishAnalysis, getAnalysis, getRecording, markAnalysisRunning, setAnalysisProgress, type AnalysisRow } from '../../db/queries/scans';
import { ModalInputError } from '../../modal/errors';
import { fitRingdown } from '../../modal/ringdown';
import type { RingdownMethod, RingdownResult } from '../../modal/types';
import { fitJobSchema } from './analysis-queues';
import { isLastAttempt, type AnalysisContext, type JobLike } from './analysis-context';
import { failAnalysisWith, publishProgress } from './analysis-progress';

export const FIT_METHODS: RingdownMethod[] = ['prony', 'matrix-pencil'];

/** Series longer than this are thinned (every k-th sample) for the ring-down view. */
export const MAX_VIEW_POINTS = 1500;

/** What a fit analysis stores in `analyses.settings` (written by POST /api/recordings/:id/fits). */
export interface FitSettings {
  from: string;
  to: string;
  channels?: string[];
  order: number | 'auto';
  bandHz?: [number, number];
}

const round = (v: number) => (Number.isFinite(v) ? Number(v.toPrecision(7)) : 0);

function thin(x: Float64Array, k: number): number[] {
  const out: number[] = [];
  for (let i = 0; i < x.length; i += k) out.push(round(x[i]));
  return out;
}

function wrap180(deg: number): number {
  let a = deg % 360;
  if (a <= -180) a += 360;
  else if (a > 180) a -= 360;
  return a;
}

/** Track of a ring-down mode: the track whose band holds its frequency (the stronger mode wins a band). */
function tracksOfModes(r: RingdownResult, tracks: TrackRow[]): (number | null)[] {
  const out: (number | null)[] = r.modes.map(() => null);
  for (const t of tracks) {
    let best = -1;
    r.modes.forEach((m, i) => {
      if (m.frequencyHz >= t.minHz && m.frequencyHz <= t.maxHz && out[i] === null && (best < 0 || m.energyShare > r.modes[best].energyShare)) best = i;
    });
    if (best >= 0) out[best] = t.id;
  }
  return out;
}

export function methodInput(r: RingdownResult, recordStart: number, tracks: TrackRow[], channelIds: Map<string, number>, at: Date): FitMethodInput {
  const full = r.reconstruction[0]?.input.length ?? 0;
  const k = Math.max(1, Math.ceil(full / MAX_VIEW_POINTS));
  const recordRate = r.recordRate ?? r.rate;
  const start = recordStart + (r.startIndex ?? 0) / recordRate;
  const reconstruction: StoredReconstruction = {
    startTime: new Date(Math.round(start * 1000)).toISOString(),
    stepSeconds: k / recordRate,
    points: Math.ceil(full / k),
    fullPoints: full,
    analysisRate: r.rate,
    series: r.reconstruction.map((s) => ({
      channel: s.channel,
      input: thin(s.input, k),
      total: thin(s.total, k),
      residual: thin(s.residual, k),
      perMode: s.perMode.map((p) => thin(p, k)),
    })),
    residues: r.modes.map((m) => m.channels.map((c) => ({ channel: c.channel, amplitude: round(c.amplitude), phaseDeg: round(c.phaseDeg) }))),
    energyShares: r.modes.map((m) => m.energyShare),
  };
  const trackIds = tracksOfModes(r, tracks);
  return {
    method: r.method,
    order: r.order,
    snrDb: Number.isFinite(r.snrDb) ? r.snrDb : null,
    reconstruction,
    estimates: r.modes.map((m, i) => {
      // shape: amplitude relative to the largest channel, phase relative to that channel
      let top = m.channels[0];
      for (const c of m.channels) if (c.amplitude > top.amplitude) top = c;
      return {
        trackId: trackIds[i],
        at,
        frequencyHz: m.frequencyHz,
        dampingPercent: m.dampingPercent,
        dampingLo: null,
        dampingHi: null,
        frequencyLo: null,
        frequencyHi: null,
        amplitude: top ? top.amplitude : null,
        fitQuality: m.energyShare,
        method: r.method,
        forced: false,
        shape: top && top.amplitude > 0
          ? m.channels
              .filter((c) => channelIds.has(c.channel))
              .map((c) => ({ channelId: channelIds.get(c.channel)!, magnitude: c.amplitude / top.amplitude, angleDeg: wrap180(c.phaseDeg - top.phaseDeg) }))
          : [],
      };
    }),
  };
}

function refuse(message: string): never {
  throw new UnrecoverableError(message);
}

export async function runFit(ctx: AnalysisContext, job: JobLike): Promise<{ analysisId: number; fitIds: number[] }> {
  const parsed = fitJobSchema.safeParse(job.data);
  if (!parsed.success) refuse(`Bad fit job payload: ${parsed.error.issues.map((i) => i.message).join('; ')}`);
  const analysis = await getAnalysis(ctx.db, { id: parsed.data.analysisId });
  if (!analysis) refuse(`Analysis ${parsed.data.analysisId} does not exist (deleted?)`);
  if (analysis.kind !== 'fit') refuse(`Analysis ${analysis.id} is a ${analysis.kind}, not a fit`);
  try {
    return await fit(ctx, job, analysis);
  } catch (err) {
    // refusals of the input (estimator options, channels or interval not in the recording) are final
    const bad = err instanceof UnrecoverableError || err instanceof ModalInputError || (err as { code?: unknown }).code === 'RECORDING_SAMPLES';
    const message = (err as Error).message;
    if (bad || isLastAttempt(job)) await failAnalysisWith(ctx, analysis, bad ? message : `Failed after ${job.attemptsMade + 1} attempts: ${message}`);
    if (bad && !(err instanceof UnrecoverableError)) throw new UnrecoverableError(message);
    throw err;
  }
}

async function fit(ctx: AnalysisContext, job: JobLike, analysis: AnalysisRow): Promise<{ analysisId: number; fitIds: number[] }> {
  const t0 = Date.now();
  const s = analysis.settings as unknown as FitSettings;
  const from = new Date(s.from);
  const to = new Date(s.to);
  if (!(from < to)) refuse(`Fit ${analysis.id}: the interval ${s.from} – ${s.to} is empty`);
  const recording = await getRecording(ctx.db, { id: analysis.recordingId });
  if (!recording) refuse(`Recording ${analysis.recordingId} does not exist`);
  if (recording.status === 'failed') refuse(`Recording ${recording.id} failed to ingest: ${recording.error ?? 'no reason stored'}`);
  if (recording.status !== 'ready') throw new Error(`Recording ${recording.id} is not ready yet (status ${recording.status})`);
  const running = await markAnalysisRunning(ctx.db, { id: analysis.id });
  if (running) await publishProgress(ctx, running);
  const record = await readRecordingSamples(ctx.db, { recordingId: recording.id, channels: s.channels, from: from.getTime() / 1000, to: to.getTime() / 1000 });
  if (!record) refuse(`Recording ${recording.id} does not exist`);
  if (!record.channels.length || record.channels[0].values.length === 0) {
    refuse(`Recording ${recording.id} has no samples between ${s.from} and ${s.to}`);
  }
  const tracks = await listTracks(ctx.db);
  const channelIds = await channelIdsByName(ctx.db);
  const methods: FitMethodInput[] = [];
  for (const [i, method] of FIT_METHODS.entries()) {
    const r = fitRingdown(record, { method, order: s.order, ...(s.bandHz ? { bandHz: s.bandHz } : {}) });
    methods.push(methodInput(r, record.startTime, tracks, channelIds, from));
    await setAnalysisProgress(ctx.db, { id: analysis.id, progress: (i + 1) / (FIT_METHODS.length + 1) });
    await job.updateProgress((i + 1) / (FIT_METHODS.length + 1)).catch(() => undefined);
    await publishProgress(ctx, { ...analysis, status: 'running', progress: (i + 1) / (FIT_METHODS.length + 1), error: null });
  }
  const fitIds = await replaceFits(ctx.db, { analysisId: analysis.id, from, to, methods });
  const done = await finishAnalysis(ctx.db, { id: analysis.id, timings: { totalMs: Date.now() - t0 } });
  if (done) await publishProgress(ctx, done);
  return { analysisId: analysis.id, fitIds };
}
