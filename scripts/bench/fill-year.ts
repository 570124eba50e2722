// Fills a Keel database with synthetic scan results at production size: by default a YEAR of
// 20-minute windows every minute (525 600 windows) for the three Tarrow tracks — about 1.6 million
// mode estimates, each with its mode shape over the 11 analysed channels of the lighter channel set
// (~17 million shape rows) — with the corridors' transfer and angle on every window, and the
// alerts the product's own rule raises on them (server/alerts/evaluate.ts, run after each day as
// the scan job would).
//
//   DATABASE_URL=… npx tsx scripts/bench/fill-year.ts [--days 365] [--end 2026-01-01] [--seed 1]
//                                                     [--no-alerts] [--no-bulk]
//
// Reused by tests and benchmarks through fillEstimates(pool, { days: 3, … }). The database must be
// migrated and seeded (the Tarrow network and tracks). Days already filled with the same seed are
// skipped, so an interrupted fill resumes.
//
// The numbers are invented for load, but shaped like the real thing: one continuous stream of
// windows cut into day recordings (each recording's windows END inside its day, so the first one
// starts 19 minutes before midnight); the Highmoor–Saltreach transfer follows the simulator's
// daily shape with a peak that varies by season and by day; each track's true frequency and damping
// come from the simulator's eigenvalues at the window's mean transfer (so the north–south mode
// falls under 3 % on the heaviest afternoons and the transfer study finds the calibrated crossing);
// estimates scatter around them with the correlation of overlapping windows; data gaps skip
// windows; a forced oscillation at 0.70 Hz in the east–west band shows up a few times a month; an
// untracked local mode appears now and then. No sample data is stored (the recordings say so in
// their quality field): only what the Watch, Trends, Alerts and transfer-study screens read.
//
// Speed: one SQL statement per day inserts the recording, its scan analysis, the windows, the
// estimates and the shapes (INSERT … SELECT FROM unnest($n::…[]) with data-modifying CTEs; the
// shapes are expanded in SQL from one base shape per mode). In bulk mode (the default, when the
// role is a superuser) the day's transaction runs with session_replication_role = replica, which
// skips the per-row foreign-key triggers (the rows are consistent by construction) and the rollup
// triggers — so the day's rollups are rebuilt in the same transaction by estimate_rollups_rebuild()
// when the schema has them.
import crypto from 'node:crypto';
import os from 'node:os';
import { parseArgs } from 'node:util';
import pg from 'pg';
import { createDb } from '../../db/client';
import { TARROW_ANGLE_REFERENCE, TARROW_CHANNELS } from '../../fixtures/tarrow-network';
import { DEFAULT_AMBIENT_OPTIONS } from '../../modal/ambient-options';
import { buildTarrowModel, dailyTransferMw, modeOutputShape, trackMode, type TarrowModel, type TrueMode } from '../../modal/simulator';
import { evaluateTrackAlerts } from '../../server/alerts/evaluate';

const DAY = 86_400;

export interface FillOptions {
  /** Days to fill (default 365). */
  days?: number;
  /** Midnight UTC (epoch s) at which the last day ends (default: today's midnight). */
  endDay?: number;
  /** Random seed (default 1). Different seeds fill different recordings. */
  seed?: number;
  /** Scan step and window, s (defaults 60 and 1200: the scan defaults). */
  stepSeconds?: number;
  windowSeconds?: number;
  /** Run the alert rule after each day, as the scan job does (default true). */
  alerts?: boolean;
  /** Skip per-row FK and rollup triggers and rebuild the day's rollups instead (default true; needs a superuser). */
  bulk?: boolean;
  log?: (line: string) => void;
}

export interface FillSummary {
  days: number;
  daysSkipped: number;
  windows: number;
  estimates: number;
  shapes: number;
  alerts: number;
  seconds: number;
  /** First window start and last window end (epoch s). */
  from: number;
  to: number;
  bulk: boolean;
}

// ---------------------------------------------------------------- deterministic randomness

/** mulberry32: a small, fast, seedable PRNG (common practice for reproducible test data). */
function prng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function gaussian(rnd: () => number): () => number {
  return () => {
    const u = 1 - rnd();
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * rnd());
  };
}

