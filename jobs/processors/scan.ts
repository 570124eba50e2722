// The ambient scan job: sliding windows over a stored recording → windows, mode estimates with
// confidence intervals, mode shapes, forced flags, the corridors' mean transfer and angle, and the
// track of each estimate. Runs in a sandboxed processor (./scan-sandbox.ts): the estimator is
// CPU-heavy and must not hold up the worker's event loop (lock renewal, other queues).
//
// Samples are read from PostgreSQL in 10-minute chunks and streamed through the estimator's
// scanner (createAmbientScanner), so memory stays at about one window whatever the length.
//
// Idempotent per window: each window is stored in one transaction with its estimates, keyed
// (analysis, window start). A restarted job (worker killed, transient fault) resumes the stream at
// the first window not yet stored; windows already stored are never written twice, none is
// skipped. Window starts are on the grid recording start + k·step.
//
// Shared between workers: a scan longer than one block (KEEL_SCAN_BLOCK_SECONDS of window starts,
// default an hour) is split by its job into one job per block of window indices, which any worker
// takes. A block is scanned like a resumed scan (from its first unstored window, with a short lead
// to settle the filters); the block that finds every window of the scan stored finishes the
// analysis and queues the alert evaluation — exactly one does. The track assignment starts afresh
// at each block, as it does after a restart.
import { UnrecoverableError } from 'bullmq';
import { readRecordingSamples } from '../../db/queries/recordings';
import { listTracks } from '../../db/queries/alerts';
import {
  channelIdsByName,
  corridorChannelNames,
  finishRunningAnalysis,
  getAnalysis,
  getRecording,
  markScanRunning,
  raiseAnalysisProgress,
  recordingChannelList,
  storedWindowCount,
  storedWindowStarts,
  storeScanWindow,
  type AnalysisRow,
  type EstimateInput,
} from '../../db/queries/scans';
import { checkAmbientOptions, createAmbientScanner, type AmbientOptionsInput, type ResolvedAmbientOptions } from '../../modal/ambient';
import { ModalInputError } from '../../modal/errors';
import { assignTracks, type ModeTrackSpec } from '../../modal/tracking';
import type { AmbientMode, AmbientWindowResult } from '../../modal/types';
import { enqueueEvaluateAlerts, enqueueScanBlocks, scanJobSchema } from './analysis-queues';
import { isLastAttempt, type AnalysisContext, type JobLike } from './analysis-context';
import { failAnalysisWith, publishProgress } from './analysis-progress';

/** Samples read per database round trip, seconds of recording. */
const CHUNK_SECONDS = 600;
/** A stream that starts mid-recording begins this long before its first window to store, s. */
const LEAD_SECONDS = 240;
/** Progress is written at most this often (and at the end). */
const PROGRESS_EVERY_MS = 1000;

export interface ScanOutcome {
  analysisId: number;
  windows: number;
  storedNow: number;
  skippedExisting: number;
  /** Blocks queued (a whole scan that was split), else 0. */
  blocks: number;
}

/** Windows of a record of `rawSamples` samples (the estimator's own count). */
export function windowCount(o: ResolvedAmbientOptions, rawSamples: number): number {
  const na = Math.ceil(rawSamples / o.factor);
  if (na < o.windowSamples) return 0;
  return Math.floor((na - o.windowSamples) / o.stepSamples) + 1;
}

/** Per-second sums of a corridor quantity over the recording (NaN samples left out). */
class SecondSums {
  readonly sum: Float64Array;
  readonly count: Uint32Array;
  constructor(seconds: number) {
    this.sum = new Float64Array(seconds + 1);
    this.count = new Uint32Array(seconds + 1);
  }
  add(second: number, v: number): void {
    if (!Number.isFinite(v) || second < 0 || second >= this.sum.length) return;
    this.sum[second] += v;
    this.count[second]++;
  }
  /** Mean over [fromSecond, toSecond) or null when nothing was valid. */
  mean(fromSecond: number, toSecond: number): number | null {
    let s = 0;
    let n = 0;
    for (let i = Math.max(0, fromSecond); i < Math.min(toSecond, this.sum.length); i++) {
      s += this.sum[i];
      n += this.count[i];
    }
    return n > 0 ? s / n : null;
  }
}

function wrap180(deg: number): number {
  let a = deg % 360;
  if (a <= -180) a += 360;
  else if (a > 180) a -= 360;
  return a;
}

function refuse(message: string): never {
  throw new UnrecoverableError(message);
}

