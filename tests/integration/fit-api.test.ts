// Ring-down fits through the API: a line trip simulated at 2000 MW (PMU noise only, no load noise
// during the event) is uploaded, an engineer asks for a fit of the 20 s after the event, and both
// Prony and the matrix pencil come back with the post-trip model's true modes (the simulator's
// eigenvalues, CHECKS.md §5) and their reconstructions; the CSV export lists every mode.
import { parse } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildTarrowModel, simulateRingdown, type RingdownSimulation } from '../../modal/simulator';
import { FIT_CSV_COLUMNS } from '../../shared/api/fits';
import { createClient, type Client } from '../helpers/http';
import { DEMO_PASSWORD, ROLE_EMAIL, waitFor } from '../helpers/fixtures';
import { startStack, type Stack } from '../helpers/stack';
import { csvOf, TEST_CHANNELS, uploadReady } from './analysis-helpers';

const START = Date.UTC(2025, 4, 1, 12, 0, 0) / 1000;

let stack: Stack;
let engineer: Client;
let planner: Client;
let recordingId: number;
let sim: RingdownSimulation;
let fitId: number;
const iso = (t: number) => new Date(Math.round(t * 1000)).toISOString();

beforeAll(async () => {
  stack = await startStack();
  engineer = createClient(stack.baseUrl);
  await engineer.signIn(ROLE_EMAIL.engineer, DEMO_PASSWORD);
  planner = createClient(stack.baseUrl);
  await planner.signIn(ROLE_EMAIL.planner, DEMO_PASSWORD);
  sim = simulateRingdown(buildTarrowModel(2000), { event: 'line-trip', seed: 5, startTime: START, seconds: 30, loadNoise: 0, channels: TEST_CHANNELS });
  recordingId = await uploadReady(stack, engineer, 'tarrow-line-trip.csv', csvOf(sim.record));
}, 120_000);

afterAll(async () => {
  await stack?.stop();
});

