// The transfer study over data seeded by the demo seeding code (scripts/seed-demo.ts): ambient
// recordings simulated at six Highmoor–Saltreach transfer levels, stored through the ingest path
// and scanned by the worker. The study's projected transfer at which the north–south damping
// reaches 3 % must lie within 15 % of the simulator's true one (transferAtDampingPercent: the
// bisection on the model's eigenvalues, ≈ 2500 MW by its calibration).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createAnalysisContext, type AnalysisContext } from '../../jobs/processors/analysis-context';
import { transferAtDampingPercent } from '../../modal/simulator';
import { seedDemoPlan, type DemoPlan } from '../../scripts/seed-demo';
import { createClient, type Client } from '../helpers/http';
import { DEMO_PASSWORD, ROLE_EMAIL, waitFor } from '../helpers/fixtures';
import { startStack, type Stack } from '../helpers/stack';
import { TEST_CHANNELS } from './analysis-helpers';

const LEVELS_MW = [600, 1100, 1600, 2100, 2600, 3000];
const START = Date.UTC(2025, 6, 1, 0, 0, 0) / 1000;
const MINUTES = 30;
const FROM = new Date((START - 3600) * 1000).toISOString();
const TO = new Date((START + LEVELS_MW.length * 3600 + 3600) * 1000).toISOString();

let stack: Stack;
let ctx: AnalysisContext;
let planner: Client;
let operator: Client;

beforeAll(async () => {
  stack = await startStack();
  ctx = createAnalysisContext({ ...process.env, ...stack.env }, 'test-seed');
  const plan: DemoPlan = {
    day: null,
    ringdowns: [],
    ambient: LEVELS_MW.map((mw, i) => ({ start: START + i * 3600, transferMw: mw, minutes: MINUTES, seed: 500 + i, channels: TEST_CHANNELS })),
  };
  const seeded = await seedDemoPlan(ctx, plan);
  expect(seeded.recordings).toHaveLength(LEVELS_MW.length);
  planner = createClient(stack.baseUrl);
  await planner.signIn(ROLE_EMAIL.planner, DEMO_PASSWORD);
  operator = createClient(stack.baseUrl);
  await operator.signIn(ROLE_EMAIL.operator, DEMO_PASSWORD);
  await waitFor(
    async () => {
      const r = await planner.get('/api/analyses?kind=scan');
      const a = r.body.analyses as { status: string }[];
      return a.length === LEVELS_MW.length && a.every((x) => x.status === 'done' || x.status === 'failed');
    },
    'the seeded scans',
    300_000,
  );
}, 420_000);

afterAll(async () => {
  await ctx?.close();
  await stack?.stop();
});

describe('GET /api/studies/transfer', () => {
  it("projects the 3 % crossing within 15 % of the simulator's true transfer", async () => {
    expect((await operator.get(`/api/studies/transfer?track=north-south&from=${FROM}&to=${TO}`)).status).toBe(403);
    const r = await planner.get(`/api/studies/transfer?track=north-south&from=${FROM}&to=${TO}`);
    expect(r.status).toBe(200);
    const s = r.body.study;
    expect(s.method).toBe('ols-fieller');
    expect(s.corridor.code).toBe('highmoor-saltreach');
    expect(s.caution).toMatch(/qualified engineer/);
    // 30 min with 20-min windows every minute: 11 windows per level
    expect(s.points.length).toBeGreaterThanOrEqual(LEVELS_MW.length * 10);
    // each level's windows overlap: about 30/20 = 1.5 independent windows per level
    expect(s.nEffective).toBeCloseTo(LEVELS_MW.length * 1.5, 6);
    expect(s.damping.fit.slope).toBeLessThan(0); // damping falls as the transfer rises
    const truth3 = transferAtDampingPercent('north-south', 3)!;
    const truth5 = transferAtDampingPercent('north-south', 5)!;
    const poor = s.damping.projections.find((p: { threshold: string }) => p.threshold === 'poor');
    const low = s.damping.projections.find((p: { threshold: string }) => p.threshold === 'low');
    console.log(
      `[transfer-study] 3 %: projected ${poor.x.toFixed(0)} MW (Fieller ${poor.lo?.toFixed(0)}–${poor.hi?.toFixed(0)}), true ${truth3.toFixed(0)} MW; ` +
        `5 %: projected ${low.x.toFixed(0)} MW, true ${truth5.toFixed(0)} MW; slope ${s.damping.fit.slope.toExponential(3)} %/MW, r² ${s.damping.fit.r2.toFixed(3)}`,
    );
    expect(Math.abs(poor.x - truth3) / truth3).toBeLessThan(0.15);
    expect(poor.lo).toBeLessThan(poor.x);
    expect(poor.hi).toBeGreaterThan(poor.x);
    expect(poor.se).toBeGreaterThan(0);
    // the line and its band cover the data and the projections
    expect(s.damping.line[0].x).toBeLessThanOrEqual(Math.min(...s.points.map((p: { transferMw: number }) => p.transferMw)));
    // the corridor angle rises with the transfer; the 45° practical limit (common practice) lies beyond the data
    expect(s.angle.fit.slope).toBeGreaterThan(0);
    expect(s.angle.limitDeg).toBe(45);
    expect(s.angle.atLimit.x).toBeGreaterThan(0);
  });

  it('saves a study (planner), lists and reads it back', async () => {
    const r = await planner.post('/api/studies', { name: 'North–south against Highmoor–Saltreach, July', track: 'north-south', from: FROM, to: TO });
    expect(r.status).toBe(201);
    expect(r.body.saved.trackCode).toBe('north-south');
    expect(r.body.saved.createdBy.displayName).toBe('Demo Planner');
    expect(r.body.saved.poorAtMw).toBeCloseTo(r.body.saved.result.damping.projections[1].x, 6);
    const list = await operator.get('/api/studies');
    expect(list.body.studies.map((x: { id: number }) => x.id)).toEqual([r.body.saved.id]);
    const one = await operator.get(`/api/studies/${r.body.saved.id}`);
    expect(one.body.saved.result.damping.fit.slope).toBe(r.body.saved.result.damping.fit.slope);
    expect((await operator.post('/api/studies', { name: 'x', track: 'north-south', from: FROM, to: TO })).status).toBe(403);
    expect((await planner.get(`/api/studies/transfer?track=nowhere&from=${FROM}&to=${TO}`)).status).toBe(404);
    expect((await planner.get(`/api/studies/transfer?track=north-south&from=${TO}&to=${FROM}`)).status).toBe(400);
  });
});
