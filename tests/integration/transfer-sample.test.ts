// The transfer study at more windows than its answer may carry: three days of generated scan
// results (scripts/bench/fill-year.ts, the year benchmark's generator; ~4 300 north–south windows),
// some of them marked forced and a stretch re-scanned by a newer analysis. The answer's points are
// a bounded display sample, while its counts and every fitted figure come from ALL windows: they
// must equal a direct SQL count and the regression (server/studies/regression.ts) run on every row
// read here with plain SQL written independently of the study's loader. The CSV export streams
// every window (RFC 4180, read back with csv-parse: library). A saved study stores the sampled
// answer; one saved before answers were sampled (every window, no counts) is sampled on reading.
import { parse } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { fillEstimates } from '../../scripts/bench/fill-year';
import { fitLine, inversePrediction, type LineFit } from '../../server/studies/regression';
import { effectiveSampleSize, type StudyPoint } from '../../server/studies/transfer';
import { savedStudyResponseSchema, STUDY_CSV_COLUMNS, STUDY_MAX_POINTS, transferStudyResponseSchema } from '../../shared/api/studies';
import { createClient, type Client } from '../helpers/http';
import { DEMO_PASSWORD, ROLE_EMAIL } from '../helpers/fixtures';
import { startStack, type Stack } from '../helpers/stack';

const DAY = 86_400;
/** Midnight UTC after the last filled day (2025-03-13). */
const END_DAY = Date.UTC(2025, 2, 13) / 1000;
const FROM = new Date((END_DAY - 3 * DAY) * 1000).toISOString();
const TO = new Date(END_DAY * 1000).toISOString();
const CORRIDOR = 'highmoor-saltreach';
const QUERY = `track=north-south&from=${encodeURIComponent(FROM)}&to=${encodeURIComponent(TO)}`;

let stack: Stack;
let planner: Client;
let operator: Client;
let ns: number;

interface Row {
  analysis_id: number;
  start_ms: number;
  end_ms: number;
  damping_percent: number;
  damping_lo: number | null;
  damping_hi: number | null;
  forced: boolean;
  transfer: number;
  angle: number | null;
}

/**
 * Every window of the study, read directly: the north–south estimates of windows inside the
 * period with a Highmoor–Saltreach transfer, and where two analyses scanned the same window start,
 * only the newer analysis's estimate.
 */
async function allWindows(): Promise<Row[]> {
  const r = await stack.pool.query<Row>(
    `select w.analysis_id, (extract(epoch from w.start_time) * 1000)::float8 as start_ms, (extract(epoch from w.end_time) * 1000)::float8 as end_ms,
            e.damping_percent, e.damping_lo, e.damping_hi, e.forced,
            (w.transfer_mw ->> $2)::float8 as transfer, (w.angle_deg ->> $2)::float8 as angle
       from mode_estimates e join scan_windows w on w.id = e.window_id
      where e.track_id = $1 and w.start_time >= $3 and w.end_time <= $4 and w.transfer_mw ? $2
        and not exists (select 1 from scan_windows w2 join mode_estimates e2 on e2.window_id = w2.id
                         where e2.track_id = $1 and w2.start_time = w.start_time and w2.analysis_id > w.analysis_id)
      order by w.start_time`,
    [ns, CORRIDOR, FROM, TO],
  );
  return r.rows;
}

async function sqlCount(extra = 'true'): Promise<number> {
  const r = await stack.pool.query(
    `select count(distinct w.start_time)::int as n from mode_estimates e join scan_windows w on w.id = e.window_id
      where e.track_id = $1 and w.start_time >= $3 and w.end_time <= $4 and w.transfer_mw ? $2 and ${extra}`,
    [ns, CORRIDOR, FROM, TO],
  );
  return r.rows[0].n;
}

/** The reference fits: fitLine on every natural window, as the study's method states it. */
function referenceFits(rows: Row[]) {
  const pts: StudyPoint[] = rows
    .filter((r) => !r.forced)
    .map((r) => ({ analysisId: r.analysis_id, windowStart: r.start_ms / 1000, windowSeconds: (r.end_ms - r.start_ms) / 1000, dampingPercent: r.damping_percent, transferMw: r.transfer, angleDeg: r.angle, forced: false }));
  const nEff = effectiveSampleSize(pts);
  const damping = fitLine(pts.map((p) => ({ x: p.transferMw, y: p.dampingPercent })), { nEffective: nEff });
  const withAngle = pts.filter((p) => p.angleDeg !== null);
  const angle = fitLine(withAngle.map((p) => ({ x: p.transferMw, y: p.angleDeg! })), { nEffective: effectiveSampleSize(withAngle) });
  return { nEff, damping, angle, used: pts.length };
}

