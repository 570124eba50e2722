// The trend rollups (estimate_rollups, migration 0003) against the estimates themselves, on a few
// days of generated scan results (scripts/bench/fill-year.ts, the year benchmark's generator with
// a short span): every 10-minute, hourly and daily bucket equals a direct SQL aggregate of
// mode_estimates — after a bulk fill (rollups rebuilt), after inserts through the triggers, after
// deleting a recording (cascade), after updates — and the Trends endpoint serves long spans from
// the rollups with the same numbers the estimates give. The reference aggregates are plain SQL
// (count / min / max / sum / avg over mode_estimates), written here independently of the code
// under test.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { fillEstimates } from '../../scripts/bench/fill-year';
import { createClient, type Client } from '../helpers/http';
import { DEMO_PASSWORD, ROLE_EMAIL } from '../helpers/fixtures';
import { startStack, type Stack } from '../helpers/stack';

const DAY = 86_400;
/** Midnight UTC after the last filled day (2025-06-04). */
const END_DAY = Date.UTC(2025, 5, 4) / 1000;

let stack: Stack;
let planner: Client;
let ns: number;

interface Agg {
  n: number;
  nn: number;
  fs: number;
  nfs: number;
  dmin: number | null;
  dmax: number | null;
  ds: number;
  los: number;
  lon: number;
  his: number;
  hin: number;
}

/** Every bucket of one span, straight from mode_estimates: "track:start" → aggregates. */
async function direct(span: number): Promise<Map<string, Agg>> {
  const r = await stack.pool.query(
    `select track_id, (floor(extract(epoch from at) / $1) * $1)::bigint as b,
            count(*)::int as n, (count(*) filter (where not forced))::int as nn,
            sum(frequency_hz) as fs, coalesce(sum(frequency_hz) filter (where not forced), 0) as nfs,
            min(damping_percent) filter (where not forced) as dmin, max(damping_percent) filter (where not forced) as dmax,
            coalesce(sum(damping_percent) filter (where not forced), 0) as ds,
            coalesce(sum(damping_lo) filter (where not forced), 0) as los, (count(damping_lo) filter (where not forced))::int as lon,
            coalesce(sum(damping_hi) filter (where not forced), 0) as his, (count(damping_hi) filter (where not forced))::int as hin
       from mode_estimates where track_id is not null group by 1, 2`,
    [span],
  );
  return new Map(r.rows.map((x) => [`${x.track_id}:${x.b}`, { ...x, b: undefined, track_id: undefined }]));
}

async function rollups(span: number): Promise<Map<string, Agg>> {
  const r = await stack.pool.query(
    `select track_id, extract(epoch from start)::bigint as b, count as n, natural_count as nn, frequency_sum as fs,
            natural_frequency_sum as nfs, damping_min as dmin, damping_max as dmax, damping_sum as ds,
            damping_lo_sum as los, damping_lo_count as lon, damping_hi_sum as his, damping_hi_count as hin
       from estimate_rollups where span_seconds = $1`,
    [span],
  );
  return new Map(r.rows.map((x) => [`${x.track_id}:${x.b}`, { ...x, b: undefined, track_id: undefined }]));
}

/** Sums in a different order differ in the last bits: compare to 1e-9 relative. */
function close(a: number | null, b: number | null): boolean {
  if (a === null || b === null) return a === b;
  return Math.abs(a - b) <= 1e-9 * Math.max(1, Math.abs(a), Math.abs(b));
}

async function expectRollupsMatch(): Promise<number> {
  let buckets = 0;
  for (const span of [600, 3600, 86_400]) {
    const want = await direct(span);
    const got = await rollups(span);
    expect([...got.keys()].sort()).toEqual([...want.keys()].sort());
    for (const [k, w] of want) {
      const g = got.get(k)!;
      const bad = (Object.keys(w) as (keyof Agg)[]).filter((f) => w[f] !== undefined && !close(g[f] === null ? null : Number(g[f]), w[f] === null ? null : Number(w[f])));
      if (bad.length) throw new Error(`span ${span} bucket ${k}: ${bad.map((f) => `${f} ${g[f]} ≠ ${w[f]}`).join(', ')}`);
    }
    buckets += want.size;
  }
  return buckets;
}

