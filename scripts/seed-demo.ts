// `tsx scripts/seed-demo.ts` (run by `npm start` after the server, worker and seed): on an EMPTY
// database (no recordings yet) it simulates Tarrow recordings with the project's simulator and
// stores them through the same ingest path as an upload (server/ingest/store.ts), then queues their
// scans and fits, so every screen has real results on first start:
//   - a day of lighter data for trends (10 frames/s, angle and flow channels), transfer following
//     the simulator's daily shape, scanned with a 5-minute step;
//   - two ring-down events (a corridor line trip, a generator loss), each fitted by both methods;
//   - a few hours of ambient data at rising transfer levels up to one where the north–south mode
//     is under 3 % damping, so a demo alert opens (and stays open: it is the newest data); one of
//     them carries a 0.70 Hz forced oscillation (a 'forced' alert on the east–west track that
//     clears with the next recording).
// Everything ends at about the time of seeding. Idempotent: with any recording stored it does
// nothing; a session advisory lock keeps two starts from seeding twice. The demo engineer,
// operator and administrator follow every track (alert e-mails go to the Outbox).
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { sql } from 'drizzle-orm';
import type { Db } from '../db/client';
import { recordAudit } from '../db/queries/audit';
import { createRecording } from '../db/queries/recordings';
import { createAnalysis, setAnalysisJob, type AnalysisRow } from '../db/queries/scans';
import { DEMO_PEOPLE } from '../db/seed';
import { TARROW_CHANNELS } from '../fixtures/tarrow-network';
import { createAnalysisContext, type AnalysisContext } from '../jobs/processors/analysis-context';
import { enqueueFit } from '../jobs/processors/analysis-queues';
import { queueCreatedScan, scanSettingsFor } from '../jobs/processors/auto-scan';
import type { FitSettings } from '../jobs/processors/fit';
import type { AmbientOptionsInput } from '../modal/ambient';
import { writeCsv } from '../modal/formats/csv';
import { buildTarrowModel, dailyTransferMw, simulateAmbient, simulateDayChunks, simulateRingdown, type RingdownEvent } from '../modal/simulator';
import type { SampledRecord } from '../modal/types';
import { prepareUpload, storeUpload } from '../server/ingest/store';

export interface DemoAmbient {
  start: number;
  transferMw: number;
  minutes: number;
  seed: number;
  rate?: number;
  channels?: string[];
  /** A sustained forced oscillation injected during the recording. */
  forced?: { frequencyHz: number; amplitude: number; site: string };
}
export interface DemoDay {
  start: number;
  hours: number;
  rate: number;
  seed: number;
  channels: string[];
  /** Scan step, s. */
  stepSeconds: number;
}
export interface DemoRingdown {
  start: number;
  event: RingdownEvent;
  transferMw: number;
  seed: number;
  /** Seconds recorded after the event, and of those fitted. */
  seconds: number;
  fitSeconds: number;
  /** Channels fitted (default: all of the recording). */
  fitChannels?: string[];
}
export interface DemoPlan {
  day: DemoDay | null;
  ringdowns: DemoRingdown[];
  ambient: DemoAmbient[];
}

/** Angle and flow channels: the lighter channel set of the trend day. */
export const LIGHT_CHANNELS = TARROW_CHANNELS.filter((c) => c.kind === 'angle' || c.kind === 'flow').map((c) => c.name);

/** Transfer levels of the ambient block, MW; the last puts the north–south mode under 3 %. */
export const DEMO_LEVELS_MW = [800, 1300, 1800, 2200, 2600, 2950];

/** The demo as shipped, ending at `now` (epoch s). */
export function demoPlan(now: number): DemoPlan {
  const hour = 3600;
  const end = Math.floor(now / 60) * 60;
  const blockMinutes = 45;
  const blockStart = end - DEMO_LEVELS_MW.length * blockMinutes * 60;
  const dayStart = Math.floor((blockStart - 2 * hour - 24 * hour) / hour) * hour;
  return {
    day: { start: dayStart, hours: 24, rate: 10, seed: 101, channels: LIGHT_CHANNELS, stepSeconds: 300 },
    ringdowns: [
      { start: blockStart - 90 * 60, event: 'line-trip', transferMw: 2000, seed: 201, seconds: 40, fitSeconds: 20 },
      // after a generator loss the classical model's frequency keeps falling (no governors): the
      // corridor flows show the swing without the drift of the angles and frequencies
      { start: blockStart - 45 * 60, event: 'generator-loss', transferMw: 1500, seed: 202, seconds: 40, fitSeconds: 20, fitChannels: ['moorgate.mw', 'eastfell-ridge.mw'] },
    ],
    ambient: DEMO_LEVELS_MW.map((mw, i) => ({
      start: blockStart + i * blockMinutes * 60,
      transferMw: mw,
      minutes: blockMinutes,
      seed: 300 + i,
      ...(mw === 1800 ? { forced: { frequencyHz: 0.7, amplitude: 8, site: 'windlow' } } : {}),
    })),
  };
}