// ---------------------------------------------------------------- the physics lookup

const TRACKS = ['north-south', 'east-west', 'greyscar'] as const;
type TrackCode = (typeof TRACKS)[number];
/** Analysed channels of the lighter channel set (angles and corridor flows, without the angle reference). */
export const FILL_SHAPE_CHANNELS = TARROW_CHANNELS.filter((c) => (c.kind === 'angle' || c.kind === 'flow') && c.name !== TARROW_ANGLE_REFERENCE).map((c) => c.name);
const CORRIDORS = [
  { code: 'highmoor-saltreach', from: 'moorgate.angle', to: 'saltreach-bay.angle' },
  { code: 'eastfell-tie', from: 'eastfell-ridge.angle', to: 'tarrow-central.angle' },
] as const;

interface Physics {
  /** Per 50 MW from 0 to 3200: true frequency and damping of each track, corridor angles. */
  grid: { f: Record<TrackCode, number>; d: Record<TrackCode, number>; angle: [number, number] }[];
  shapes: Map<string, { channel: string; magnitude: number; angleDeg: number }[]>;
  local: { f: number; d: number };
}

const GRID_MW = 50;
const MAX_MW = 3200;

function groupShape(model: TarrowModel, mode: TrueMode): { channel: string; magnitude: number; angleDeg: number }[] {
  const s = modeOutputShape(model, mode, FILL_SHAPE_CHANNELS, { angleReference: TARROW_ANGLE_REFERENCE });
  // the estimator normalises magnitudes per unit group (name suffix): do the same
  const max = new Map<string, number>();
  for (const e of s) {
    const g = e.channel.slice(e.channel.lastIndexOf('.'));
    max.set(g, Math.max(max.get(g) ?? 0, e.magnitude));
  }
  return s.map((e) => ({ channel: e.channel, magnitude: e.magnitude / (max.get(e.channel.slice(e.channel.lastIndexOf('.'))) || 1), angleDeg: e.angleDeg }));
}

let physicsCache: Physics | null = null;
function physics(): Physics {
  if (physicsCache) return physicsCache;
  const grid: Physics['grid'] = [];
  for (let mw = 0; mw <= MAX_MW; mw += GRID_MW) {
    const m = buildTarrowModel(mw);
    const f = {} as Record<TrackCode, number>;
    const d = {} as Record<TrackCode, number>;
    for (const t of TRACKS) {
      const mode = trackMode(m, t);
      if (!mode) throw new Error(`the Tarrow model has no ${t} mode at ${mw} MW`);
      f[t] = mode.frequencyHz;
      d[t] = mode.dampingPercent;
    }
    const steady = (ch: string) => m.outputs.find((o) => o.channel === ch)!.steady;
    const angle = CORRIDORS.map((c) => steady(c.from) - steady(c.to)) as [number, number];
    grid.push({ f, d, angle });
  }
  const m = buildTarrowModel(2000);
  const shapes = new Map<string, { channel: string; magnitude: number; angleDeg: number }[]>();
  for (const t of TRACKS) shapes.set(t, groupShape(m, trackMode(m, t)!));
  const local = m.trueModes.find((x) => x.track === null && x.frequencyHz > 0.9) ?? m.trueModes.find((x) => x.track === null)!;
  shapes.set('local', groupShape(m, local));
  // a forced oscillation injected at Windlow: strongest there, weaker over the Eastfell area
  const near: Record<string, number> = { windlow: 1, cinderholt: 0.55, 'eastfell-ridge': 0.45 };
  shapes.set(
    'forced',
    FILL_SHAPE_CHANNELS.map((c) => {
      const site = c.slice(0, c.lastIndexOf('.'));
      return { channel: c, magnitude: c.endsWith('.mw') ? (site === 'eastfell-ridge' ? 1 : 0.2) : (near[site] ?? 0.12), angleDeg: near[site] ? 0 : 175 };
    }),
  );
  physicsCache = { grid, shapes, local: { f: local.frequencyHz, d: local.dampingPercent } };
  return physicsCache;
}