export async function runScan(ctx: AnalysisContext, job: JobLike): Promise<ScanOutcome> {
  const parsed = scanJobSchema.safeParse(job.data);
  if (!parsed.success) refuse(`Bad scan job payload: ${parsed.error.issues.map((i) => i.message).join('; ')}`);
  const analysisId = parsed.data.analysisId;
  const analysis = await getAnalysis(ctx.db, { id: analysisId });
  if (!analysis) refuse(`Analysis ${analysisId} does not exist (deleted?)`);
  if (analysis.kind !== 'scan') refuse(`Analysis ${analysisId} is a ${analysis.kind}, not a scan`);
  try {
    return await scan(ctx, job, analysis, parsed.data.block ?? null);
  } catch (err) {
    // refusals of the input (estimator options, channels or interval not in the recording) are final
    const bad = err instanceof UnrecoverableError || err instanceof ModalInputError || (err as { code?: unknown }).code === 'RECORDING_SAMPLES';
    const message = (err as Error).message;
    if (bad || isLastAttempt(job)) {
      await failAnalysisWith(ctx, analysis, bad ? message : `Failed after ${job.attemptsMade + 1} attempts: ${message}`);
    }
    if (bad && !(err instanceof UnrecoverableError)) throw new UnrecoverableError(message);
    throw err;
  }
}

/**
 * Seconds of window starts per block when a scan is shared between workers (default 3600: an hour
 * of windows, 60 at the default 1-minute step). KEEL_SCAN_BLOCK_SECONDS=0 never splits.
 */
export function scanBlockSeconds(env: Record<string, string | undefined> = process.env): number {
  const raw = env.KEEL_SCAN_BLOCK_SECONDS;
  if (raw === undefined || raw === '') return 3600;
  const v = Number(raw);
  if (!Number.isFinite(v) || v < 0) throw new Error(`KEEL_SCAN_BLOCK_SECONDS must be a number of seconds ≥ 0 (got "${raw}")`);
  return v;
}

/** Window-index blocks [from, to) of `total` windows, `perBlock` each (the last may be shorter). */
export function scanBlocks(total: number, perBlock: number): { from: number; to: number }[] {
  if (total <= 0) return [];
  const n = Math.max(1, Math.floor(perBlock));
  const out: { from: number; to: number }[] = [];
  for (let from = 0; from < total; from += n) out.push({ from, to: Math.min(total, from + n) });
  return out;
}

/**
 * The whole scan (block null) or one block of it. A whole scan longer than one block is split: this
 * job queues one job per block (any worker takes them; each block resumes at its first unstored
 * window, like a restarted scan) and ends. Whichever block finds every window stored finishes the
 * analysis — exactly one does (finishRunningAnalysis) — and queues the alert evaluation.
 */
