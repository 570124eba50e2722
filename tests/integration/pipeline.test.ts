// Upload → ingest → ambient scan → alert evaluation, through the real server, PostgreSQL, Redis
// and a worker process (sandboxed scan processor). The recording is simulated by the project's
// Tarrow simulator at 2200 MW (north–south mode ≈ 4 %: the low band), so its true modes are the
// model's eigenvalues (CHECKS.md §5).
import { parse } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { modeOutputShape, trackMode } from '../../modal/simulator';
import { mac } from '../../modal/tracking';
import { bandOf } from '../../shared/bands';
import { ESTIMATES_CSV_COLUMNS } from '../../shared/api/estimates';
import { createClient, type Client } from '../helpers/http';
import { DEMO_PASSWORD, ROLE_EMAIL } from '../helpers/fixtures';
import { startStack, type Stack } from '../helpers/stack';
import { ANALYSIS_ENDPOINTS } from '../../shared/api/analysis-endpoints';
import { buildPath } from '../../shared/api/common';
import { canAccess, ROLES } from '../../shared/roles';
import { ambientRecord, collectEvents, csvOf, uploadCsv, uploadReady, waitForAnalysis, type AnalysisView, type EventCollector } from './analysis-helpers';
import { ANALYSIS_ROLE_SAMPLES } from './analysis-role-samples';

const TRANSFER_MW = 2200;
const MINUTES = 40;
const START = Date.UTC(2025, 2, 1, 0, 0, 0) / 1000;
const TRACKS = ['north-south', 'east-west', 'greyscar'] as const;
/** The inter-area modes the ambient data excite; the Greyscar plant mode is barely excited by load noise. */
const INTER_AREA = ['north-south', 'east-west'] as const;

let stack: Stack;
let engineer: Client;
let operator: Client;
let recordingId: number;
let scan: AnalysisView;
let events: EventCollector;
const sim = ambientRecord(TRANSFER_MW, { minutes: MINUTES, seed: 11, start: START });

async function signedIn(role: keyof typeof ROLE_EMAIL): Promise<Client> {
  const c = createClient(stack.baseUrl);
  const r = await c.signIn(ROLE_EMAIL[role], DEMO_PASSWORD);
  if (r.status !== 200) throw new Error(`sign-in as ${role} answered ${r.status}`);
  return c;
}

beforeAll(async () => {
  stack = await startStack();
  engineer = await signedIn('engineer');
  operator = await signedIn('operator');
  events = await collectEvents(stack, operator);
  const csv = csvOf(sim.record);
  const refused = await uploadCsv(stack, operator, 'tarrow-2200mw.csv', csv);
  expect(refused.status).toBe(403);
  recordingId = await uploadReady(stack, engineer, 'tarrow-2200mw.csv', csv);
  scan = await waitForAnalysis(engineer, recordingId, 'scan');
}, 300_000);

afterAll(async () => {
  events?.close();
  await stack?.stop();
});

