// `npm run bench:scaleout`: one simulated day scanned by ONE worker process, then the same day
// scanned again (a new analysis of the same recording) by TWO worker processes sharing it. A
// scan longer than one block (KEEL_SCAN_BLOCK_SECONDS, default an hour of windows) is split by
// its job into per-block jobs that any worker takes (jobs/processors/scan.ts). Prints both wall
// times, the speed-up, and checks each result: every window of the grid stored exactly once.
//
// The day is the demo's trend day (scripts/seed-demo.ts: 10 frames/s, the angle and flow channels,
// transfer following the simulator's daily shape) scanned with the default settings (20-minute
// windows every minute: 1440 windows), stored through the ingest path like an upload.
// --unsplit also scans it once more on one worker with splitting off (the way scans ran before)
// and compares its estimates with the split scan's, window by window.
//
//   npm run bench:scaleout -- [--hours 24] [--rate 10] [--block-seconds 3600] [--unsplit] [--keep]
import fs from 'node:fs';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { Redis } from 'ioredis';
import { createAnalysis, getAnalysis, type AnalysisRow } from '../../db/queries/scans';
import { createAnalysisContext, type AnalysisContext } from '../../jobs/processors/analysis-context';
import { enqueueScan } from '../../jobs/processors/analysis-queues';
import { heartbeatKeyPattern } from '../../jobs/queues';
import { writeCsv } from '../../modal/formats/csv';
import { dailyTransferMw, simulateDayChunks } from '../../modal/simulator';
import { LIGHT_CHANNELS, storeDemoFile } from '../seed-demo';
import { cpuBetween, cpuSnapshot, loadLine, postgresCpuSnapshot, spawnProc, startBenchServices, waitFor, type Proc } from './bench-stack';

const { values: args } = parseArgs({
  options: {
    hours: { type: 'string' },
    rate: { type: 'string' },
    'block-seconds': { type: 'string' },
    unsplit: { type: 'boolean' },
    keep: { type: 'boolean' },
  },
});

interface RunResult {
  label: string;
  workers: number;
  seconds: number;
  windows: number;
  distinct: number;
  expected: number;
  analysisId: number;
  /** CPU seconds of the worker processes (with their sandboxed scan processes) and of PostgreSQL during the run. */
  workerCpu: number;
  dbCpu: number | null;
  /** Blocks each worker process ran (from its "scan job … done" lines). */
  blocksPerWorker: number[];
}

