import { EigenvalueDecomposition, Matrix, solve as mlSolve } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { TARROW_LOADS_MW, TARROW_MACHINES, TARROW_MECHANICAL_NOISE_MW, TARROW_NOMINAL_HZ } from '../../fixtures/tarrow-network';
import { welch } from '../spectral';
import { BASE_MVA, buildTarrowModel, wrap180 } from './model';
import { runReference } from './reference.test-helper';
import {
  DEFAULT_LOAD_NOISE,
  dailyTransferMw,
  simulateAmbient,
  simulateDay,
  simulateDayChunks,
  simulateRingdown,
} from './simulate';

const QUIET = { angleDeg: 0, freqHz: 0, flowMw: 0 };
const m500 = buildTarrowModel(500);
const chan = (rec: { channels: { name: string; values: Float64Array }[] }, name: string) =>
  rec.channels.find((c) => c.name === name)!.values;

function variance(x: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < x.length; i++) m += x[i];
  m /= x.length;
  let s = 0;
  for (let i = 0; i < x.length; i++) s += (x[i] - m) ** 2;
  return s / x.length;
}

// Outputs that the rigid-body integrator (all machine angles moving together) does not reach.
const row = (name: string) => m500.outputs.find((o) => o.channel === name)!.c;
const diffRow = (a: string, b: string) => row(a).map((v, j) => v - row(b)[j]);
const varRows = [
  row('tarrow-central.freq'),
  row('moorgate.mw'),
  diffRow('moorgate.angle', 'tarrow-central.angle'),
  diffRow('windlow.angle', 'tarrow-central.angle'),
  row('greyscar.freq'),
];
const W = m500.noiseScaleMw.map((mw) => (DEFAULT_LOAD_NOISE * mw) ** 2);
const n = m500.A.length;
const BWB = [...Array(n)].map((_, i) => [...Array(n)].map((__, j) => m500.B[i].reduce((s, b, k) => s + b * W[k] * m500.B[j][k], 0)));

// Forced oscillation: 50 MW at 0.8 Hz injected at Gullhaven.
const FORCED = { frequencyHz: 0.8, amplitude: 50, site: 'gullhaven' };
const forcedNames = ['moorgate.mw', 'moorgate.angle', 'tarrow-central.freq', 'gullhaven.angle'];
const siteIdx = m500.network.sites.indexOf('gullhaven');
const wf = 2 * Math.PI * FORCED.frequencyHz;
const feedthrough = forcedNames.map((name) => {
  const o = m500.outputs.find((x) => x.channel === name)!;
  const feed = (site: string) => m500.network.angleFeed[m500.network.sites.indexOf(site)][siteIdx];
  if (o.kind === 'angle') return [(180 / Math.PI) * feed(o.site), 0];
  if (o.kind === 'frequency') return [0, (feed(o.site) * wf) / (2 * Math.PI)]; // d/dt sin = ω cos: +90°
  return [m500.network.corridorGain['highmoor-saltreach'] * (feed('moorgate') - feed('saltreach-bay')), 0];
});

const ref = runReference([
  { op: 'variance', A: m500.A, BWB, c: varRows },
  {
    op: 'forced',
    A: m500.A,
    b: m500.network.injection[siteIdx],
    c: forcedNames.map((name) => m500.outputs.find((o) => o.channel === name)!.c),
    d: feedthrough,
    w: wf,
  },
]);