function lookup(mw: number): { f: Record<TrackCode, number>; d: Record<TrackCode, number>; angle: [number, number] } {
  const g = physics().grid;
  const x = Math.min(MAX_MW, Math.max(0, mw)) / GRID_MW;
  const i = Math.min(g.length - 2, Math.floor(x));
  const w = x - i;
  const lerp = (a: number, b: number) => a + (b - a) * w;
  const f = {} as Record<TrackCode, number>;
  const d = {} as Record<TrackCode, number>;
  for (const t of TRACKS) {
    f[t] = lerp(g[i].f[t], g[i + 1].f[t]);
    d[t] = lerp(g[i].d[t], g[i + 1].d[t]);
  }
  return { f, d, angle: [lerp(g[i].angle[0], g[i + 1].angle[0]), lerp(g[i].angle[1], g[i + 1].angle[1])] };
}

// ---------------------------------------------------------------- one day of windows and estimates

/** Per-track estimator scatter (damping %, frequency Hz) and how often the mode is not found. */
const SCATTER: Record<TrackCode, { d: number; f: number; missing: number; strength: [number, number] }> = {
  'north-south': { d: 0.55, f: 0.003, missing: 0.002, strength: [30, 80] },
  'east-west': { d: 0.75, f: 0.004, missing: 0.01, strength: [12, 40] },
  greyscar: { d: 1.1, f: 0.006, missing: 0.12, strength: [3.5, 8] },
};
/** Correlation of estimator errors between consecutive windows (19 of 20 minutes overlap). */
const RHO = 0.93;
/** Two-sided 90 % normal quantile (the scan's default confidence level). */
const Z90 = 1.6449;

interface DayArrays {
  k: number[];
  skipped: boolean[];
  t1: number[];
  t2: number[];
  a1: number[];
  a2: number[];
  // estimates
  ek: number[];
  track: number[];
  f: number[];
  d: number[];
  dlo: (number | null)[];
  dhi: (number | null)[];
  flo: (number | null)[];
  fhi: (number | null)[];
  amp: number[];
  forced: boolean[];
}

/** The generator's state across days: the minute transfer series and the estimator errors. */
class Stream {
  private readonly rnd: () => number;
  private readonly gauss: () => number;
  /** The last (window / step) minute transfers, for window means. */
  private history: { t1: number; t2: number }[] = [];
  private walk1 = 0;
  private walk2 = 0;
  private readonly err = new Map<TrackCode, { d: number; f: number }>();
  private gapLeft = 0;
  private forcedLeft = 0;
  private peak: number[] = [];
  private trough: number[] = [];

  constructor(
    seed: number,
    private readonly step: number,
    private readonly window: number,
    private readonly trackIds: Map<string, number>,
  ) {
    this.rnd = prng(seed);
    this.gauss = gaussian(this.rnd);
    for (const t of TRACKS) this.err.set(t, { d: 0, f: 0 });
  }

  /** Daily peak and trough of the Highmoor–Saltreach transfer, MW: higher in the northern summer. */
  private dayShape(dayStart: number): { peak: number; trough: number } {
    const doy = ((dayStart / DAY) % 365.25) + 1;
    const season = 0.5 + 0.5 * Math.cos((2 * Math.PI * (doy - 200)) / 365.25);
    const peak = Math.min(3150, Math.max(1600, 2150 + 480 * season + 230 * this.gauss()));
    const trough = Math.min(1200, Math.max(300, 800 + 150 * this.gauss()));
    return { peak, trough };
  }

  /** Highmoor–Saltreach and Eastfell tie transfer at minute `t` (epoch s), MW. */
  private minute(t: number, shape: { p0: number; p1: number; t0: number; t1: number }): { t1: number; t2: number } {
    const h = ((t % DAY) + DAY) % DAY / 3600;
    const p = shape.p0 + ((shape.p1 - shape.p0) * h) / 24;
    const tr = shape.t0 + ((shape.t1 - shape.t0) * h) / 24;
    // the simulator's daily shape (800..2700 MW) stretched to this day's trough and peak
    const unit = (dailyTransferMw(h) - 800) / 1900;
    this.walk1 = 0.97 * this.walk1 + 14 * this.gauss();
    this.walk2 = 0.98 * this.walk2 + 6 * this.gauss();
    const ns = Math.min(MAX_MW, Math.max(0, tr + (p - tr) * unit + this.walk1));
    const ef = 320 + 180 * Math.sin((2 * Math.PI * (h - 9)) / 24) + this.walk2;
    return { t1: ns, t2: ef };
  }