beforeAll(async () => {
  // the read cache off: these checks tamper with the rollups directly and read them back at once
  stack = await startStack({ worker: false, mailSink: false, env: { READ_CACHE_MS: '0' } });
  planner = createClient(stack.baseUrl);
  await planner.signIn(ROLE_EMAIL.planner, DEMO_PASSWORD);
  ns = (await stack.pool.query(`select id from mode_tracks where code = 'north-south'`)).rows[0].id;
  // three days in bulk (triggers off, the day's rollups rebuilt in its transaction)
  const s = await fillEstimates(stack.pool, { days: 3, endDay: END_DAY - DAY, seed: 11 });
  expect(s.days).toBe(3);
  expect(s.windows).toBe(3 * 1440);
}, 180_000);

afterAll(async () => {
  await stack?.stop();
});

describe('estimate rollups', () => {
  it('equal the direct aggregates of the estimates at every span after a bulk fill', async () => {
    const n = await expectRollupsMatch();
    // 3 tracks × (3 days of 10-minute buckets + hours + days), give or take the edges
    expect(n).toBeGreaterThan(3 * 3 * (144 + 24));
  });

  it('follow inserts made with the triggers on (the way a scan stores its windows)', async () => {
    const s = await fillEstimates(stack.pool, { days: 1, endDay: END_DAY, seed: 11, bulk: false, alerts: false });
    expect(s.days).toBe(1);
    expect(s.bulk).toBe(false);
    await expectRollupsMatch();
  });

  it('follow a deleted recording (cascade to its estimates) and updated estimates', async () => {
    const before = (await stack.pool.query(`select count(*)::int as n from estimate_rollups where span_seconds = 86400`)).rows[0].n;
    const rec = (await stack.pool.query(`select id from recordings order by start_time limit 1 offset 1`)).rows[0].id;
    await stack.pool.query('delete from recordings where id = $1', [rec]);
    await expectRollupsMatch();
    expect((await stack.pool.query(`select count(*)::int as n from estimate_rollups where span_seconds = 86400`)).rows[0].n).toBeLessThan(before);
    // flag a stretch as forced, and move some estimates to another track
    await stack.pool.query(`update mode_estimates set forced = true where track_id = $1 and at >= to_timestamp($2) and at < to_timestamp($2 + 5400)`, [ns, END_DAY - DAY + 3600]);
    await stack.pool.query(
      `update mode_estimates set track_id = (select id from mode_tracks where code = 'greyscar') where track_id = $1 and at >= to_timestamp($2) and at < to_timestamp($2 + 1800)`,
      [ns, END_DAY - DAY + 7 * 3600],
    );
    await expectRollupsMatch();
  });

  it('are rebuilt exactly by estimate_rollups_rebuild()', async () => {
    await stack.pool.query(`update estimate_rollups set damping_min = -1, count = count + 5 where span_seconds = 3600`);
    await stack.pool.query(`select estimate_rollups_rebuild(to_timestamp($1), to_timestamp($2))`, [END_DAY - 4 * DAY, END_DAY]);
    await expectRollupsMatch();
  });
});

