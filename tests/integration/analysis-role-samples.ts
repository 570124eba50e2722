// Sample requests for the analysis endpoints (shared/api/analysis-endpoints.ts), in the shape of
// the table-driven role test (tests/integration/roles.test.ts): each returns the params, query and
// body of a request that succeeds for a role allowed to make it. Rows are made straight in the
// test database. Spread into that test's SAMPLES: `...ANALYSIS_ROLE_SAMPLES`.
//
// GET /api/events answers an endless text/event-stream: a client must read the headers only
// (status 200) and then abort, rather than wait for the body.
import type { Stack } from '../helpers/stack';
import type { ANALYSIS_ENDPOINTS } from '../../shared/api/analysis-endpoints';

interface Sample {
  params?: Record<string, string | number>;
  query?: string;
  body?: unknown;
  ownClient?: boolean;
}
type SampleFn = (s: Stack, caller: string) => Promise<Sample>;

const T0 = Date.UTC(2025, 0, 2, 0, 0, 0) / 1000;
const iso = (t: number) => new Date(t * 1000).toISOString();

/** A ready 20-minute recording of two channels (no samples: jobs on it fail, requests succeed). */
async function readyRecording(s: Stack): Promise<number> {
  const r = await s.pool.query(
    `insert into recordings (file_name, checksum, format, size_bytes, start_time, end_time, rate, channel_count, sample_count, status, quality)
     values ('roles.csv', md5(random()::text) || md5(random()::text), 'csv', 1, $1, $2, 30, 2, 36000, 'ready', $3) returning id`,
    [iso(T0), iso(T0 + 1199.9667), JSON.stringify({ chunkSize: 3600, startEpoch: T0, rows: 36000, duplicates: 0, gaps: 0, missingFrames: 0 })],
  );
  const id = r.rows[0].id as number;
  await s.pool.query(
    `insert into recording_channels (recording_id, channel_id, source_name, column_index)
     select $1, c.id, c.name, row_number() over (order by c.name) from channels c where c.name in ('moorgate.angle', 'saltreach-bay.angle')`,
    [id],
  );
  return id;
}

async function analysis(s: Stack, kind: 'scan' | 'fit'): Promise<number> {
  const rec = await readyRecording(s);
  const settings = kind === 'fit' ? { from: iso(T0 + 10), to: iso(T0 + 30), order: 'auto' } : { windowSeconds: 1200, stepSeconds: 60 };
  const r = await s.pool.query(`insert into analyses (kind, recording_id, settings, status, progress) values ($1, $2, $3, 'done', 1) returning id`, [
    kind,
    rec,
    JSON.stringify(settings),
  ]);
  return r.rows[0].id as number;
}

async function estimate(s: Stack): Promise<number> {
  const a = await analysis(s, 'scan');
  const w = await s.pool.query(`insert into scan_windows (analysis_id, start_time, end_time) values ($1, $2, $3) returning id`, [a, iso(T0), iso(T0 + 1200)]);
  const e = await s.pool.query(
    `insert into mode_estimates (window_id, track_id, at, frequency_hz, damping_percent, damping_lo, damping_hi, method)
     select $1, t.id, $2, 0.33, 6.0, 5.0, 7.0, 'yule-walker' from mode_tracks t where t.code = 'north-south' returning id`,
    [w.rows[0].id, iso(T0 + 1200)],
  );
  return e.rows[0].id as number;
}

async function openAlert(s: Stack): Promise<number> {
  const r = await s.pool.query(
    `insert into alerts (track_id, kind, state, opened_at, worst_damping)
     select t.id, 'poor', 'open', $1, 2.1 from mode_tracks t where t.code = 'north-south' returning id`,
    [iso(T0 + Math.floor(Math.random() * 1e6))],
  );
  return r.rows[0].id as number;
}

/** A study over a period without data, as the server computes it. */
function emptyStudy() {
  const none = 'A regression line needs at least 3 points (got 0)';
  return {
    track: { code: 'north-south', name: 'North–south', poorBelow: 3, lowBelow: 5 },
    corridor: { code: 'highmoor-saltreach', name: 'Highmoor–Saltreach' },
    from: iso(T0 - 3600),
    to: iso(T0 + 86_400),
    method: 'ols-fieller',
    confidenceLevel: 0.95,
    points: [],
    pointsTotal: 0,
    pointsShown: 0,
    pointsSampled: false,
    pointsUsed: 0,
    pointsForced: 0,
    nEffective: 0,
    damping: { fit: null, line: [], projections: [], note: none },
    angle: { fit: null, line: [], limitDeg: 45, atLimit: null, note: none },
    caution: 'Advisory.',
  };
}

const STUDY_QUERY = `track=north-south&from=${iso(T0 - 3600)}&to=${iso(T0 + 86_400)}`;

export const ANALYSIS_ROLE_SAMPLES: Record<keyof typeof ANALYSIS_ENDPOINTS, SampleFn> = {
  'scans.create': async (s) => ({ params: { id: await readyRecording(s) }, body: { settings: {} } }),
  'fits.create': async (s) => ({ params: { id: await readyRecording(s) }, body: { from: iso(T0 + 10), to: iso(T0 + 30) } }),
  'analyses.list': async () => ({ query: 'limit=5' }),
  'scans.get': async (s) => ({ params: { id: await analysis(s, 'scan') } }),
  'fits.csv': async (s) => ({ params: { id: await analysis(s, 'fit') } }),
  'fits.get': async (s) => ({ params: { id: await analysis(s, 'fit') } }),
  'watch.get': async () => ({}),
  'estimates.csv': async () => ({ params: { code: 'north-south' } }),
  'estimates.list': async () => ({ params: { code: 'north-south' }, query: 'maxPoints=100' }),
  'estimates.get': async (s) => ({ params: { id: await estimate(s) } }),
  'alerts.list': async () => ({ query: 'state=open' }),
  'alerts.get': async (s) => ({ params: { id: await openAlert(s) } }),
  'alerts.acknowledge': async (s) => ({ params: { id: await openAlert(s) }, body: { note: 'Seen; following the procedure.' } }),
  'studies.transferCsv': async () => ({ query: STUDY_QUERY }),
  'studies.transfer': async () => ({ query: STUDY_QUERY }),
  'studies.save': async () => ({ body: { name: 'Role check', track: 'north-south', from: iso(T0 - 3600), to: iso(T0 + 86_400) } }),
  'studies.list': async () => ({}),
  'studies.get': async (s) => {
    const r = await s.pool.query(
      `insert into transfer_studies (name, track_id, period_from, period_to, result)
       select 'Role check', t.id, $1, $2, $3::jsonb from mode_tracks t where t.code = 'north-south' returning id`,
      [iso(T0 - 3600), iso(T0 + 86_400), JSON.stringify(emptyStudy())],
    );
    return { params: { id: r.rows[0].id as number } };
  },
  'events.stream': async () => ({}),
};