function expectSameFit(got: Record<string, number>, want: LineFit) {
  for (const k of ['n', 'nEffective', 'intercept', 'slope', 'interceptSe', 'slopeSe', 'residualSd', 'r2', 'confidenceLevel'] as const) {
    expect(got[k], k).toBe(want[k]);
  }
}

beforeAll(async () => {
  stack = await startStack({ worker: false, mailSink: false });
  planner = createClient(stack.baseUrl);
  await planner.signIn(ROLE_EMAIL.planner, DEMO_PASSWORD);
  operator = createClient(stack.baseUrl);
  await operator.signIn(ROLE_EMAIL.operator, DEMO_PASSWORD);
  ns = (await stack.pool.query(`select id from mode_tracks where code = 'north-south'`)).rows[0].id;
  const s = await fillEstimates(stack.pool, { days: 3, endDay: END_DAY, seed: 21, alerts: false });
  expect(s.days).toBe(3);
  // some forced windows for the counts to count (the generator puts none on north–south)
  await stack.pool.query(`update mode_estimates set forced = true where track_id = $1 and id % 37 = 0`, [ns]);
  // a newer analysis re-scanning three hours of day 2: its estimates (1 % higher) replace the older ones
  await stack.pool.query(
    `with a as (
       insert into analyses (kind, recording_id, method, settings, status, progress)
       select kind, recording_id, method, settings, 'done', 1 from analyses where kind = 'scan' order by id limit 1 returning id),
     w as (
       insert into scan_windows (analysis_id, start_time, end_time, quality, transfer_mw, angle_deg)
       select a.id, w.start_time, w.end_time, w.quality, w.transfer_mw, w.angle_deg
         from a, scan_windows w
        where w.start_time >= $2 and w.start_time < $2::timestamptz + interval '3 hours'
       returning id, start_time)
     insert into mode_estimates (window_id, track_id, at, frequency_hz, damping_percent, damping_lo, damping_hi, method, forced)
     select w.id, e.track_id, e.at, e.frequency_hz, e.damping_percent + 1, e.damping_lo + 1, e.damping_hi + 1, e.method, false
       from w join scan_windows old on old.start_time = w.start_time and old.id <> w.id
       join mode_estimates e on e.window_id = old.id and e.track_id = $1`,
    [ns, new Date((END_DAY - 2 * DAY + 6 * 3600) * 1000).toISOString()],
  );
}, 180_000);

afterAll(async () => {
  await stack?.stop();
});