describe('simulateAmbient', () => {
  it('reproduces the stationary output variance of the continuous model (library: numpy eigen-decomposition; exact discretisation)', () => {
    const seeds = [11, 12, 13, 14];
    const sums = [0, 0, 0, 0, 0];
    for (const seed of seeds) {
      const rec = simulateAmbient(m500, { minutes: 60, seed, pmuNoise: QUIET });
      const f = chan(rec, 'tarrow-central.freq');
      const mw = chan(rec, 'moorgate.mw');
      const tc = chan(rec, 'tarrow-central.angle');
      const d1 = chan(rec, 'moorgate.angle').map((v, i) => wrap180(v - tc[i]));
      const d2 = chan(rec, 'windlow.angle').map((v, i) => wrap180(v - tc[i]));
      [f, mw, d1, d2, chan(rec, 'greyscar.freq')].forEach((x, k) => (sums[k] += variance(x) / seeds.length));
    }
    sums.forEach((v, k) => {
      expect(v / ref[0].var[k], `output ${k}`).toBeGreaterThan(0.9);
      expect(v / ref[0].var[k], `output ${k}`).toBeLessThan(1.1);
    });
  });

  it('adds a forced oscillation with the amplitude and phase of the steady-state sinusoidal response (library: numpy.linalg.solve of (jωI − A))', () => {
    const rec = simulateAmbient(m500, { minutes: 1, loadNoise: 0, pmuNoise: QUIET, forced: FORCED, channels: forcedNames });
    const N = rec.channels[0].values.length;
    const t = Float64Array.from({ length: N }, (_, i) => i / rec.rate);
    const X = new Matrix(N, 4);
    for (let i = 0; i < N; i++) {
      X.set(i, 0, Math.sin(wf * t[i]));
      X.set(i, 1, Math.cos(wf * t[i]));
      X.set(i, 2, 1);
      X.set(i, 3, t[i]);
    }
    forcedNames.forEach((name, k) => {
      const y = Matrix.columnVector(Array.from(chan(rec, name)));
      const coef = mlSolve(X, y);
      const expSin = FORCED.amplitude * ref[1].re[k];
      const expCos = FORCED.amplitude * ref[1].im[k];
      const scale = Math.hypot(expSin, expCos);
      expect(Math.abs(coef.get(0, 0) - expSin), name).toBeLessThan(1e-3 * scale);
      expect(Math.abs(coef.get(1, 0) - expCos), name).toBeLessThan(1e-3 * scale);
    });
  });

  it('drives the Greyscar local mode through the Greyscar units\' mechanical power: the loads as the Tarrow fixture lists them, then the unit', () => {
    expect(m500.noiseInputs).toEqual([...Object.keys(TARROW_LOADS_MW), 'greyscar-hydro.mechanical']);
    expect(m500.noiseScaleMw).toEqual([...Object.values(TARROW_LOADS_MW), TARROW_MECHANICAL_NOISE_MW['greyscar-hydro']]);
    // a mechanical-power increase accelerates only its own rotor: M·Δω' = ΔPm
    const g = TARROW_MACHINES.findIndex((m) => m.code === 'greyscar-hydro');
    const col = m500.B.map((r) => r[m500.noiseInputs.length - 1]);
    const ng = TARROW_MACHINES.length;
    col.forEach((v, i) => expect(v).toBeCloseTo(i === ng + g ? 1 / (m500.network.inertia[g] * BASE_MVA) : 0, 12));
  });

  it('shows the Greyscar mode as a spectral peak in the Greyscar frequency (Welch density, 20 minutes)', () => {
    const gs = m500.trueModes.find((m) => m.track === 'greyscar')!;
    const rec = simulateAmbient(m500, { minutes: 20, seed: 21, channels: ['greyscar.freq'] });
    const psd = welch(chan(rec, 'greyscar.freq'), rec.rate, { nperseg: 60 * rec.rate });
    const at = (f: number) => psd.psd[Math.round(f / (psd.frequencies[1] - psd.frequencies[0]))];
    const peak = Math.max(...[-0.02, -0.01, 0, 0.01, 0.02].map((d) => at(gs.frequencyHz + d)));
    expect(peak / at(1.0)).toBeGreaterThan(3);
    expect(peak / at(1.75)).toBeGreaterThan(3);
  });

  it('is reproducible by seed, and the seed changes the noise', () => {
    const a = simulateAmbient(m500, { minutes: 0.5, seed: 5 });
    const b = simulateAmbient(m500, { minutes: 0.5, seed: 5 });
    const c = simulateAmbient(m500, { minutes: 0.5, seed: 6 });
    expect(Array.from(chan(a, 'moorgate.mw'))).toEqual(Array.from(chan(b, 'moorgate.mw')));
    expect(chan(a, 'moorgate.mw')[100]).not.toBe(chan(c, 'moorgate.mw')[100]);
  });

  it('records every channel at the rate asked, with frequencies around 60 Hz and flows around the transfer', () => {
    const rec = simulateAmbient(buildTarrowModel(1800), { minutes: 2, rate: 60, startTime: 1767225600 });
    expect(rec.rate).toBe(60);
    expect(rec.startTime).toBe(1767225600);
    expect(rec.channels.length).toBe(22);
    for (const c of rec.channels) expect(c.values.length).toBe(7200);
    const mean = (x: Float64Array) => x.reduce((s, v) => s + v, 0) / x.length;
    expect(Math.abs(mean(chan(rec, 'moorgate.mw')) - 1800)).toBeLessThan(60);
    expect(Math.abs(mean(chan(rec, 'greyscar.freq')) - TARROW_NOMINAL_HZ)).toBeLessThan(0.01);
  });

  it('adds white PMU measurement noise of the standard deviation asked', () => {
    const rec = simulateAmbient(m500, { minutes: 10, loadNoise: 0, pmuNoise: { angleDeg: 0.05, freqHz: 0.001, flowMw: 3 } });
    expect(Math.sqrt(variance(chan(rec, 'millbrook.angle'))) / 0.05).toBeCloseTo(1, 1);
    expect(Math.sqrt(variance(chan(rec, 'millbrook.freq'))) / 0.001).toBeCloseTo(1, 1);
    expect(Math.sqrt(variance(chan(rec, 'moorgate.mw'))) / 3).toBeCloseTo(1, 1);
  });

  it('refuses bad options with a message naming the problem', () => {
    expect(() => simulateAmbient(m500, { minutes: 0 })).toThrow('minutes must be a positive number, got 0');
    expect(() => simulateAmbient(m500, { minutes: 1, rate: 25 })).toThrow(
      'rate 25 frames/s is not a standard reporting rate for a 60 Hz system (IEEE C37.118.1: 10, 12, 15, 20, 30, 60 frames/s)',
    );
    expect(() => simulateAmbient(m500, { minutes: 1, channels: ['moorgate.volts'] })).toThrow('Unknown channel moorgate.volts; channels are greyscar.angle,');
    expect(() => simulateAmbient(m500, { minutes: 1, forced: { frequencyHz: 20, amplitude: 10, site: 'windlow' } })).toThrow(
      'forced.frequencyHz must be between 0 and the Nyquist frequency 15 Hz, got 20',
    );
    expect(() => simulateAmbient(m500, { minutes: 1, forced: { frequencyHz: 1, amplitude: 10, site: 'nowhere' } })).toThrow('forced.site nowhere is not a Tarrow site');
    expect(() => simulateAmbient(m500, { minutes: 1, pmuNoise: { angleDeg: -1 } })).toThrow('pmuNoise.angleDeg must be a number ≥ 0, got -1');
    expect(() => simulateAmbient(m500, { minutes: 1, loadNoise: NaN })).toThrow('loadNoise must be a number ≥ 0, got NaN');
  });
});