  day(dayStart: number): DayArrays {
    if (this.peak.length === 0) {
      const s = this.dayShape(dayStart - DAY);
      this.peak.push(s.peak);
      this.trough.push(s.trough);
    }
    const today = this.dayShape(dayStart);
    const shape = { p0: this.peak[0], p1: today.peak, t0: this.trough[0], t1: today.trough };
    this.peak = [today.peak];
    this.trough = [today.trough];
    const perWindow = Math.round(this.window / this.step);
    const n = Math.round(DAY / this.step);
    const out: DayArrays = { k: [], skipped: [], t1: [], t2: [], a1: [], a2: [], ek: [], track: [], f: [], d: [], dlo: [], dhi: [], flo: [], fhi: [], amp: [], forced: [] };
    if (this.history.length === 0) {
      // warm up: the minutes before the first window of the stream
      for (let j = perWindow; j > 0; j--) this.history.push(this.minute(dayStart - j * this.step, shape));
    }
    for (let k = 0; k < n; k++) {
      const end = dayStart + (k + 1) * this.step;
      this.history.push(this.minute(end - this.step, shape));
      if (this.history.length > perWindow) this.history.splice(0, this.history.length - perWindow);
      const t1 = this.history.reduce((s, x) => s + x.t1, 0) / this.history.length;
      const t2 = this.history.reduce((s, x) => s + x.t2, 0) / this.history.length;
      const phys = lookup(t1);
      out.k.push(k);
      out.t1.push(round(t1, 2));
      out.t2.push(round(t2, 2));
      out.a1.push(round(phys.angle[0] + 0.05 * this.gauss(), 3));
      out.a2.push(round(phys.angle[1] * (1 + t2 / 2000) + 0.05 * this.gauss(), 3));
      // data-quality gaps: a few an month, 2–40 windows long
      if (this.gapLeft === 0 && this.rnd() < 1 / 6000) this.gapLeft = 2 + Math.floor(this.rnd() * 38);
      const skipped = this.gapLeft > 0;
      if (skipped) this.gapLeft--;
      out.skipped.push(skipped);
      // a forced oscillation near 0.70 Hz (east–west band), a few episodes a month, 30 min–3 h
      if (this.forcedLeft === 0 && this.rnd() < 1 / 9000) this.forcedLeft = 30 + Math.floor(this.rnd() * 150);
      const forcedNow = this.forcedLeft > 0;
      if (forcedNow) this.forcedLeft--;
      for (const t of TRACKS) {
        const e = this.err.get(t)!;
        const sc = SCATTER[t];
        const s = Math.sqrt(1 - RHO * RHO);
        e.d = RHO * e.d + s * this.gauss();
        e.f = RHO * e.f + s * this.gauss();
        if (skipped || this.rnd() < sc.missing) continue;
        const d = phys.d[t] + sc.d * e.d;
        const f = phys.f[t] + sc.f * e.f;
        const half = Z90 * sc.d * (0.8 + 0.4 * this.rnd());
        const fHalf = Z90 * sc.f * (0.8 + 0.4 * this.rnd());
        this.push(out, k, this.trackIds.get(t)!, f, d, d - half, d + half, f - fHalf, f + fHalf, sc.strength[0] + (sc.strength[1] - sc.strength[0]) * this.rnd(), false);
      }
      if (skipped) continue;
      if (forcedNow) {
        const f = 0.7 + 0.0005 * this.gauss();
        const d = Math.abs(0.25 + 0.15 * this.gauss());
        this.push(out, k, this.trackIds.get('east-west')!, f, d, Math.max(0, d - 0.3), d + 0.3, f - 0.001, f + 0.001, 60 + 30 * this.rnd(), true);
      }
      if (this.rnd() < 0.2) {
        const l = physics().local;
        const d = l.d + 1.5 * this.gauss();
        const f = l.f + 0.01 * this.gauss();
        this.push(out, k, 0, f, d, d - 2.4, d + 2.4, f - 0.015, f + 0.015, 3 + 2 * this.rnd(), false);
      }
    }
    return out;
  }