describe('ingest → scan', () => {
  it('scans the uploaded recording by itself, window by window, to the end', async () => {
    expect(scan.error).toBeNull();
    expect(scan.status).toBe('done');
    // 40 min with 20-min windows stepped by 1 min (the defaults): 21 windows
    expect(scan.windows).toBe(21);
    expect(scan.progress).toBe(1);
    // started by the system, not by a person: in the audit trail all the same
    const audit = await stack.pool.query(`select person_id, details from audit_log where action = 'scan.start' and target = $1`, [`analysis:${scan.id}`]);
    expect(audit.rows).toEqual([{ person_id: null, details: expect.objectContaining({ automatic: true, method: expect.any(String), windowSeconds: 1200, stepSeconds: 60 }) }]);
    const r = await operator.get(`/api/scans/${scan.id}`);
    expect(r.status).toBe(200);
    const w = r.body.windows as { start: string; end: string; skipped: boolean; transferMw: Record<string, number>; angleDeg: Record<string, number> }[];
    expect(w).toHaveLength(21);
    w.forEach((x, k) => {
      expect(Date.parse(x.start)).toBe((START + 60 * k) * 1000);
      expect(Date.parse(x.end) - Date.parse(x.start)).toBe(1200 * 1000);
      expect(x.skipped).toBe(false);
    });
  });

  it("stores each window's corridor transfer and angle (means of the flow channel and of the end-angle difference)", async () => {
    const r = await operator.get(`/api/scans/${scan.id}`);
    const out = (ch: string) => sim.model.outputs.find((o) => o.channel === ch)!.steady;
    const flow = out('moorgate.mw');
    const angle = out('moorgate.angle') - out('saltreach-bay.angle');
    for (const x of r.body.windows) {
      // ambient fluctuations of a 20-minute mean are a few MW; the PMU noise averages out
      expect(Math.abs(x.transferMw['highmoor-saltreach'] - flow)).toBeLessThan(0.02 * Math.abs(flow));
      expect(Math.abs(x.angleDeg['highmoor-saltreach'] - angle)).toBeLessThan(0.5);
      expect(x.transferMw['eastfell-tie']).toBeDefined();
    }
  });

  it("assigns the estimates to the tracks, within the estimators' accuracy of the simulator's true modes", async () => {
    const r = await operator.get(`/api/scans/${scan.id}`);
    const rows = INTER_AREA.map((code) => {
      const truth = trackMode(sim.model, code)!;
      const got = (r.body.windows as { modes: { trackCode: string | null; frequencyHz: number; dampingPercent: number; forced: boolean }[] }[])
        .map((w) => w.modes.find((m) => m.trackCode === code && !m.forced))
        .filter((m): m is NonNullable<typeof m> => m !== undefined);
      const mf = got.reduce((s, m) => s + m.frequencyHz, 0) / got.length;
      const md = got.reduce((s, m) => s + m.dampingPercent, 0) / got.length;
      return { code, truth, n: got.length, mf, md };
    });
    console.log(
      `[pipeline] ${rows.map((x) => `${x.code}: true ${x.truth.frequencyHz.toFixed(3)} Hz ${x.truth.dampingPercent.toFixed(2)} %, scan mean ${x.mf.toFixed(3)} Hz ${x.md.toFixed(2)} % over ${x.n} windows`).join('; ')}`,
    );
    for (const { code, truth, n, mf } of rows) {
      // the mode is found in (nearly) every window
      expect(n, code).toBeGreaterThanOrEqual(19);
      // Tolerances from the estimator's accuracy targets for the north–south mode
      // (scripts/bench/accuracy.ts: damping bias within ±0.5 points, spread ≤ 1.0 point per
      // 20-minute window, frequency bias within 0.01 Hz). One 40-minute record holds about two
      // independent windows, so the mean of its windows may miss by the bias plus two spreads of
      // a two-window mean: 0.5 + 2·1.0/√2 ≈ 2 points. The estimator states no damping target for
      // the east–west mode; its frequency is held to the same bound.
      expect(Math.abs(mf - truth.frequencyHz), code).toBeLessThan(0.015);
    }
    const ns = rows.find((x) => x.code === 'north-south')!;
    expect(Math.abs(ns.md - ns.truth.dampingPercent)).toBeLessThan(2.0);
  });

  it("stores each estimate's mode shape, close to the true one (the simulator's eigenvector)", async () => {
    const r = await operator.get(`/api/scans/${scan.id}`);
    const est = (r.body.windows[10].modes as { id: number; trackCode: string | null }[]).find((m) => m.trackCode === 'north-south')!;
    const d = await operator.get(`/api/estimates/${est.id}`);
    expect(d.status).toBe(200);
    expect(d.body.estimate.source.kind).toBe('window');
    expect(d.body.estimate.trackName).toBe('North–south');
    const shape = d.body.shape as { channel: string; site: string; magnitude: number; angleDeg: number }[];
    expect(Math.max(...shape.map((s) => s.magnitude))).toBeCloseTo(1, 6);
    expect(shape.find((s) => s.channel === 'greyscar.angle')!.site).toBe('greyscar');
    const angles = shape.filter((s) => s.channel.endsWith('.angle'));
    const truth = modeOutputShape(sim.model, trackMode(sim.model, 'north-south')!, angles.map((s) => s.channel), { angleReference: 'tarrow-central.angle' });
    // the estimator's own target is MAC ≥ 0.9 in 90 % of windows (scripts/bench/accuracy.ts)
    expect(mac(angles, truth)).toBeGreaterThan(0.8);
  });

  it('leaves no alert at 2200 MW (the north–south mode is low, not poor)', async () => {
    const r = await operator.get('/api/alerts');
    expect(r.status).toBe(200);
    expect(r.body.alerts).toEqual([]);
  });

  it('pushes the progress to a listener through Server-Sent Events', () => {
    const mine = events.events.filter((e) => e.type === 'analysis.progress' && e.data.analysisId === scan.id);
    expect(mine.length).toBeGreaterThanOrEqual(2);
    const last = mine[mine.length - 1].data;
    expect(last.status).toBe('done');
    expect(last.progress).toBe(1);
    expect(mine.some((e) => e.data.status === 'running')).toBe(true);
  });
});

