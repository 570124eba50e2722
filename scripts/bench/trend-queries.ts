// The database side of the Watch, Trends and transfer-study screens on a filled database
// (scripts/bench/fill-year.ts): each query as the code ran it BEFORE the scale work (every bucket
// aggregated from mode_estimates, the newest estimate by DISTINCT ON over all of a track's
// estimates, the study's rows found by window time only) and as it runs NOW (rollups, one index
// probe per track, the study bounded by estimate time). One client, no HTTP: the figures say what
// the database costs per screen. Prints the median and 95th percentile of each.
//
//   DATABASE_URL=… npx tsx scripts/bench/trend-queries.ts [--runs 30] [--before-only]
//
// Both columns run against the same data; "now" needs migration 0003 (estimate_rollups) applied.
import os from 'node:os';
import { parseArgs } from 'node:util';
import { sql } from 'drizzle-orm';
import pg from 'pg';
import { createDb, type Db } from '../../db/client';
import {
  countTrackEstimates,
  latestByTrack,
  latestEstimateAt,
  studyRows,
  trackEstimateBuckets,
  trackEstimateBucketsFromEstimates,
} from '../../db/queries/estimates';
import { bucketSecondsFor } from '../../server/routes/estimates';

const DAY_MS = 86_400_000;

export interface QueryFigure {
  name: string;
  before: { p50: number; p95: number } | null;
  now: { p50: number; p95: number } | null;
  rows: string;
}

async function time(runs: number, f: () => Promise<unknown>): Promise<{ p50: number; p95: number }> {
  for (let i = 0; i < 2; i++) await f(); // warm the cache and the plan
  const ms: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t = performance.now();
    await f();
    ms.push(performance.now() - t);
  }
  ms.sort((a, b) => a - b);
  const q = (p: number) => ms[Math.min(ms.length - 1, Math.floor(p * ms.length))];
  return { p50: q(0.5), p95: q(0.95) };
}

/** The newest estimate of each track as the code found it before (DISTINCT ON over every estimate). */
async function latestBefore(db: Db, trackIds: number[]) {
  return db.execute(sql`
    select distinct on (e.track_id) e.*, a.settings
      from mode_estimates e
      left join scan_windows w on w.id = e.window_id
      left join analyses a on a.id = w.analysis_id
     where e.track_id in (${sql.join(trackIds.map((t) => sql`${t}`), sql`, `)}) and e.track_id is not null
     order by e.track_id, e.at desc, e.id desc`);
}

/** The study's rows as the code found them before (bounded by window time only). */
async function studyBefore(db: Db, trackId: number, code: string, from: Date, to: Date) {
  return db.execute(sql`
    select w.analysis_id, w.start_time, w.end_time, a.settings, e.damping_percent, e.damping_lo, e.damping_hi, e.forced,
           (w.transfer_mw ->> ${code})::float8 as transfer_mw, (w.angle_deg ->> ${code})::float8 as angle_deg
      from mode_estimates e
      join scan_windows w on w.id = e.window_id
      join analyses a on a.id = w.analysis_id
     where e.track_id = ${trackId} and w.start_time >= ${from.toISOString()}::timestamptz and w.end_time <= ${to.toISOString()}::timestamptz
     order by w.start_time, w.analysis_id`);
}

/** Count before: every estimate of the period, counted one by one. */
async function countBefore(db: Db, trackId: number, from: Date, to: Date) {
  return db.execute(sql`select count(*)::int from mode_estimates where track_id = ${trackId} and at >= ${from.toISOString()}::timestamptz and at <= ${to.toISOString()}::timestamptz`);
}