async function main() {
  const hours = args.hours ? Number(args.hours) : 24;
  const rate = args.rate ? Number(args.rate) : 10;
  const blockSeconds = args['block-seconds'] ?? '3600';
  console.log(`bench:scaleout — ${loadLine()}`);
  const svc = await startBenchServices({ keep: args.keep });
  const prefix = `keel-bench-scale-${process.pid}`;
  const baseEnv = { DATABASE_URL: svc.databaseUrl, REDIS_URL: svc.redisUrl, QUEUE_PREFIX: prefix, KEEL_AUTO_SCAN: '0', SMTP_HOST: '127.0.0.1', SMTP_PORT: '9' };
  const ctx: AnalysisContext = createAnalysisContext({ ...process.env, ...baseEnv }, 'bench');
  const redis = new Redis(svc.redisUrl);
  const procs: Proc[] = [];
  try {
    // ---- the day, stored as an upload would be
    const start = Date.UTC(2025, 6, 15) / 1000;
    const file = path.join(svc.work, 'day.csv');
    const t0 = performance.now();
    const fd = fs.openSync(file, 'w');
    let first = true;
    for (const chunk of simulateDayChunks({ hours, rate, seed: 101, startTime: start, channels: LIGHT_CHANNELS, transferMw: (h) => dailyTransferMw(h) })) {
      const text = writeCsv(chunk.record, { decimals: 5 });
      fs.writeSync(fd, first ? text : text.slice(text.indexOf('\n') + 1));
      first = false;
    }
    fs.closeSync(fd);
    const sizeMb = fs.statSync(file).size / 1e6;
    const stored = await storeDemoFile(ctx.db, { file, fileName: 'tarrow-scaleout-day.csv', uploadedBy: null, scan: { stepSeconds: 60 } });
    fs.rmSync(file, { force: true });
    const a1 = stored.analyses[0];
    console.log(
      `day: ${hours} h × ${rate} frames/s × ${LIGHT_CHANNELS.length} channels (${sizeMb.toFixed(0)} MB of CSV), simulated and stored in ${((performance.now() - t0) / 1000).toFixed(0)} s; ` +
        `scan: 20-minute windows every minute, blocks of ${blockSeconds} s of window starts`,
    );
    await ctx.pool.query('select sum(length(values)) from sample_chunks'); // read the samples once, so no run pays for a cold cache

    const newScan = async (): Promise<AnalysisRow> =>
      createAnalysis(ctx.db, { kind: 'scan', recordingId: stored.recordingId, method: a1.method, settings: a1.settings as Record<string, unknown>, createdBy: null });

    const run = async (label: string, analysis: AnalysisRow, workers: number, block: string): Promise<RunResult> => {
      for (const p of procs.splice(0)) await p.stop();
      const stale = await redis.keys(heartbeatKeyPattern(prefix)); // a stopped worker removes its own; be sure
      if (stale.length) await redis.del(...stale);
      for (let i = 0; i < workers; i++) procs.push(spawnProc('jobs/worker.ts', { ...baseEnv, KEEL_SCAN_BLOCK_SECONDS: block }, `worker${i + 1}`));
      await waitFor(async () => (await redis.keys(heartbeatKeyPattern(prefix))).length === workers, `${workers} worker(s) up`, 120_000);
      const cpu0 = { w: cpuSnapshot(procs.map((p) => p.child.pid!)), db: svc.pgData ? postgresCpuSnapshot(svc.pgData) : null };
      const t = performance.now();
      await enqueueScan(ctx.queues, { analysisId: analysis.id });
      const done = await waitFor(
        async () => {
          const a = await getAnalysis(ctx.db, { id: analysis.id });
          if (a?.status === 'failed') throw new Error(`scan ${analysis.id} failed: ${a.error}`);
          return a?.status === 'done' ? a : undefined;
        },
        `scan ${analysis.id}`,
        3 * 3600_000,
        250,
      );
      const seconds = (performance.now() - t) / 1000;
      const cpu1 = { w: cpuSnapshot(procs.map((p) => p.child.pid!)), db: svc.pgData ? postgresCpuSnapshot(svc.pgData) : null };
      const c = (
        await ctx.pool.query<{ n: number; d: number }>('select count(*)::int as n, count(distinct start_time)::int as d from scan_windows where analysis_id = $1', [analysis.id])
      ).rows[0];
      const expected = Number((done.timings as { windows?: number } | null)?.windows ?? NaN);
      const blocksPerWorker = procs.map((p) => p.logs.filter((l) => new RegExp(`scan job scan-${analysis.id}-w\\d+ done`).test(l)).length);
      console.log(`${label}: ${seconds.toFixed(1)} s (${loadLine()})`);
      return {
        label,
        workers,
        seconds,
        windows: c.n,
        distinct: c.d,
        expected,
        analysisId: analysis.id,
        workerCpu: cpuBetween(cpu0.w, cpu1.w)! / 1000,
        dbCpu: (cpuBetween(cpu0.db, cpu1.db) ?? NaN) / 1000,
        blocksPerWorker,
      };
    };

    const results: RunResult[] = [];
    results.push(await run('one worker', a1, 1, blockSeconds));
    results.push(await run('two workers', await newScan(), 2, blockSeconds));
    if (args.unsplit) results.push(await run('one worker, unsplit', await newScan(), 1, '0'));

    console.log('');
    console.log(
      `${'run'.padEnd(22)} ${'workers'.padStart(7)} ${'seconds'.padStart(8)} ${'CPU s: workers'.padStart(14)} ${'db'.padStart(5)} ${'cores used'.padStart(10)} ${'blocks/worker'.padStart(13)} ${'windows'.padStart(8)} ${'distinct'.padStart(8)} ${'expected'.padStart(8)}  check`,
    );
    for (const r of results) {
      const ok = r.windows === r.expected && r.distinct === r.windows;
      console.log(
        `${r.label.padEnd(22)} ${String(r.workers).padStart(7)} ${r.seconds.toFixed(1).padStart(8)} ${r.workerCpu.toFixed(1).padStart(14)} ${(r.dbCpu === null || Number.isNaN(r.dbCpu) ? '—' : r.dbCpu.toFixed(1)).padStart(5)} ${(r.workerCpu / r.seconds).toFixed(2).padStart(10)} ${(r.blocksPerWorker.some((b) => b > 0) ? r.blocksPerWorker.join(' + ') : 'unsplit').padStart(13)} ${String(r.windows).padStart(8)} ${String(r.distinct).padStart(8)} ${String(r.expected).padStart(8)}  ${ok ? 'every window once' : 'WRONG'}`,
      );
    }
    const speedup = results[0].seconds / results[1].seconds;
    console.log(`\nspeed-up with two workers: ×${speedup.toFixed(2)} (${speedup >= 1.3 ? 'clearly faster' : 'NOT clearly faster'}); ${loadLine()}`);
    console.log(
      '(CPU s: CPU time the worker processes with their sandboxed scan processes, and PostgreSQL, used during the run — the work, whatever the machine load; ' +
        'cores used = worker CPU s / seconds: the CPU the workers actually got. On a shared, busy machine a second worker only helps as far as the scheduler gives it a core.)',
    );

    if (args.unsplit) {
      // the split scan against the unsplit one: the same windows, the north–south estimates compared
      const cmp = (
        await ctx.pool.query<{ both: number; same: number; close: number; maxdiff: number | null; onlyone: number }>(
          `with ns as (select id from mode_tracks where code = 'north-south'),
                a as (select w.start_time, e.damping_percent as d from scan_windows w left join mode_estimates e on e.window_id = w.id and e.track_id = (select id from ns) and not e.forced where w.analysis_id = $1),
                b as (select w.start_time, e.damping_percent as d from scan_windows w left join mode_estimates e on e.window_id = w.id and e.track_id = (select id from ns) and not e.forced where w.analysis_id = $2)
           select count(*) filter (where a.d is not null and b.d is not null)::int as both,
                  count(*) filter (where a.d = b.d)::int as same,
                  count(*) filter (where abs(a.d - b.d) <= 0.01)::int as close,
                  max(abs(a.d - b.d)) as maxdiff,
                  count(*) filter (where (a.d is null) <> (b.d is null))::int as onlyone
             from a join b on a.start_time = b.start_time`,
          [results[2].analysisId, results[1].analysisId],
        )
      ).rows[0];
      console.log(
        `split vs unsplit, north–south damping per window: ${cmp.close} of ${cmp.both} within 0.01 %-points (${cmp.same} bit-identical), ` +
          `largest difference ${cmp.maxdiff === null ? '—' : Number(cmp.maxdiff).toFixed(4)} %-points, ${cmp.onlyone} windows with an estimate in only one`,
      );
    }
  } finally {
    for (const p of procs) await p.stop();
    redis.disconnect();
    await ctx.close();
    await svc.stop();
  }
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