describe('Watch, trends and exports', () => {
  it('Watch shows every track with its latest estimate, band, sparkline and staleness', async () => {
    const r = await operator.get('/api/watch');
    expect(r.status).toBe(200);
    expect(r.body.tracks.map((t: { code: string }) => t.code)).toEqual([...TRACKS]);
    for (const t of r.body.tracks) {
      expect(t.stale).toBe(true); // simulated in 2025: nothing new for a long time
      expect(t.openAlerts).toEqual([]);
      if (!(INTER_AREA as readonly string[]).includes(t.code)) continue;
      expect(t.latest, t.code).not.toBeNull();
      expect(Date.parse(t.latest.at)).toBe((START + 20 * 60 + 1200) * 1000); // end of the last window
      expect(t.latest.band).toBe(bandOf(t.latest.dampingPercent, { poorBelow: t.poorBelow, lowBelow: t.lowBelow }));
      expect(t.sparkline.length).toBeGreaterThan(0);
      expect(Math.min(...t.sparkline.map((p: { min: number }) => p.min))).toBeLessThanOrEqual(t.latest.dampingPercent);
    }
  });

  it('serves raw points for short spans and min/mean/max buckets for long ones', async () => {
    const from = new Date((START - 3600) * 1000).toISOString();
    const to = new Date((START + 3 * 3600) * 1000).toISOString();
    const raw = await operator.get(`/api/tracks/north-south/estimates?from=${from}&to=${to}`);
    expect(raw.status).toBe(200);
    expect(raw.body.aggregated).toBe(false);
    expect(raw.body.points.length).toBe(raw.body.total);
    expect(raw.body.total).toBeGreaterThanOrEqual(19);
    const agg = await operator.get(`/api/tracks/north-south/estimates?from=${from}&to=${to}&maxPoints=10`);
    expect(agg.body.aggregated).toBe(true);
    expect(agg.body.bucketSeconds).toBe(1800); // 4 h / 10 = 24 min → the next nice width, 30 min
    const b = agg.body.buckets as { count: number; dampingMin: number; dampingMean: number; dampingMax: number }[];
    expect(b.reduce((s, x) => s + x.count, 0)).toBe(raw.body.total);
    const all = (raw.body.points as { dampingPercent: number }[]).map((p) => p.dampingPercent);
    expect(Math.min(...b.map((x) => x.dampingMin))).toBeCloseTo(Math.min(...all), 9);
    expect(Math.max(...b.map((x) => x.dampingMax))).toBeCloseTo(Math.max(...all), 9);
    const bad = await operator.get(`/api/tracks/north-south/estimates?from=${to}&to=${from}`);
    expect(bad.status).toBe(400);
    expect((await operator.get('/api/tracks/no-such-track/estimates')).status).toBe(404);
  });

  it('exports the estimates as CSV (RFC 4180, read back with csv-parse: library)', async () => {
    const from = new Date((START - 3600) * 1000).toISOString();
    const to = new Date((START + 3 * 3600) * 1000).toISOString();
    const res = await fetch(`${stack.baseUrl}/api/tracks/east-west/estimates.csv?from=${from}&to=${to}`, { headers: { Cookie: operator.cookieHeader() } });
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toContain('text/csv');
    const rows = parse(await res.text(), { columns: true }) as Record<string, string>[];
    const json = await operator.get(`/api/tracks/east-west/estimates?from=${from}&to=${to}`);
    expect(rows.length).toBe(json.body.total);
    expect(Object.keys(rows[0])).toEqual([...ESTIMATES_CSV_COLUMNS]);
    expect(Number(rows[0].damping_percent)).toBeCloseTo(json.body.points[0].dampingPercent, 9);
    expect(rows[0].track).toBe('east-west');
  });
});