async function scan(ctx: AnalysisContext, job: JobLike, analysis: AnalysisRow, block: { from: number; to: number } | null): Promise<ScanOutcome> {
  const t0 = Date.now();
  const { db } = ctx;
  const recording = await getRecording(db, { id: analysis.recordingId });
  if (!recording) refuse(`Recording ${analysis.recordingId} does not exist`);
  if (recording.status === 'failed') refuse(`Recording ${recording.id} (${recording.fileName}) failed to ingest: ${recording.error ?? 'no reason stored'}`);
  if (recording.status !== 'ready' || !recording.startTime || !recording.rate || !recording.sampleCount) {
    // still ingesting: a transient state, retried with backoff
    throw new Error(`Recording ${recording.id} is not ready yet (status ${recording.status})`);
  }
  const rate = recording.rate;
  const recStartMs = recording.startTime.getTime();
  // exact epoch seconds of frame 0 (the timestamptz column holds milliseconds only)
  const q = recording.quality as { startEpoch?: unknown } | null;
  const recStartExact = typeof q?.startEpoch === 'number' ? q.startEpoch : recStartMs / 1000;
  const totalSamples = recording.sampleCount;
  const channelRows = await recordingChannelList(db, { recordingId: recording.id });
  const channelNames = channelRows.map((c) => c.name);
  const o = checkAmbientOptions(analysis.settings as AmbientOptionsInput, {
    rate,
    channelNames,
    durationSeconds: totalSamples / rate,
  });
  // the scanner is fed exactly the analysed channels plus the angle reference they are taken against
  const fed = [...o.channels];
  if (o.angleReference !== null && o.channels.some((c) => o.angleChannels.includes(c))) fed.push(o.angleReference);

  const tracks = await listTracks(db);
  const tracker = new ScanTracker(tracks);
  const trackIdOf = new Map(tracks.map((t) => [t.code, t.id]));
  const channelIds = await channelIdsByName(db);
  const corridors = (await corridorChannelNames(db)).map((c) => ({
    ...c,
    flow: c.flow && channelNames.includes(c.flow) ? c.flow : null,
    angles: c.fromAngle && c.toAngle && channelNames.includes(c.fromAngle) && channelNames.includes(c.toAngle) ? ([c.fromAngle, c.toAngle] as const) : null,
  }));
  const readNames = [...new Set([...fed, ...corridors.flatMap((c) => [...(c.flow ? [c.flow] : []), ...(c.angles ?? [])])])];

  const total = windowCount(o, totalSamples);
  if (total === 0) refuse(`Recording ${recording.id} is shorter than one window of ${o.windowSeconds} s`);
  const stepRaw = o.stepSamples * o.factor;
  const stepMs = (stepRaw / rate) * 1000;
  const startMsOf = (k: number) => recStartMs + Math.round(k * stepMs);

  // a whole scan longer than one block: queue its blocks and leave the work to them
  const blockSeconds = scanBlockSeconds();
  const blocks = block === null && blockSeconds > 0 ? scanBlocks(total, blockSeconds / o.stepSeconds) : [];
  if (blocks.length > 1) {
    const running = await markScanRunning(db, { id: analysis.id });
    if (!running) return { analysisId: analysis.id, windows: total, storedNow: 0, skippedExisting: 0, blocks: 0 };
    const stored = await storedWindowCount(db, { analysisId: analysis.id });
    await raiseAnalysisProgress(db, { id: analysis.id, progress: stored / total });
    await publishProgress(ctx, { ...running, progress: Math.max(running.progress, stored / total) });
    await enqueueScanBlocks(ctx.queues, analysis.id, blocks);
    ctx.log.info(`scan ${analysis.id}: ${total} windows in ${blocks.length} blocks of up to ${blocks[0].to} windows`);
    return { analysisId: analysis.id, windows: total, storedNow: 0, skippedExisting: 0, blocks: blocks.length };
  }
  const range = block ?? { from: 0, to: total };
  if (range.to > total) refuse(`Scan ${analysis.id}: block ${range.from}–${range.to} lies past the scan's ${total} windows`);

  const running = await markScanRunning(db, { id: analysis.id });
  if (!running) {
    // ended meanwhile: another block finished it, or one failed for good (its reason is kept)
    return { analysisId: analysis.id, windows: total, storedNow: 0, skippedExisting: 0, blocks: 0 };
  }
  const stored = await storedWindowStarts(db, { analysisId: analysis.id });
  let first = range.from;
  while (first < range.to && stored.has(startMsOf(first))) first++;
  const inRange = () => {
    let n = 0;
    for (let k = range.from; k < range.to; k++) if (stored.has(startMsOf(k))) n++;
    return n;
  };

  let lastProgressAt = 0;
  const progress = async (force = false) => {
    if (!force && Date.now() - lastProgressAt < PROGRESS_EVERY_MS) return;
    lastProgressAt = Date.now();
    // the whole scan's share, whichever worker stored the windows
    const all = block === null ? stored.size : await storedWindowCount(db, { analysisId: analysis.id });
    const p = Math.min(1, all / total);
    await raiseAnalysisProgress(db, { id: analysis.id, progress: p });
    await job.updateProgress(p).catch(() => undefined);
    await publishProgress(ctx, { ...analysis, status: 'running', progress: p, error: null });
  };
  await progress(true);

  let storedNow = 0;
  let skippedExisting = 0;
  if (first < range.to) {
    // Start the stream a few windows early when resuming mid-recording (a block, a restart): the
    // estimator's filters and the track assignment need a few minutes of data to settle, and a
    // window right at a stream start comes out up to a few tenths of a %-point off the one a
    // continuous scan gives. The lead windows are computed and dropped, never stored.
    const lead = Math.min(first, Math.ceil(LEAD_SECONDS / o.stepSeconds));
    const streamFirst = first - lead;
    const streamStartRaw = streamFirst * stepRaw;
    const seconds = Math.ceil(totalSamples / rate);
    const flowSums = new Map(corridors.filter((c) => c.flow).map((c) => [c.code, new SecondSums(seconds)]));
    const angleSums = new Map(corridors.filter((c) => c.angles).map((c) => [c.code, new SecondSums(seconds)]));
    const pending: { w: AmbientWindowResult; k: number }[] = [];
    let emitted = 0;
    const scanner = createAmbientScanner(
      { rate, startTime: recStartExact + streamStartRaw / rate, channelNames: fed },
      { ...(analysis.settings as AmbientOptionsInput), channels: o.channels },
      (w) => pending.push({ w, k: streamFirst + emitted++ }),
    );

    const flush = async () => {
      for (const { w, k } of pending.splice(0)) {
        if (k < first) {
          // a lead window: only the track assignment learns from it
          windowEstimates(w, o, tracker, trackIdOf, channelIds, new Date(startMsOf(k) + o.windowSeconds * 1000));
          continue;
        }
        if (k >= range.to) continue; // past this block: another block's window
        const startMs = startMsOf(k);
        if (stored.has(startMs)) {
          skippedExisting++;
          continue;
        }
        const endMs = startMs + o.windowSeconds * 1000;
        const fromSec = Math.floor((startMs - recStartMs) / 1000);
        const toSec = Math.ceil((endMs - recStartMs) / 1000);
        const transferMw: Record<string, number> = {};
        const angleDeg: Record<string, number> = {};
        for (const [code, s] of flowSums) {
          const m = s.mean(fromSec, toSec);
          if (m !== null) transferMw[code] = m;
        }
        for (const [code, s] of angleSums) {
          const m = s.mean(fromSec, toSec);
          if (m !== null) angleDeg[code] = m;
        }
        const estimates = windowEstimates(w, o, tracker, trackIdOf, channelIds, new Date(endMs));
        const res = await storeScanWindow(db, {
          analysisId: analysis.id,
          start: new Date(startMs),
          end: new Date(endMs),
          quality: { skipped: w.skipped, reason: w.reason ?? null, channels: w.quality },
          transferMw,
          angleDeg,
          estimates,
        });
        if (res.stored) storedNow++;
        else skippedExisting++;
        stored.add(startMs);
        await progress();
      }
    };

    const chunkRaw = Math.round(CHUNK_SECONDS * rate);
    let next = streamStartRaw; // next raw sample index to feed
    // A block before the last stops reading once its last window came out (the scanner needs a
    // little past the window's end for its filters, so whole chunks are fed rather than exactly up
    // to the end). The block that reaches the recording's end reads to the end and finishes the
    // scanner, which checks the stream as a whole (no valid sample, a constant channel).
    const toEnd = range.to === total;
    while (next < totalSamples && (toEnd || streamFirst + emitted < range.to)) {
      const endIdx = Math.min(totalSamples, next + chunkRaw);
      // [from, to] both inclusive, in epoch seconds on the recording's exact grid
      const rec = await readRecordingSamples(db, {
        recordingId: recording.id,
        channels: readNames,
        from: recStartExact + next / rate,
        to: recStartExact + (endIdx - 1) / rate,
      });
      if (!rec) refuse(`Recording ${recording.id} was deleted during the scan`);
      // Place what came back on the recording's sample grid.
      const offset = Math.round((rec.startTime - recStartExact) * rate);
      const n = endIdx - next;
      const arrays = new Map<string, Float64Array>();
      for (const name of readNames) {
        const out = new Float64Array(n).fill(NaN);
        const ch = rec.channels.find((c) => c.name === name);
        if (ch) {
          for (let i = 0; i < ch.values.length; i++) {
            const idx = offset + i - next; // offset is the frame index of ch.values[0]
            if (idx >= 0 && idx < n) out[idx] = ch.values[i];
          }
        }
        arrays.set(name, out);
      }
      for (const c of corridors) {
        const sumsF = flowSums.get(c.code);
        if (sumsF && c.flow) {
          const x = arrays.get(c.flow)!;
          for (let i = 0; i < n; i++) sumsF.add(Math.floor((next + i) / rate), x[i]);
        }
        const sumsA = angleSums.get(c.code);
        if (sumsA && c.angles) {
          const a = arrays.get(c.angles[0])!;
          const b = arrays.get(c.angles[1])!;
          for (let i = 0; i < n; i++) sumsA.add(Math.floor((next + i) / rate), wrap180(a[i] - b[i]));
        }
      }
      scanner.push(fed.map((name) => arrays.get(name)!));
      next = endIdx;
      await flush();
    }
    if (toEnd) scanner.finish();
    await flush();
  }
  await progress(true);
  const mine = inRange();
  if (mine < range.to - range.from) {
    throw new Error(`Scan ${analysis.id} stored ${mine} of the ${range.to - range.from} windows from window ${range.from}; retrying`);
  }
  const all = block === null ? stored.size : await storedWindowCount(db, { analysisId: analysis.id });
  if (all >= total) {
    const startedAt = running.startedAt?.getTime() ?? t0;
    const finished = await finishRunningAnalysis(db, { id: analysis.id, timings: { totalMs: Date.now() - startedAt, windows: total, storedNow } });
    if (finished) {
      await publishProgress(ctx, finished);
      await enqueueEvaluateAlerts(ctx.queues, { analysisId: analysis.id });
    }
  }
  return { analysisId: analysis.id, windows: total, storedNow, skippedExisting, blocks: 0 };
}