  private push(o: DayArrays, k: number, track: number, f: number, d: number, dlo: number, dhi: number, flo: number, fhi: number, amp: number, forced: boolean) {
    o.ek.push(k);
    o.track.push(track);
    o.f.push(round(f, 5));
    o.d.push(round(d, 4));
    o.dlo.push(round(dlo, 4));
    o.dhi.push(round(dhi, 4));
    o.flo.push(round(flo, 5));
    o.fhi.push(round(fhi, 5));
    o.amp.push(round(amp, 3));
    o.forced.push(forced);
  }
}

function round(x: number, decimals: number): number {
  const p = 10 ** decimals;
  return Math.round(x * p) / p;
}

// ---------------------------------------------------------------- SQL

/**
 * One day in one statement: recording → scan analysis → windows → estimates → shapes. Windows are
 * matched to their estimates by start time; shapes by the estimate's kind (track, forced, or an
 * untracked mode) from the base shapes, with a little scatter drawn by random() (seeded per day).
 */
const DAY_SQL = `
with rec as (
  insert into recordings (file_name, checksum, format, size_bytes, start_time, end_time, rate, channel_count, sample_count, status, uploaded_at, quality)
  values ($1, $2, 'csv', null, to_timestamp($3::float8 - $4::float8 + $5::float8), to_timestamp($3::float8 + 86400), 30, $6::int, (86400 + $4::int - $5::int) * 30, 'ready',
          to_timestamp($3::float8 + 86400 + 600), $7::jsonb)
  returning id),
an as (
  insert into analyses (kind, recording_id, method, settings, status, progress, created_at, started_at, finished_at, timings)
  select 'scan', rec.id, $8, $9::jsonb, 'done', 1, to_timestamp($3::float8 + 86400 + 600), to_timestamp($3::float8 + 86400 + 600),
         to_timestamp($3::float8 + 86400 + 900), '{"synthetic": 1}'::jsonb
    from rec
  returning id),
w as (
  insert into scan_windows (analysis_id, start_time, end_time, quality, transfer_mw, angle_deg)
  select an.id, to_timestamp($3::float8 + (u.k + 1) * $5::float8 - $4::float8), to_timestamp($3::float8 + (u.k + 1) * $5::float8),
         case when u.skipped then '{"skipped": true, "reason": "too many missing samples", "channels": {}}'::jsonb
              else '{"skipped": false, "reason": null, "channels": {}}'::jsonb end,
         jsonb_build_object('highmoor-saltreach', u.t1, 'eastfell-tie', u.t2),
         jsonb_build_object('highmoor-saltreach', u.a1, 'eastfell-tie', u.a2)
    from an, unnest($10::int[], $11::bool[], $12::float8[], $13::float8[], $14::float8[], $15::float8[]) as u(k, skipped, t1, t2, a1, a2)
  returning id, end_time),
e as (
  insert into mode_estimates (window_id, track_id, at, frequency_hz, damping_percent, damping_lo, damping_hi, frequency_lo, frequency_hi, amplitude, method, forced)
  select w.id, nullif(v.track, 0), w.end_time, v.f, v.d, v.dlo, v.dhi, v.flo, v.fhi, v.amp, $8, v.forced
    from unnest($16::int[], $17::int[], $18::float8[], $19::float8[], $20::float8[], $21::float8[], $22::float8[], $23::float8[], $24::float8[], $25::bool[])
           as v(k, track, f, d, dlo, dhi, flo, fhi, amp, forced)
    join w on w.end_time = to_timestamp($3::float8 + (v.k + 1) * $5::float8)
  returning id, track_id, forced),
s as (
  insert into mode_shapes (estimate_id, channel_id, magnitude, angle_deg)
  select e.id, b.channel, least(1.0, greatest(0.0, b.mag * (1 + 0.06 * (random() + random() + random() - 1.5)))),
         b.ang + 8 * (random() + random() + random() - 1.5)
    from e join unnest($26::int[], $27::int[], $28::float8[], $29::float8[]) as b(kind, channel, mag, ang)
      on b.kind = case when e.forced then -1 else coalesce(e.track_id, 0) end
  returning 1)
select (select id from an) as analysis_id, (select count(*) from w)::int as windows, (select count(*) from e)::int as estimates,
       (select count(*) from s)::int as shapes`;