export async function measureQueries(pool: pg.Pool, opts: { runs?: number; beforeOnly?: boolean } = {}): Promise<QueryFigure[]> {
  const runs = opts.runs ?? 30;
  const db = createDb(pool);
  const tracks = (await pool.query<{ id: number; code: string; corridor: string | null }>(
    'select t.id, t.code, c.code as corridor from mode_tracks t left join corridors c on c.id = t.corridor_id order by t.id',
  )).rows;
  const hasRollups = !opts.beforeOnly && (await pool.query(`select to_regclass('estimate_rollups') as r`)).rows[0].r !== null;
  const ns = tracks.find((t) => t.code === 'north-south') ?? tracks[0];
  const to = (await latestEstimateAt(db, { trackId: ns.id })) ?? new Date();
  const ids = tracks.map((t) => t.id);
  const out: QueryFigure[] = [];
  const add = async (name: string, rows: string, before: () => Promise<unknown>, now: (() => Promise<unknown>) | null) => {
    out.push({ name, rows, before: await time(runs, before), now: now && hasRollups ? await time(runs, now) : null });
  };

  await add('Watch: newest estimate of every track', `${ids.length} tracks`, () => latestBefore(db, ids), () => latestByTrack(db, { trackIds: ids }));
  const sparkFrom = new Date(to.getTime() - DAY_MS);
  await add(
    'Watch: 24 h sparklines (10-min buckets)',
    `${ids.length} tracks`,
    () => Promise.all(ids.map((trackId) => trackEstimateBucketsFromEstimates(db, { trackId, from: sparkFrom, to, bucketSeconds: 600, naturalOnly: true }))),
    () => Promise.all(ids.map((trackId) => trackEstimateBuckets(db, { trackId, from: sparkFrom, to, bucketSeconds: 600, naturalOnly: true }))),
  );
  for (const [label, days] of [
    ['year', 365],
    ['month', 30],
    ['day', 1],
  ] as const) {
    const from = new Date(to.getTime() - days * DAY_MS);
    const b = bucketSecondsFor((to.getTime() - from.getTime()) / 1000, 700);
    await add(
      `Trends: a ${label}, count + ${b / 3600 >= 1 ? `${b / 3600} h` : `${b / 60} min`} buckets`,
      'north-south',
      async () => {
        await countBefore(db, ns.id, from, to);
        await trackEstimateBucketsFromEstimates(db, { trackId: ns.id, from, to, bucketSeconds: b });
      },
      async () => {
        await countTrackEstimates(db, { trackId: ns.id, from, to });
        await trackEstimateBuckets(db, { trackId: ns.id, from, to, bucketSeconds: b });
      },
    );
  }
  if (ns.corridor) {
    for (const days of [7, 30]) {
      const from = new Date(to.getTime() - days * DAY_MS);
      await add(
        `Transfer study: rows of ${days} days`,
        'north-south',
        () => studyBefore(db, ns.id, ns.corridor!, from, to),
        () => studyRows(db, { trackId: ns.id, corridorCode: ns.corridor!, from, to }),
      );
    }
  }
  return out;
}

export function printQueryTable(figs: QueryFigure[]): void {
  const f = (x: { p50: number; p95: number } | null) => (x ? `${x.p50.toFixed(1).padStart(8)} ${x.p95.toFixed(1).padStart(8)}` : `${'—'.padStart(8)} ${'—'.padStart(8)}`);
  console.log(`${'query'.padEnd(48)} ${'before p50'.padStart(10)} ${'p95'.padStart(6)} ${'now p50'.padStart(10)} ${'p95'.padStart(6)}   (ms, one client)`);
  for (const q of figs) {
    console.log(`${q.name.padEnd(48)} ${f(q.before)}   ${f(q.now)}${q.before && q.now ? `   ×${(q.before.p50 / q.now.p50).toFixed(0)}` : ''}`);
  }
}

async function main() {
  const { values } = parseArgs({ options: { runs: { type: 'string' }, 'before-only': { type: 'boolean' } } });
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error('Set DATABASE_URL to a filled database (scripts/bench/fill-year.ts)');
  const pool = new pg.Pool({ connectionString: url, max: 4 });
  try {
    const n = (await pool.query<{ n: number }>('select count(*)::int as n from mode_estimates')).rows[0].n;
    console.log(`${n.toLocaleString('en')} mode estimates; load average ${os.loadavg().map((x) => x.toFixed(1)).join(' ')} on ${os.cpus().length} CPUs`);
    printQueryTable(await measureQueries(pool, { runs: values.runs ? Number(values.runs) : 30, beforeOnly: values['before-only'] }));
  } finally {
    await pool.end();
  }
}

if (require.main === module) {
  main().catch((err) => {
    console.error(err);
    process.exit(1);
  });
}