describe('simulateRingdown', () => {
  it('generator loss: every bus frequency settles at −ΔP / ΣD (textbook: swing equation steady state, Kundur 1994 ch. 3)', () => {
    const sim = simulateRingdown(buildTarrowModel(1500), { event: 'generator-loss', lostMw: 800, seconds: 150, loadNoise: 0, pmuNoise: QUIET });
    const omega0 = 2 * Math.PI * TARROW_NOMINAL_HZ;
    const sumD = TARROW_MACHINES.reduce((s, mc) => s + (mc.dampingPerInertia * 2 * mc.inertiaH * mc.mva) / (omega0 * BASE_MVA), 0);
    const dfExpected = -(800 / BASE_MVA) / sumD / (2 * Math.PI);
    for (const c of sim.record.channels.filter((x) => x.name.endsWith('.freq'))) {
      expect(c.values[sim.eventIndex - 1]).toBeCloseTo(TARROW_NOMINAL_HZ, 12);
      const last = c.values[c.values.length - 1] - TARROW_NOMINAL_HZ;
      expect(Math.abs(last / dfExpected - 1), c.name).toBeLessThan(0.005);
    }
    // A PMU angle turns at 360·Δf degrees per second off nominal (standard: C37.118.1 phasor definition);
    // the reported angles stay wrapped to (−180, 180].
    const ang = chan(sim.record, 'saltreach-bay.angle');
    for (const v of ang) {
      expect(v).toBeGreaterThan(-180);
      expect(v).toBeLessThanOrEqual(180);
    }
    const N = ang.length;
    let turned = 0;
    for (let i = N - 300; i < N; i++) turned += wrap180(ang[i] - ang[i - 1]);
    expect(turned / (300 / 30) / (360 * dfExpected)).toBeCloseTo(1, 2);
    expect(sim.eventTime).toBe(sim.record.startTime + 5);
  });

  it('line trip: after the event the corridor flow is a sum of the post-trip model modes and returns to the transfer', () => {
    const model = buildTarrowModel(2000);
    const sim = simulateRingdown(model, { event: 'line-trip', seconds: 200, preEventSeconds: 2, loadNoise: 0, pmuNoise: QUIET });
    expect(sim.postEventModel.corridorCircuitsOut).toBe(1);
    expect(sim.trueModes).toBe(sim.postEventModel.trueModes);
    const mw = chan(sim.record, 'moorgate.mw');
    expect(mw[0]).toBeCloseTo(2000, 8);
    expect(Math.abs(mw[mw.length - 1] - 2000)).toBeLessThan(0.5);
    const jump = mw[sim.eventIndex] - 2000;
    expect(jump).toBeLessThan(-100); // the three remaining circuits take less at the old angles
    // Basis from the post-trip eigenvalues: e^{σt}cos ωt, e^{σt}sin ωt, a constant, the speed mode.
    const post = sim.postEventModel;
    const rate = sim.record.rate;
    const seg = Array.from(mw.subarray(sim.eventIndex, sim.eventIndex + 40 * rate));
    const X = new Matrix(seg.length, 2 * post.trueModes.length + 2);
    // The non-zero real eigenvalue: the system-frequency (centre-of-inertia speed) mode.
    const evd = new EigenvalueDecomposition(new Matrix(post.A));
    const coiPole = evd.realEigenvalues.filter((re, k) => evd.imaginaryEigenvalues[k] === 0 && Math.abs(re) > 1e-6)[0];
    seg.forEach((_, i) => {
      const t = i / rate;
      post.trueModes.forEach((md, k) => {
        X.set(i, 2 * k, Math.exp(md.sigma * t) * Math.cos(md.omega * t));
        X.set(i, 2 * k + 1, Math.exp(md.sigma * t) * Math.sin(md.omega * t));
      });
      X.set(i, 2 * post.trueModes.length, 1);
      X.set(i, 2 * post.trueModes.length + 1, Math.exp(coiPole * t));
    });
    const coef = mlSolve(X, Matrix.columnVector(seg));
    const fit = X.mmul(coef);
    let res = 0;
    let sig = 0;
    seg.forEach((v, i) => {
      res += (v - fit.get(i, 0)) ** 2;
      sig += (v - 2000) ** 2;
    });
    expect(Math.sqrt(res / sig)).toBeLessThan(1e-6);
  });

  it('refuses bad options with a message naming the problem', () => {
    // @ts-expect-error an unknown event on purpose
    expect(() => simulateRingdown(m500, { event: 'earthquake' })).toThrow('event must be line-trip or generator-loss, got earthquake');
    expect(() => simulateRingdown(m500, { event: 'generator-loss', machine: 'mystery-unit' })).toThrow('machine mystery-unit is not a Tarrow machine; machines are greyscar-hydro,');
    expect(() => simulateRingdown(m500, { event: 'line-trip', seconds: 0 })).toThrow('seconds must be a number in (0, 600], got 0');
    expect(() => simulateRingdown(buildTarrowModel(500, { corridorCircuitsOut: 1 }), { event: 'line-trip' })).toThrow(
      'line-trip needs a model with every corridor circuit in service',
    );
  });
});