describe('scan requests', () => {
  it('refuses settings the estimator refuses, naming them, and stores nothing', async () => {
    const before = await engineer.get(`/api/analyses?recording=${recordingId}`);
    const r = await engineer.post(`/api/recordings/${recordingId}/scans`, { settings: { windowSeconds: 30 } });
    expect(r.status).toBe(400);
    expect(r.body.error.code).toBe('VALIDATION');
    expect(r.body.error.message).toMatch(/^Scan settings refused: windowSeconds 30 s is too short/);
    const unknown = await engineer.post(`/api/recordings/${recordingId}/scans`, { settings: { windowLength: 600 } });
    expect(unknown.status).toBe(400);
    expect(unknown.body.error.details[0]).toEqual({ path: 'settings.windowLength', message: 'Unknown field' });
    const after = await engineer.get(`/api/analyses?recording=${recordingId}`);
    expect(after.body.analyses.length).toBe(before.body.analyses.length);
  });

  it('lets engineers (not operators) start another scan with their settings', async () => {
    expect((await operator.post(`/api/recordings/${recordingId}/scans`, { settings: {} })).status).toBe(403);
    const r = await engineer.post(`/api/recordings/${recordingId}/scans`, { settings: { windowSeconds: 600, stepSeconds: 300 } });
    expect(r.status).toBe(201);
    expect(r.body.analysis.kind).toBe('scan');
    expect(r.body.analysis.settings.windowSeconds).toBe(600);
    expect(r.body.analysis.settings.stepSeconds).toBe(300);
    const id = r.body.analysis.id as number;
    const done = await (async () => {
      for (let i = 0; i < 600; i++) {
        const a = await engineer.get(`/api/analyses/${id}`);
        if (a.body.analysis.status === 'done' || a.body.analysis.status === 'failed') return a.body.analysis;
        await new Promise((res) => setTimeout(res, 200));
      }
      throw new Error('scan did not finish');
    })();
    expect(done.status).toBe('done');
    // 40 min, 10-min windows every 5 min: (40 − 10) / 5 + 1 = 7 windows
    expect(done.windows).toBe(7);
  });
});

describe('roles (DESIGN.md §5.3) on every analysis endpoint', () => {
  it('answers the success status to the roles allowed and 403 to the others, 401 anonymous', async () => {
    const clients = Object.fromEntries(await Promise.all(ROLES.map(async (r) => [r, await signedIn(r)] as const)));
    const anonymous = createClient(stack.baseUrl);
    const failures: string[] = [];
    for (const [key, e] of Object.entries(ANALYSIS_ENDPOINTS)) {
      for (const caller of [...ROLES, 'anonymous' as const]) {
        const sample = await ANALYSIS_ROLE_SAMPLES[key as keyof typeof ANALYSIS_ENDPOINTS](stack, caller);
        const path = buildPath(e.path, sample.params ?? {}) + (sample.query ? `?${sample.query}` : '');
        const client = caller === 'anonymous' ? anonymous : clients[caller];
        let status: number;
        if (key === 'events.stream') {
          // an endless stream: the status line is the answer
          const ac = new AbortController();
          const res = await fetch(`${stack.baseUrl}${path}`, { headers: { Cookie: client.cookieHeader() }, signal: ac.signal });
          status = res.status;
          ac.abort();
        } else {
          status = (await client.request(e.method, path, e.method === 'GET' ? undefined : (sample.body ?? {}))).status;
        }
        const want = caller === 'anonymous' ? 401 : canAccess(caller, e.access) ? e.status : 403;
        if (status !== want) failures.push(`${caller} ${e.method} ${path}: ${status}, expected ${want}`);
      }
    }
    expect(failures).toEqual([]);
  });
});