function checksumOf(seed: number, dayStart: number): string {
  return crypto.createHash('sha256').update(`keel-fill:${seed}:${dayStart}`).digest('hex');
}

export async function fillEstimates(pool: pg.Pool, opts: FillOptions = {}): Promise<FillSummary> {
  const days = opts.days ?? 365;
  const step = opts.stepSeconds ?? 60;
  const window = opts.windowSeconds ?? 1200;
  const seed = opts.seed ?? 1;
  const log = opts.log ?? (() => undefined);
  if (!Number.isInteger(days) || days < 1) throw new Error(`days must be a whole number ≥ 1 (got ${days})`);
  if (!(step > 0) || DAY % step !== 0) throw new Error(`stepSeconds must divide a day (got ${step})`);
  if (!(window >= step)) throw new Error(`windowSeconds must be at least stepSeconds (got ${window})`);
  const endDay = opts.endDay ?? Math.floor(Date.now() / 1000 / DAY) * DAY;
  if (endDay % DAY !== 0) throw new Error('endDay must be a midnight UTC (epoch seconds divisible by 86400)');
  const firstDay = endDay - days * DAY;
  const t0 = performance.now();

  const client = await pool.connect();
  const db = createDb(pool);
  const summary: FillSummary = { days: 0, daysSkipped: 0, windows: 0, estimates: 0, shapes: 0, alerts: 0, seconds: 0, from: firstDay - window + step, to: endDay, bulk: false };
  try {
    const tracks = (await client.query<{ id: number; code: string }>('select id, code from mode_tracks')).rows;
    const trackIds = new Map(tracks.map((t) => [t.code, t.id]));
    for (const t of TRACKS) if (!trackIds.has(t)) throw new Error(`mode track "${t}" is missing: seed the database first (npm run seed)`);
    const channels = new Map((await client.query<{ id: number; name: string }>('select id, name from channels')).rows.map((r) => [r.name, r.id]));
    for (const c of FILL_SHAPE_CHANNELS) if (!channels.has(c)) throw new Error(`channel "${c}" is missing: seed the database first (npm run seed)`);
    const superuser = (await client.query<{ s: string }>(`select current_setting('is_superuser') as s`)).rows[0].s === 'on';
    const hasRollups = (await client.query(`select 1 from pg_proc where proname = 'estimate_rollups_rebuild'`)).rows.length > 0;
    const bulk = (opts.bulk ?? true) && superuser;
    summary.bulk = bulk;
    if ((opts.bulk ?? true) && !superuser) log('fill: not a superuser; inserting with every trigger on (slower)');

    // base shapes: kind = track id, 0 for the untracked local mode, −1 for the forced oscillation
    const ph = physics();
    const base = { kind: [] as number[], channel: [] as number[], mag: [] as number[], ang: [] as number[] };
    const addShape = (kind: number, key: string) => {
      for (const s of ph.shapes.get(key)!) {
        base.kind.push(kind);
        base.channel.push(channels.get(s.channel)!);
        base.mag.push(round(s.magnitude, 4));
        base.ang.push(round(s.angleDeg, 2));
      }
    };
    for (const t of TRACKS) addShape(trackIds.get(t)!, t);
    addShape(0, 'local');
    addShape(-1, 'forced');

    const settings = JSON.stringify({ ...DEFAULT_AMBIENT_OPTIONS, stepSeconds: step, windowSeconds: window });
    const quality = JSON.stringify({ synthetic: 'scripts/bench/fill-year.ts', samplesStored: false, seed });
    const stream = new Stream(seed, step, window, trackIds);
    let lastLog = performance.now();
    for (let d = 0; d < days; d++) {
      const dayStart = firstDay + d * DAY;
      const arrays = stream.day(dayStart); // always drawn, so a resumed fill continues the same stream
      const checksum = checksumOf(seed, dayStart);
      const exists = await client.query('select 1 from recordings where checksum = $1', [checksum]);
      if (exists.rows.length > 0) {
        summary.daysSkipped++;
        continue;
      }
      await client.query('begin');
      let analysisId: number;
      try {
        if (bulk) await client.query(`set local session_replication_role = replica`);
        await client.query('set local max_parallel_workers_per_gather = 0');
        await client.query('select setseed($1)', [((seed * 7919 + d) % 100_000) / 100_000]);
        const name = `tarrow-fill-${new Date(dayStart * 1000).toISOString().slice(0, 10)}.csv`;
        const r = await client.query<{ analysis_id: number; windows: number; estimates: number; shapes: number }>(DAY_SQL, [
          name,
          checksum,
          dayStart,
          window,
          step,
          FILL_SHAPE_CHANNELS.length,
          quality,
          DEFAULT_AMBIENT_OPTIONS.method,
          settings,
          arrays.k,
          arrays.skipped,
          arrays.t1,
          arrays.t2,
          arrays.a1,
          arrays.a2,
          arrays.ek,
          arrays.track,
          arrays.f,
          arrays.d,
          arrays.dlo,
          arrays.dhi,
          arrays.flo,
          arrays.fhi,
          arrays.amp,
          arrays.forced,
          base.kind,
          base.channel,
          base.mag,
          base.ang,
        ]);
        const row = r.rows[0];
        analysisId = row.analysis_id;
        summary.windows += row.windows;
        summary.estimates += row.estimates;
        summary.shapes += row.shapes;
        if (bulk && hasRollups) {
          await client.query('select estimate_rollups_rebuild(to_timestamp($1::float8), to_timestamp($2::float8))', [dayStart, dayStart + DAY]);
        }
        await client.query('commit');
      } catch (err) {
        await client.query('rollback').catch(() => undefined);
        throw err;
      }
      summary.days++;
      if (opts.alerts ?? true) {
        // the evaluation job's work after this day's scan (one transaction and lock per track)
        const results = await Promise.all(TRACKS.map((t) => evaluateTrackAlerts(db, { trackId: trackIds.get(t)!, analysisId })));
        for (const transitions of results) summary.alerts += transitions.filter((x) => x.event === 'opened').length;
      }
      if (performance.now() - lastLog > 15_000 || d === days - 1) {
        lastLog = performance.now();
        const sec = (performance.now() - t0) / 1000;
        log(`fill: day ${d + 1}/${days} — ${summary.estimates.toLocaleString('en')} estimates, ${summary.shapes.toLocaleString('en')} shape rows, ${summary.alerts} alerts opened, ${sec.toFixed(0)} s`);
      }
    }
  } finally {
    client.release();
  }
  summary.seconds = (performance.now() - t0) / 1000;
  return summary;
}

