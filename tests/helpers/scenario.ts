// Browser-test data: Tarrow ambient recordings simulated by the project's simulator, stored
// through the same ingest path as an upload and scanned by the stack's real worker (the demo
// seeding code, scripts/seed-demo.ts), so Watch, Alerts, Trends and the transfer study show what
// the pipeline really computes — no estimate or alert is written by hand. The browser tests only
// choose the transfer levels and where the data sit in time.
import { createAnalysisContext } from '../../jobs/processors/analysis-context';
import { LIGHT_CHANNELS, seedDemoPlan, subscribeDemoPeople, type DemoPlan } from '../../scripts/seed-demo';
import type { Stack } from './stack';

export interface AmbientScenario {
  /** Highmoor–Saltreach transfer of each consecutive block, MW. */
  levelsMw: number[];
  /** Minutes of data per block (a scan needs at least one 20-minute window). */
  minutes: number;
  /** End of the last block, epoch s (default: now, to the minute). */
  endAt?: number;
  /** Gap between blocks, s (default 0: one continuous stretch). */
  gapSeconds?: number;
  /** First random seed (one per block). */
  seed?: number;
}

export interface SeededScenario {
  recordings: number[];
  /** Start and end of the stored data, epoch s. */
  start: number;
  end: number;
}

async function waitUntil<T>(check: () => Promise<T | undefined | false>, what: string, timeoutMs: number): Promise<T> {
  const t0 = Date.now();
  for (;;) {
    const v = await check();
    if (v) return v;
    if (Date.now() - t0 > timeoutMs) throw new Error(`${what}: not reached within ${timeoutMs / 1000} s`);
    await new Promise((r) => setTimeout(r, 500));
  }
}

/**
 * Simulates, stores and scans the blocks, subscribes the demo engineer, operator and administrator
 * to every track (alert e-mails), and waits until every scan is done and the alert evaluation has
 * had its turn. Returns when the screens have their data.
 */
export async function seedAmbientScenario(stack: Stack, sc: AmbientScenario): Promise<SeededScenario> {
  const ctx = createAnalysisContext({ ...process.env, ...stack.env }, 'browser-seed');
  try {
    await subscribeDemoPeople(ctx.db);
    const end = sc.endAt ?? Math.floor(Date.now() / 60_000) * 60;
    const block = sc.minutes * 60;
    const gap = sc.gapSeconds ?? 0;
    const n = sc.levelsMw.length;
    const start = end - n * block - (n - 1) * gap;
    const plan: DemoPlan = {
      day: null,
      ringdowns: [],
      ambient: sc.levelsMw.map((mw, i) => ({
        start: start + i * (block + gap),
        transferMw: mw,
        minutes: sc.minutes,
        seed: (sc.seed ?? 700) + i,
        channels: LIGHT_CHANNELS,
      })),
    };
    const seeded = await seedDemoPlan(ctx, plan);
    await waitUntil(
      async () => {
        const r = await stack.pool.query<{ status: string; error: string | null }>(`select status, error from analyses where kind = 'scan'`);
        const failed = r.rows.find((a) => a.status === 'failed');
        if (failed) throw new Error(`a seeded scan failed: ${failed.error}`);
        return r.rows.length === n && r.rows.every((a) => a.status === 'done');
      },
      'the seeded scans',
      150_000,
    );
    // Alert evaluation runs as its own job after each scan; wait until its queue is empty.
    await waitUntil(
      async () => {
        const counts = await ctx.queues.evaluateAlerts.getJobCounts('waiting', 'active', 'delayed');
        return counts.waiting + counts.active + counts.delayed === 0;
      },
      'the alert evaluation',
      30_000,
    );
    return { recordings: seeded.recordings, start, end };
  } finally {
    await ctx.close();
  }
}