describe('POST /api/recordings/:id/fits', () => {
  it('refuses planners, intervals outside the recording, unknown channels and impossible orders', async () => {
    const body = { from: iso(sim.eventTime), to: iso(sim.eventTime + 20) };
    expect((await planner.post(`/api/recordings/${recordingId}/fits`, body)).status).toBe(403);
    const out = await engineer.post(`/api/recordings/${recordingId}/fits`, { from: iso(START - 60), to: iso(START + 10) });
    expect(out.status).toBe(400);
    expect(out.body.error.message).toMatch(/is not inside the recording/);
    const ch = await engineer.post(`/api/recordings/${recordingId}/fits`, { ...body, channels: ['moorgate.angle', 'nowhere.angle'] });
    expect(ch.status).toBe(400);
    expect(ch.body.error.details).toEqual([{ path: 'channels', message: 'Not in this recording: nowhere.angle' }]);
    const short = await engineer.post(`/api/recordings/${recordingId}/fits`, { from: iso(sim.eventTime), to: iso(sim.eventTime + 1) });
    expect(short.status).toBe(400);
    expect(short.body.error.details).toEqual([{ path: 'to', message: 'The interval must last at least 2 s' }]);
    expect((await engineer.post('/api/recordings/999999/fits', body)).status).toBe(404);
  });

  it('fits the interval with both methods and finds the true post-trip modes', async () => {
    const r = await engineer.post(`/api/recordings/${recordingId}/fits`, { from: iso(sim.eventTime), to: iso(sim.eventTime + 20) });
    expect(r.status).toBe(201);
    expect(r.body.analysis.kind).toBe('fit');
    fitId = r.body.analysis.id;
    const d = await waitFor(async () => {
      const x = await planner.get(`/api/fits/${fitId}`);
      return x.body.analysis.status === 'done' || x.body.analysis.status === 'failed' ? x.body : undefined;
    }, 'the fit', 60_000);
    expect(d.analysis.error).toBeNull();
    expect(d.methods.map((m: { method: string }) => m.method)).toEqual(['prony', 'matrix-pencil']);
    for (const code of ['north-south', 'east-west'] as const) {
      const truth = sim.trueModes.find((m) => m.track === code)!;
      for (const m of d.methods) {
        const mode = m.modes.find((x: { trackCode: string | null }) => x.trackCode === code);
        expect(mode, `${m.method} ${code}`).toBeDefined();
        // noise-free apart from PMU noise: both methods recover the eigenvalue closely (textbook;
        // the estimator's own target at 20 dB SNR is a damping bias within ±0.2 points)
        expect(Math.abs(mode.frequencyHz - truth.frequencyHz), `${m.method} ${code}`).toBeLessThan(0.002);
        expect(Math.abs(mode.dampingPercent - truth.dampingPercent), `${m.method} ${code}`).toBeLessThan(code === 'north-south' ? 0.2 : 0.4);
        expect(mode.channels.length).toBe(TEST_CHANNELS.length);
      }
    }
    const ns = d.methods[1].modes.find((x: { trackCode: string | null }) => x.trackCode === 'north-south');
    expect(ns.energyShare).toBeGreaterThan(0.5);
    expect(ns.band).toBe('low'); // 4.7 % after the trip
  });

  it('returns each method’s reconstruction on the record grid, input = modes + residual', async () => {
    const d = (await planner.get(`/api/fits/${fitId}`)).body;
    for (const m of d.methods) {
      expect(m.snrDb).toBeGreaterThan(30);
      const rec = m.reconstruction;
      expect(rec.fullPoints).toBe(20 * 30 + 1);
      expect(rec.points).toBe(rec.fullPoints); // short enough to keep every sample
      expect(rec.stepSeconds).toBeCloseTo(1 / 30, 12);
      expect(Date.parse(rec.startTime)).toBe(Math.round(sim.eventTime * 1000));
      expect(rec.series.map((s: { channel: string }) => s.channel)).toEqual(TEST_CHANNELS);
      for (const s of rec.series) {
        expect(s.input).toHaveLength(rec.points);
        expect(s.perMode).toHaveLength(m.modes.length);
        for (let i = 0; i < rec.points; i += 50) {
          const sum = s.perMode.reduce((acc: number, pm: number[]) => acc + pm[i], 0);
          expect(s.total[i]).toBeCloseTo(sum, 3);
          expect(s.input[i] - s.total[i]).toBeCloseTo(s.residual[i], 3);
        }
      }
    }
  });

  it('keeps the modes as estimates with shapes, and exports the fit as CSV (read back with csv-parse: library)', async () => {
    const d = (await planner.get(`/api/fits/${fitId}`)).body;
    const mode = d.methods[0].modes[0];
    const e = await planner.get(`/api/estimates/${mode.id}`);
    expect(e.body.estimate.source).toMatchObject({ kind: 'fit', analysisId: fitId });
    expect(e.body.shape.length).toBe(TEST_CHANNELS.length);
    const res = await fetch(`${stack.baseUrl}/api/fits/${fitId}.csv`, { headers: { Cookie: planner.cookieHeader() } });
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toContain('text/csv');
    const rows = parse(await res.text(), { columns: true }) as Record<string, string>[];
    expect(Object.keys(rows[0])).toEqual([...FIT_CSV_COLUMNS]);
    const expected = d.methods.reduce((n: number, m: { modes: { channels: unknown[] }[] }) => n + m.modes.reduce((k, x) => k + x.channels.length, 0), 0);
    expect(rows).toHaveLength(expected);
    expect(new Set(rows.map((r) => r.method))).toEqual(new Set(['prony', 'matrix-pencil']));
    expect(Number(rows[0].frequency_hz)).toBeCloseTo(d.methods[0].modes[0].frequencyHz, 9);
    expect((await planner.get('/api/fits/999999')).status).toBe(404);
  });

  it('does not scan a recording shorter than one window', async () => {
    const r = await engineer.get(`/api/analyses?recording=${recordingId}&kind=scan`);
    expect(r.body.analyses).toEqual([]);
  });
});