/**
 * Track assignment across the windows of one scan (frequency band and mode-shape similarity):
 *  - candidates of a track are the natural modes in its band carrying at least `strengthFloor` of
 *    the window's strongest mode (weaker peaks are noise the estimator fitted, not modes to follow);
 *  - in a track's first window the strongest candidate is taken; afterwards only a candidate whose
 *    shape matches the track's previous estimate (MAC ≥ minMac, modal/tracking.ts) — so a trend
 *    follows one physical mode and a window without it stays without an estimate;
 *  - forced-oscillation peaks in a band are stored on that track (never as its natural estimate).
 * The tracks' site groups (reference shapes) are not used as the match: estimated shapes are
 * relative to the angle reference bus, where a ±1 group pattern scores low even for the right mode.
 */
export class ScanTracker {
  private readonly prev = new Map<string, AmbientMode['shape']>();
  constructor(
    private readonly tracks: { code: string; minHz: number; maxHz: number }[],
    private readonly opts: { minMac: number; strengthFloor: number } = { minMac: 0.5, strengthFloor: 0.02 },
  ) {}

  /** Mode index → track code for one window's modes. */
  assign(modes: AmbientMode[]): Map<number, string> {
    const out = new Map<number, string>();
    if (this.tracks.length === 0 || modes.length === 0) return out;
    let strongest = 0;
    for (const m of modes) if (!m.forced && m.strength > strongest) strongest = m.strength;
    const keep: number[] = [];
    modes.forEach((m, i) => {
      if (m.forced || m.strength >= this.opts.strengthFloor * strongest) keep.push(i);
    });
    const specs: ModeTrackSpec[] = this.tracks.map((t) => ({
      code: t.code,
      minHz: t.minHz,
      maxHz: t.maxHz,
      referenceShape: this.prev.get(t.code) ?? null,
      minMac: this.opts.minMac,
    }));
    const a = assignTracks(keep.map((i) => modes[i]), specs);
    for (const t of a.assignments) {
      if (t.modeIndex !== null) {
        const i = keep[t.modeIndex];
        out.set(i, t.track);
        this.prev.set(t.track, modes[i].shape);
      }
      for (const f of t.forcedInBand) if (!out.has(keep[f])) out.set(keep[f], t.track);
    }
    return out;
  }
}