describe('simulateDay', () => {
  it('follows the transfer profile segment by segment, in chunks that join into one record', () => {
    const opts = { hours: 0.5, rate: 10, seed: 3, chunkMinutes: 10, segmentSeconds: 60, startTime: 1735689600 + 15 * 3600, transferMw: (h: number) => dailyTransferMw(15 + h) };
    const chunks = [...simulateDayChunks(opts)];
    expect(chunks.length).toBe(3);
    expect(chunks.map((c) => c.record.startTime)).toEqual([0, 600, 1200].map((s) => opts.startTime + s));
    const segs = chunks.flatMap((c) => c.segments);
    expect(segs.length).toBe(30);
    segs.forEach((s) => expect(s.transferMw).toBeCloseTo(dailyTransferMw(15 + (s.start - opts.startTime) / 3600), 9));
    for (const c of chunks) {
      const mw = chan(c.record, 'moorgate.mw');
      const mean = mw.reduce((s, v) => s + v, 0) / mw.length;
      const expected = c.segments.reduce((s, x) => s + x.transferMw, 0) / c.segments.length;
      expect(Math.abs(mean - expected)).toBeLessThan(25);
    }
    const day = simulateDay(opts);
    expect(day.record.channels[0].values.length).toBe(18000);
    expect(Array.from(chan(day.record, 'windlow.freq').subarray(6000, 6010))).toEqual(Array.from(chan(chunks[1].record, 'windlow.freq').subarray(0, 10)));
  });

  it('refuses a transfer profile that leaves the modelled range', () => {
    expect(() => [...simulateDayChunks({ hours: 0.1, transferMw: () => 4000 })]).toThrow('transferMw(0.0000 h) = 4000 is outside the modelled range 0–3200 MW');
  });
});