// ---------------------------------------------------------------- storing through the ingest path

async function fileInfo(file: string, originalName: string) {
  const hash = crypto.createHash('sha256');
  for await (const chunk of fs.createReadStream(file)) hash.update(chunk as Buffer);
  return { originalName, path: file, size: fs.statSync(file).size, sha256: hash.digest('hex') };
}

export interface StoredDemo {
  recordingId: number;
  analyses: AnalysisRow[];
}

/**
 * Stores a CSV file as a recording in ONE transaction (as an upload ingested within the request),
 * with its scan and fit analyses created in the same transaction — so the worker's automatic scan
 * never sees the recording without them. The caller queues the analyses after the commit.
 */
export async function storeDemoFile(
  db: Db,
  params: {
    file: string;
    fileName: string;
    uploadedBy: number | null;
    scan?: AmbientOptionsInput;
    fits?: Omit<FitSettings, 'order'>[];
  },
): Promise<StoredDemo> {
  const info = await fileInfo(params.file, params.fileName);
  return db.transaction(async (tx) => {
    const prepared = await prepareUpload(tx, { files: [info] });
    let rec;
    try {
      rec = await createRecording(tx, {
        fileName: prepared.fileName,
        checksum: prepared.checksum,
        format: prepared.format,
        sizeBytes: prepared.sizeBytes,
        uploadedBy: params.uploadedBy,
        status: 'ingesting',
      });
    } catch (err) {
      prepared.source.close();
      throw err;
    }
    const summary = await storeUpload(tx, { recordingId: rec.id, prepared });
    await recordAudit(tx, {
      personId: params.uploadedBy,
      action: 'recording.upload',
      target: `recording:${rec.id}`,
      details: { fileName: prepared.fileName, sizeBytes: prepared.sizeBytes, checksum: prepared.checksum, mode: 'demo' },
    });
    const analyses: AnalysisRow[] = [];
    if (params.scan) {
      const s = await scanSettingsFor(tx, { id: rec.id, rate: summary.rate, sampleCount: summary.frames }, params.scan);
      if ('error' in s) throw new Error(`demo scan settings refused: ${s.error}`);
      analyses.push(await createAnalysis(tx, { kind: 'scan', recordingId: rec.id, method: s.method, settings: s.settings, createdBy: params.uploadedBy }));
    }
    for (const f of params.fits ?? []) {
      const settings: FitSettings = { ...f, order: 'auto' };
      analyses.push(
        await createAnalysis(tx, {
          kind: 'fit',
          recordingId: rec.id,
          method: 'prony+matrix-pencil',
          settings: settings as unknown as Record<string, unknown>,
          createdBy: params.uploadedBy,
        }),
      );
    }
    return { recordingId: rec.id, analyses };
  });
}

export async function queueDemoAnalyses(ctx: Pick<AnalysisContext, 'db' | 'queues' | 'events' | 'log'>, analyses: AnalysisRow[]): Promise<void> {
  for (const a of analyses) {
    if (a.kind === 'scan') await queueCreatedScan(ctx, a);
    else if (a.kind === 'fit') await setAnalysisJob(ctx.db, { id: a.id, jobId: await enqueueFit(ctx.queues, { analysisId: a.id }) });
  }
}

function writeRecordCsv(file: string, record: SampledRecord): void {
  fs.writeFileSync(file, writeCsv(record, { decimals: 5 }));
}

const stamp = (t: number) => new Date(t * 1000).toISOString().slice(0, 16).replace(/[-:]/g, '').replace('T', '-');

export interface SeedDemoResult {
  recordings: number[];
  analyses: AnalysisRow[];
}