/** The window's modes as stored estimates, each with its track (see ScanTracker). */
export function windowEstimates(
  w: AmbientWindowResult,
  o: Pick<ResolvedAmbientOptions, 'method'>,
  tracker: ScanTracker,
  trackIdOf: Map<string, number>,
  channelIds: Map<string, number>,
  at: Date,
): EstimateInput[] {
  if (w.skipped || w.modes.length === 0) return [];
  const trackOfMode = tracker.assign(w.modes);
  return w.modes.map((m, i) => ({
    trackId: trackIdOf.get(trackOfMode.get(i) ?? '') ?? null,
    at,
    frequencyHz: m.frequencyHz,
    dampingPercent: m.dampingPercent,
    dampingLo: Number.isFinite(m.dampingCi[0]) ? m.dampingCi[0] : null,
    dampingHi: Number.isFinite(m.dampingCi[1]) ? m.dampingCi[1] : null,
    frequencyLo: Number.isFinite(m.frequencyCi[0]) ? m.frequencyCi[0] : null,
    frequencyHi: Number.isFinite(m.frequencyCi[1]) ? m.frequencyCi[1] : null,
    amplitude: Number.isFinite(m.strength) ? m.strength : null,
    fitQuality: null,
    method: o.method,
    forced: m.forced,
    shape: m.shape
      .filter((s) => channelIds.has(s.channel) && Number.isFinite(s.magnitude) && Number.isFinite(s.angleDeg))
      .map((s) => ({ channelId: channelIds.get(s.channel)!, magnitude: s.magnitude, angleDeg: s.angleDeg })),
  }));
}