describe('GET /api/studies/transfer over more windows than the answer carries', () => {
  it('sends a bounded sample and counts and fits every window', async () => {
    const rows = await allWindows();
    const total = await sqlCount();
    expect(rows.length).toBe(total);
    expect(total).toBeGreaterThan(2 * STUDY_MAX_POINTS);
    const forced = await sqlCount('e.forced and not exists (select 1 from scan_windows w2 where w2.start_time = w.start_time and w2.analysis_id > w.analysis_id)');
    expect(forced).toBe(rows.filter((r) => r.forced).length);
    expect(forced).toBeGreaterThan(50);

    const r = await planner.get(`/api/studies/transfer?${QUERY}`);
    expect(r.status).toBe(200);
    expect(transferStudyResponseSchema.safeParse(r.body).success).toBe(true);
    const s = r.body.study;
    const bytes = Buffer.byteLength(JSON.stringify(r.body));
    const allPointsBytes = bytes + Buffer.byteLength(JSON.stringify(rows.map(apiPoint))) - Buffer.byteLength(JSON.stringify(s.points));
    console.log(`[transfer-sample] ${total} windows: answer ${(bytes / 1024).toFixed(0)} kB with ${s.points.length} points; every window as points would be ${(allPointsBytes / 1024).toFixed(0)} kB`);

    expect(s.points.length).toBeLessThanOrEqual(STUDY_MAX_POINTS);
    expect(s.points.length).toBe(STUDY_MAX_POINTS);
    expect(s.pointsShown).toBe(s.points.length);
    expect(s.pointsTotal).toBe(total);
    expect(s.pointsSampled).toBe(true);
    expect(s.pointsForced).toBe(forced);
    expect(s.pointsUsed).toBe(total - forced);

    // the fits over every window, to the bit
    const ref = referenceFits(rows);
    expect(s.nEffective).toBe(ref.nEff);
    expectSameFit(s.damping.fit, ref.damping);
    expectSameFit(s.angle.fit, ref.angle);
    const [low, poor] = s.damping.projections;
    expect(low).toEqual({ ...inversePrediction(ref.damping, 5), threshold: 'low' });
    expect(poor).toEqual({ ...inversePrediction(ref.damping, 3), threshold: 'poor' });
    expect(s.angle.atLimit).toEqual(inversePrediction(ref.angle, 45));

    // each drawn point is its window exactly as stored (the newer analysis's where re-scanned), in time order
    const byStart = new Map(rows.map((x) => [new Date(x.start_ms).toISOString(), x]));
    let prev = '';
    for (const p of s.points) {
      expect(p.start > prev).toBe(true);
      prev = p.start;
      expect(p).toEqual(apiPoint(byStart.get(p.start)!));
    }
    // the lowest-damped natural window of the period is drawn
    const lowest = rows.filter((x) => !x.forced).reduce((a, b) => (b.damping_percent < a.damping_percent ? b : a));
    expect(s.points.map((p: { start: string }) => p.start)).toContain(new Date(lowest.start_ms).toISOString());
  });

  it('sends every window, as before, when the period holds at most the maximum', async () => {
    const to = new Date((END_DAY - DAY) * 1000).toISOString();
    const from = new Date((END_DAY - DAY - 12 * 3600) * 1000).toISOString();
    const r = await planner.get(`/api/studies/transfer?track=north-south&from=${from}&to=${to}`);
    expect(r.status).toBe(200);
    const n = (
      await stack.pool.query(
        `select count(distinct w.start_time)::int as n from mode_estimates e join scan_windows w on w.id = e.window_id
          where e.track_id = $1 and w.start_time >= $2 and w.end_time <= $3 and w.transfer_mw ? 'highmoor-saltreach'`,
        [ns, from, to],
      )
    ).rows[0].n;
    expect(n).toBeGreaterThan(600);
    expect(n).toBeLessThanOrEqual(STUDY_MAX_POINTS);
    expect(r.body.study.pointsTotal).toBe(n);
    expect(r.body.study.points).toHaveLength(n);
    expect(r.body.study.pointsSampled).toBe(false);
  });
});

function apiPoint(x: Row) {
  return {
    analysisId: x.analysis_id,
    start: new Date(x.start_ms).toISOString(),
    end: new Date(x.end_ms).toISOString(),
    transferMw: x.transfer,
    dampingPercent: x.damping_percent,
    dampingLo: x.damping_lo,
    dampingHi: x.damping_hi,
    angleDeg: x.angle,
    forced: x.forced,
  };
}