describe('Trends over a long span', () => {
  /** Buckets of one track from the estimates alone (the definition the endpoint documents). */
  async function directBuckets(from: number, to: number, b: number, naturalOnly: boolean) {
    const r = await stack.pool.query(
      `select (floor(extract(epoch from at) / $4) * $4)::bigint as b, count(*)::int as count,
              min(damping_percent) filter (where not forced) as dmin, avg(damping_percent) filter (where not forced) as dmean,
              max(damping_percent) filter (where not forced) as dmax, avg(damping_lo) filter (where not forced) as lo,
              avg(damping_hi) filter (where not forced) as hi, avg(frequency_hz) as f, (count(*) filter (where forced))::int as forced
         from mode_estimates
        where track_id = $1 and at >= to_timestamp($2) and at <= to_timestamp($3) and ($5::boolean is false or not forced)
        group by 1 order by 1`,
      [ns, from, to, b, naturalOnly],
    );
    return r.rows;
  }

  async function trends(from: number, to: number, maxPoints: number, naturalOnly = false) {
    const q = `from=${new Date(from * 1000).toISOString()}&to=${new Date(to * 1000).toISOString()}&maxPoints=${maxPoints}&naturalOnly=${naturalOnly}`;
    const r = await planner.get(`/api/tracks/north-south/estimates?${q}`);
    expect(r.status).toBe(200);
    return r.body;
  }

  it('answers with the same buckets as the estimates give, edges included', async () => {
    // odd edges: part of a 10-minute bucket at each end, whole hours and days in between
    const from = END_DAY - 3 * DAY + 7 * 60 + 13;
    const to = END_DAY - 2 * 3600 - 5 * 60 - 17;
    for (const [maxPoints, naturalOnly] of [[30, false], [100, true], [500, false]] as const) {
      const body = await trends(from, to, maxPoints, naturalOnly);
      expect(body.aggregated).toBe(true);
      const want = await directBuckets(from, to, body.bucketSeconds, naturalOnly);
      expect(body.total).toBe(want.reduce((s: number, w: { count: number }) => s + w.count, 0));
      expect(body.buckets.map((x: { start: string }) => Date.parse(x.start) / 1000)).toEqual(want.map((w) => Number(w.b)));
      body.buckets.forEach((g: Record<string, number | null>, i: number) => {
        const w = want[i];
        expect(g.count).toBe(w.count);
        expect(g.forcedCount).toBe(w.forced);
        for (const [k, ref] of [['dampingMin', w.dmin], ['dampingMean', w.dmean], ['dampingMax', w.dmax], ['dampingLoMean', w.lo], ['dampingHiMean', w.hi], ['frequencyMean', w.f]] as const) {
          if (!close(g[k], ref === null ? null : Number(ref))) throw new Error(`bucket ${g.start} ${k}: ${g[k]} ≠ ${ref}`);
        }
      });
    }
  });

  it('reads whole buckets from the rollups, not from the estimates', async () => {
    const from = END_DAY - 3 * DAY;
    const to = END_DAY;
    const hour = END_DAY - 2 * DAY + 5 * 3600;
    const clean = await trends(from, to, 30); // 3 days / 30 → 3-hour buckets, built from hourly rollups
    expect(clean.bucketSeconds).toBe(10_800);
    const mark = -42;
    await stack.pool.query(`update estimate_rollups set damping_min = $1 where track_id = $2 and span_seconds = 3600 and start = to_timestamp($3)`, [mark, ns, hour]);
    try {
      const tampered = await trends(from, to, 30);
      const hit = tampered.buckets.filter((b: { dampingMin: number }) => b.dampingMin === mark);
      expect(hit).toHaveLength(1);
      expect(Date.parse(hit[0].start) / 1000).toBe(Math.floor(hour / 10_800) * 10_800);
      // a day at 5-minute buckets (no rollup span divides 300 s) comes from the estimates
      const day = await trends(END_DAY - 2 * DAY, END_DAY - DAY, 700);
      expect(day.bucketSeconds).toBe(300);
      expect(day.buckets.some((b: { dampingMin: number }) => b.dampingMin === mark)).toBe(false);
    } finally {
      await stack.pool.query(`select estimate_rollups_rebuild(to_timestamp($1), to_timestamp($1))`, [hour]);
    }
    // rebuilt: the same buckets again (sums added in another order may differ in the last bits)
    const again = await trends(from, to, 30);
    expect(again.buckets.map((b: { start: string; count: number }) => [b.start, b.count])).toEqual(clean.buckets.map((b: { start: string; count: number }) => [b.start, b.count]));
    again.buckets.forEach((b: Record<string, number | null>, i: number) => {
      for (const k of ['dampingMin', 'dampingMean', 'dampingMax', 'dampingLoMean', 'dampingHiMean', 'frequencyMean'] as const) {
        if (!close(b[k], clean.buckets[i][k])) throw new Error(`bucket ${b.start} ${k} after the rebuild: ${b[k]} ≠ ${clean.buckets[i][k]}`);
      }
    });
  });
});