// ---------------------------------------------------------------- command line

async function main() {
  const { values } = parseArgs({
    options: {
      days: { type: 'string' },
      end: { type: 'string' },
      seed: { type: 'string' },
      'no-alerts': { type: 'boolean' },
      'no-bulk': { type: 'boolean' },
    },
  });
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error('Set DATABASE_URL to a migrated and seeded database');
  const end = values.end ? Date.parse(`${values.end}T00:00:00Z`) / 1000 : undefined;
  if (values.end && !Number.isFinite(end)) throw new Error(`--end must be a date YYYY-MM-DD (got ${values.end})`);
  const pool = new pg.Pool({ connectionString: url, max: 5 });
  try {
    console.log(`load average ${os.loadavg().map((x) => x.toFixed(1)).join(' ')} on ${os.cpus().length} CPUs`);
    const s = await fillEstimates(pool, {
      days: values.days ? Number(values.days) : 365,
      endDay: end,
      seed: values.seed ? Number(values.seed) : 1,
      alerts: !values['no-alerts'],
      bulk: !values['no-bulk'],
      log: (l) => console.log(l),
    });
    const t1 = performance.now();
    await pool.query('analyze');
    console.log(
      `filled ${s.days} days (${s.daysSkipped} already there): ${s.windows.toLocaleString('en')} windows, ${s.estimates.toLocaleString('en')} estimates, ` +
        `${s.shapes.toLocaleString('en')} shape rows, ${s.alerts} alerts opened in ${s.seconds.toFixed(0)} s` +
        ` (${Math.round(s.estimates / s.seconds).toLocaleString('en')} estimates/s${s.bulk ? ', bulk' : ''}); analyze ${((performance.now() - t1) / 1000).toFixed(1)} s`,
    );
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