describe('GET /api/studies/transfer.csv', () => {
  it('streams every window of the period with a header row', async () => {
    const rows = await allWindows();
    const res = await fetch(`${stack.baseUrl}/api/studies/transfer.csv?${QUERY}`, { headers: { Cookie: planner.cookieHeader() } });
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toContain('text/csv');
    expect(res.headers.get('content-disposition')).toBe(`attachment; filename="keel-transfer-north-south-${CORRIDOR}-${FROM.slice(0, 10)}-${TO.slice(0, 10)}.csv"`);
    const text = await res.text();
    const lines = parse(text) as string[][];
    expect(lines[0]).toEqual([...STUDY_CSV_COLUMNS]);
    const body = lines.slice(1);
    expect(body.length).toBe(await sqlCount());
    expect(body.length).toBe(rows.length);
    const num = (v: string) => (v === '' ? null : Number(v));
    body.forEach((f, i) => {
      const x = rows[i];
      expect(f).toHaveLength(STUDY_CSV_COLUMNS.length);
      expect([f[0], f[1], num(f[2]), num(f[3]), num(f[4]), num(f[5]), num(f[6]), f[7], num(f[8])]).toEqual([
        new Date(x.start_ms).toISOString(),
        new Date(x.end_ms).toISOString(),
        x.transfer,
        x.damping_percent,
        x.damping_lo,
        x.damping_hi,
        x.angle,
        String(x.forced),
        x.analysis_id,
      ]);
    });
  });

  it('has the access rule of running a study and checks its query', async () => {
    const op = await fetch(`${stack.baseUrl}/api/studies/transfer.csv?${QUERY}`, { headers: { Cookie: operator.cookieHeader() } });
    expect(op.status).toBe(403);
    expect(((await op.json()) as { error: { code: string } }).error.code).toBe('FORBIDDEN');
    expect((await fetch(`${stack.baseUrl}/api/studies/transfer.csv?${QUERY}`)).status).toBe(401);
    const unknown = await planner.get(`/api/studies/transfer.csv?track=nowhere&from=${FROM}&to=${TO}`);
    expect(unknown.status).toBe(404);
    expect(unknown.body.error.message).toBe('No mode track with code "nowhere"');
    const backwards = await planner.get(`/api/studies/transfer.csv?track=north-south&from=${TO}&to=${FROM}`);
    expect(backwards.status).toBe(400);
    expect(JSON.stringify(backwards.body.error)).toContain('from must be before to');
  });
});

describe('saved studies', () => {
  it('stores the sampled answer: small, and the same as the study', async () => {
    const r = await planner.post('/api/studies', { name: 'North–south, three March days', track: 'north-south', from: FROM, to: TO });
    expect(r.status).toBe(201);
    const live = (await planner.get(`/api/studies/transfer?${QUERY}`)).body.study;
    expect(r.body.saved.result).toEqual(live);
    const stored = await stack.pool.query(`select result, length(result::text) as chars from transfer_studies where id = $1`, [r.body.saved.id]);
    expect(stored.rows[0].result.points).toHaveLength(STUDY_MAX_POINTS);
    expect(stored.rows[0].result.pointsTotal).toBe(await sqlCount());
    console.log(`[transfer-sample] saved study: ${(stored.rows[0].chars / 1024).toFixed(0)} kB of JSON for ${live.pointsTotal} windows`);
    const one = await operator.get(`/api/studies/${r.body.saved.id}`);
    expect(one.status).toBe(200);
    expect(one.body.saved.result).toEqual(live);
    const list = await operator.get('/api/studies');
    const item = list.body.studies.find((x: { id: number }) => x.id === r.body.saved.id);
    expect(item.poorAtMw).toBe(live.damping.projections[1].x);
    expect(item.lowAtMw).toBe(live.damping.projections[0].x);
  });

  it('samples a study saved with every window (and no counts) on reading, leaving the row as it is', async () => {
    const rows = await allWindows();
    const live = (await planner.get(`/api/studies/transfer?${QUERY}`)).body.study;
    const { pointsTotal: _t, pointsShown: _s, pointsSampled: _p, ...old } = { ...live, points: rows.map(apiPoint) };
    const ins = await stack.pool.query(
      `insert into transfer_studies (name, track_id, period_from, period_to, result) values ('Saved the old way', $1, $2, $3, $4::jsonb) returning id`,
      [ns, FROM, TO, JSON.stringify(old)],
    );
    const id = ins.rows[0].id as number;
    const one = await operator.get(`/api/studies/${id}`);
    expect(one.status).toBe(200);
    expect(savedStudyResponseSchema.safeParse(one.body).success).toBe(true);
    const res = one.body.saved.result;
    expect(res.pointsTotal).toBe(rows.length);
    expect(res.points).toHaveLength(STUDY_MAX_POINTS);
    expect(res.pointsShown).toBe(STUDY_MAX_POINTS);
    expect(res.pointsSampled).toBe(true);
    // the same sample the live study draws from the same windows
    expect(res.points).toEqual(live.points);
    const list = await operator.get('/api/studies');
    expect(list.body.studies.find((x: { id: number }) => x.id === id).poorAtMw).toBe(live.damping.projections[1].x);
    const kept = await stack.pool.query(`select jsonb_array_length(result -> 'points') as n from transfer_studies where id = $1`, [id]);
    expect(kept.rows[0].n).toBe(rows.length);
  });
});