/** Simulates and stores a plan; queues its analyses. */
export async function seedDemoPlan(
  ctx: Pick<AnalysisContext, 'db' | 'queues' | 'events' | 'log'>,
  plan: DemoPlan,
  opts: { uploadedBy?: number | null; tmpDir?: string } = {},
): Promise<SeedDemoResult> {
  const dir = fs.mkdtempSync(path.join(opts.tmpDir ?? os.tmpdir(), 'keel-demo-'));
  const out: SeedDemoResult = { recordings: [], analyses: [] };
  const uploadedBy = opts.uploadedBy ?? null;
  const keep = async (s: StoredDemo) => {
    out.recordings.push(s.recordingId);
    out.analyses.push(...s.analyses);
    await queueDemoAnalyses(ctx, s.analyses);
  };
  try {
    if (plan.day) {
      const d = plan.day;
      const file = path.join(dir, 'day.csv');
      const fd = fs.openSync(file, 'w');
      let first = true;
      // the simulator's daily shape, by hour of day UTC
      const startHour = (d.start / 3600) % 24;
      for (const chunk of simulateDayChunks({ hours: d.hours, rate: d.rate, seed: d.seed, startTime: d.start, channels: d.channels, transferMw: (h) => dailyTransferMw(h + startHour) })) {
        const text = writeCsv(chunk.record, { decimals: 5 });
        fs.writeSync(fd, first ? text : text.slice(text.indexOf('\n') + 1));
        first = false;
      }
      fs.closeSync(fd);
      await keep(await storeDemoFile(ctx.db, { file, fileName: `tarrow-day-${stamp(d.start)}.csv`, uploadedBy, scan: { stepSeconds: d.stepSeconds } }));
      fs.rmSync(file, { force: true });
      ctx.log.info(`demo: stored the trend day (${d.hours} h at ${d.rate} frames/s)`);
    }
    for (const r of plan.ringdowns) {
      const sim = simulateRingdown(buildTarrowModel(r.transferMw), { event: r.event, seed: r.seed, startTime: r.start, seconds: r.seconds });
      const file = path.join(dir, `ringdown-${r.seed}.csv`);
      writeRecordCsv(file, sim.record);
      const from = new Date(Math.round(sim.eventTime * 1000)).toISOString();
      const to = new Date(Math.round((sim.eventTime + r.fitSeconds) * 1000)).toISOString();
      await keep(
        await storeDemoFile(ctx.db, { file, fileName: `tarrow-${r.event}-${stamp(r.start)}.csv`, uploadedBy, fits: [{ from, to, ...(r.fitChannels ? { channels: r.fitChannels } : {}) }] }),
      );
      fs.rmSync(file, { force: true });
      ctx.log.info(`demo: stored a ${r.event} ring-down at ${r.transferMw} MW`);
    }
    for (const a of plan.ambient) {
      const rec = simulateAmbient(buildTarrowModel(a.transferMw), {
        minutes: a.minutes,
        seed: a.seed,
        startTime: a.start,
        rate: a.rate,
        channels: a.channels,
        ...(a.forced ? { forced: a.forced } : {}),
      });
      const file = path.join(dir, `ambient-${a.seed}.csv`);
      writeRecordCsv(file, rec);
      await keep(await storeDemoFile(ctx.db, { file, fileName: `tarrow-ambient-${a.transferMw}mw-${stamp(a.start)}.csv`, uploadedBy, scan: {} }));
      fs.rmSync(file, { force: true });
      ctx.log.info(`demo: stored ${a.minutes} min of ambient data at ${a.transferMw} MW`);
    }
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
  return out;
}

/** The demo engineer, operator and administrator follow every track (when nobody follows any yet). */
export async function subscribeDemoPeople(db: Db): Promise<number> {
  const emails = DEMO_PEOPLE.filter((p) => p.role !== 'planner').map((p) => p.email);
  const r = await db.execute(sql`
    insert into track_subscriptions (person_id, track_id)
    select p.id, t.id from people p cross join mode_tracks t
     where p.email in (${sql.join(emails.map((e) => sql`${e}`), sql`, `)})
       and not exists (select 1 from track_subscriptions)
    on conflict do nothing`);
  return r.rowCount ?? 0;
}

/** Seeds the demo when no recording is stored yet; returns null when there was nothing to do. */
export async function seedDemo(ctx: AnalysisContext, now = Date.now() / 1000): Promise<SeedDemoResult | null> {
  const conn = await ctx.pool.connect();
  try {
    await conn.query('select pg_advisory_lock(4713)');
    const { rows } = await conn.query('select count(*)::int as n from recordings');
    if (rows[0].n > 0) return null;
    const subs = await subscribeDemoPeople(ctx.db);
    if (subs) ctx.log.info(`demo: ${subs} track subscriptions for the demo people`);
    const engineer = await ctx.db.execute(sql`select id from people where email = ${DEMO_PEOPLE.find((p) => p.role === 'engineer')!.email}`);
    const uploadedBy = (engineer.rows[0] as { id: number } | undefined)?.id ?? null;
    return await seedDemoPlan(ctx, demoPlan(now), { uploadedBy });
  } finally {
    await conn.query('select pg_advisory_unlock(4713)').catch(() => undefined);
    conn.release();
  }
}

if (require.main === module) {
  const ctx = createAnalysisContext(process.env, 'demo');
  const t0 = Date.now();
  seedDemo(ctx)
    .then(async (r) => {
      if (r === null) ctx.log.info('demo: recordings already stored; nothing to do');
      else ctx.log.info(`demo: ${r.recordings.length} recordings stored and ${r.analyses.length} analyses queued in ${((Date.now() - t0) / 1000).toFixed(0)} s`);
      await ctx.close();
      process.exit(0);
    })
    .catch(async (err: unknown) => {
      ctx.log.error('demo seeding failed', err);
      await ctx.close().catch(() => undefined);
      process.exit(1);
    });
}
