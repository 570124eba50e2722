import { describe, expect, it } from 'vitest';
import { TARROW_ANGLE_REFERENCE } from '../fixtures/tarrow-network';
import {
  DEFAULT_AMBIENT_OPTIONS,
  checkAmbientOptions,
  createAmbientScanner,
  estimateAmbientWindow,
  modeShapeAt,
  scanAmbient,
} from './ambient';
import { synthAmbient, type SynthMode, type SynthOptions } from './ambient-synth';
import { ModalInputError } from './errors';
import { buildTarrowModel, modeOutputShape, simulateAmbient, transferAtDampingPercent } from './simulator';
import { mac } from './tracking';
import type { AmbientMode, AmbientWindowResult, SampledRecord } from './types';

// Known-answer data (modal/ambient-synth.ts): each mode a complex first-order process with pole
// z = exp(s/fs) (CHECKS.md §1), channels Re(Σ φ·q) + white noise — the true frequency, damping and
// shape φ are known exactly. Tarrow data from the project's simulator, whose truth is its eigenvalues.

const pol = (m: number, deg: number) => ({ re: m * Math.cos((deg * Math.PI) / 180), im: m * Math.sin((deg * Math.PI) / 180) });
const NAMES = ['a1.x', 'a2.x', 'a3.x', 'a4.x', 'b1.x', 'b2.x', 'b3.x', 'b4.x'];
const NS: SynthMode = {
  frequencyHz: 0.3,
  dampingPercent: 3,
  amplitude: 1,
  shape: [pol(1, 0), pol(0.8, 5), pol(0.6, -8), pol(0.3, 10), pol(0.5, 180), pol(0.7, 170), pol(0.9, 185), pol(0.2, 150)],
};
const EW: SynthMode = {
  frequencyHz: 0.62,
  dampingPercent: 7,
  amplitude: 0.6,
  shape: [pol(0.2, 0), pol(0.3, 10), pol(0.5, 0), pol(1, 180), pol(0.8, 175), pol(0.1, 0), pol(0.3, 20), pol(0.6, 190)],
};
const synth = (seed: number, extra: Partial<SynthOptions> = {}): SampledRecord =>
  synthAmbient({ rate: 30, seconds: 1200, names: NAMES, modes: [NS, EW], noiseStd: 0.1, seed, ...extra });
const OPTS = { angleReference: null } as const;
const nearest = (w: AmbientWindowResult, f: number, tol = 0.03): AmbientMode | undefined =>
  w.modes.filter((m) => !m.forced && Math.abs(m.frequencyHz - f) < tol).sort((a, b) => b.strength - a.strength)[0];

describe('checkAmbientOptions', () => {
  const ctx = { rate: 30, channelNames: ['x.angle', 'y.angle', 'z.freq', TARROW_ANGLE_REFERENCE], durationSeconds: 3600 };

  it('applies the documented defaults', () => {
    const o = checkAmbientOptions(undefined, ctx);
    expect(o.windowSeconds).toBe(1200);
    expect(o.stepSeconds).toBe(60);
    expect(o.bandHz).toEqual([0.1, 2.0]);
    expect(o.analysisRate).toBe(5);
    expect(o.factor).toBe(6);
    expect(o.method).toBe('yule-walker');
    expect(o.confidenceLevel).toBe(0.9);
    expect(o.angleReference).toBe(TARROW_ANGLE_REFERENCE);
    expect(o.channels).toEqual(['x.angle', 'y.angle', 'z.freq']);
    expect(o.angleChannels).toEqual(['x.angle', 'y.angle', TARROW_ANGLE_REFERENCE]);
    expect(o.windowSamples).toBe(6000);
    expect(o.stepSamples).toBe(300);
    expect(o.blockSamples).toBe(300);
    expect(DEFAULT_AMBIENT_OPTIONS.forced.enabled).toBe(true);
    // no reference in the record: angles stay absolute (unwrapped)
    expect(checkAmbientOptions({}, { rate: 30, channelNames: ['p.angle'] }).angleReference).toBeNull();
    // 60 frames/s decimates by 12, 10 frames/s by 2
    expect(checkAmbientOptions({}, { ...ctx, rate: 60 }).factor).toBe(12);
    expect(checkAmbientOptions({}, { ...ctx, rate: 10 }).factor).toBe(2);
  });

  it('refuses wrong options with precise messages', () => {
    const bad: [Record<string, unknown>, string][] = [
      [{ windowSecs: 600 }, "unknown ambient option 'windowSecs'"],
      [{ windowSeconds: -5 }, 'windowSeconds must be a positive number of seconds, got -5'],
      [{ stepSeconds: 0 }, 'stepSeconds must be a positive number of seconds, got 0'],
      [{ bandHz: [2, 1] }, 'bandHz must be [low, high] in Hz with 0 < low < high, got [2, 1]'],
      [{ analysisRate: 7 }, 'analysisRate 7 samples/s must divide the record rate 30 samples/s by a whole number'],
      [{ analysisRate: 3 }, 'analysisRate 3 samples/s is too low for bandHz up to 2 Hz: it must be at least 2.5 × 2 = 5 samples/s'],
      [{ method: 'prony' }, "method must be 'yule-walker' or 'acf-matrix-pencil', got 'prony'"],
      [{ arOrder: 1 }, 'arOrder must be an integer from 2 to 200, got 1'],
      [{ confidenceLevel: 90 }, 'confidenceLevel must lie strictly between 0 and 1, got 90'],
      [{ jackknifeGroups: 2 }, 'jackknifeGroups must be an integer from 3 to 100, got 2'],
      [{ maxGapSeconds: -1 }, 'maxGapSeconds must be a non-negative number of seconds, got -1'],
      [{ forced: { minCoherence: 1.5 } }, 'forced.minCoherence must lie strictly between 0 and 1, got 1.5'],
      [{ forced: { window: 3 } }, "unknown forced-detection option 'window'"],
      [{ channels: ['x.angle', 'nope'] }, "unknown channel 'nope': the record has no such channel"],
      [{ channels: ['x.angle', 'x.angle'] }, "channel 'x.angle' is listed twice in channels"],
      [{ channels: [] }, 'channels must be a non-empty list of channel names, or null for all'],
      [
        { channels: [TARROW_ANGLE_REFERENCE] },
        `channel '${TARROW_ANGLE_REFERENCE}' is the angle reference; relative to itself it is identically zero, so it cannot be analysed`,
      ],
      [{ angleReference: 'nope.angle' }, "angleReference 'nope.angle' is not a channel of the record"],
      [{ angleReference: 'z.freq' }, "angleReference 'z.freq' is not an angle channel (see angleChannels)"],
      [{ windowSeconds: 1200.1 }, 'windowSeconds 1200.1 s is not a whole number of samples at the analysis rate 5 samples/s'],
      [
        { windowSeconds: 200 },
        'windowSeconds 200 s is too short: each of the 10 jackknife groups needs at least 4 × 30 lags = 120 samples, so the window must last at least 240 s',
      ],
      [{ windowSeconds: 7200 }, 'the record lasts 3600 s; one window needs windowSeconds = 7200 s'],
      [{ shapeReference: 'w' }, "shapeReference 'w' is not one of the analysed channels"],
      [{ minStrength: -1 }, 'minStrength must be a non-negative number of dB, got -1'],
    ];
    for (const [o, msg] of bad) expect(() => checkAmbientOptions(o as never, ctx)).toThrow(new ModalInputError(msg));
    expect(() => checkAmbientOptions({}, { ...ctx, rate: 4 })).toThrow(
      new ModalInputError('bandHz upper edge 2 Hz needs a record rate of at least 5 samples/s (2.5 × the edge); the record has 4'),
    );
  });
});

describe('bad records', () => {
  const base = synth(1, { seconds: 1300 });
  const withChannel = (values: Float64Array): SampledRecord => ({ ...base, channels: [...base.channels, { name: 'dead.x', values }] });

  it('refuses an all-missing channel, a constant channel, a short record and mismatched channels', () => {
    const n = base.channels[0].values.length;
    expect(() => estimateAmbientWindow(withChannel(new Float64Array(n).fill(NaN)), OPTS)).toThrow(
      new ModalInputError("channel 'dead.x' has no valid samples (all are missing)"),
    );
    expect(() => scanAmbient(withChannel(new Float64Array(n).fill(59.98)), OPTS)).toThrow(
      new ModalInputError("channel 'dead.x' is constant (every sample is 59.98); no oscillation can be estimated from it"),
    );
    const short: SampledRecord = { ...base, channels: base.channels.map((c) => ({ ...c, values: c.values.subarray(0, 30 * 600) })) };
    expect(() => scanAmbient(short, OPTS)).toThrow(new ModalInputError('the record lasts 600 s; one window needs windowSeconds = 1200 s'));
    expect(() => scanAmbient(withChannel(new Float64Array(10)), OPTS)).toThrow(
      new ModalInputError(`channel 'dead.x' has 10 samples but 'a1.x' has ${n}; all channels must have the same length`),
    );
    expect(() => scanAmbient({ ...base, rate: NaN }, OPTS)).toThrow(new ModalInputError('record.rate must be a positive number of samples/s, got NaN'));
    expect(() => scanAmbient({ ...base, channels: [] }, OPTS)).toThrow(new ModalInputError('the record has no channels'));
    // a dead channel the caller leaves out is no obstacle
    const w = estimateAmbientWindow(withChannel(new Float64Array(n).fill(NaN)), { ...OPTS, channels: NAMES });
    expect(w.skipped).toBe(false);
  });
});

describe('estimateAmbientWindow on known-answer data', () => {
  it('finds both modes, with intervals that contain the truth, and the true mode shape', () => {
    const w = estimateAmbientWindow(synth(3), OPTS);
    expect(w.skipped).toBe(false);
    expect(w.end - w.start).toBe(1200);
    const ns = nearest(w, 0.3)!;
    expect(ns.frequencyHz).toBeCloseTo(0.3, 2);
    expect(Math.abs(ns.dampingPercent - 3)).toBeLessThan(1.2);
    expect(ns.dampingCi[0]).toBeLessThan(ns.dampingPercent);
    expect(ns.dampingCi[1]).toBeGreaterThan(ns.dampingPercent);
    expect(ns.confidenceLevel).toBe(0.9);
    expect(ns.forced).toBe(false);
    expect(ns.dampingRatio).toBeCloseTo(ns.dampingPercent / 100, 14);
    // shape: φ up to a complex scale (angles relative to a1.x)
    const truth = NS.shape.map((z, i) => ({ channel: NAMES[i], magnitude: Math.hypot(z.re, z.im), angleDeg: (Math.atan2(z.im, z.re) * 180) / Math.PI }));
    expect(mac(ns.shape, truth)).toBeGreaterThan(0.99);
    const ref = ns.shape.find((e) => e.channel === 'a1.x')!.angleDeg;
    for (const t of truth) {
      if (t.magnitude < 0.3) continue;
      const e = ns.shape.find((x) => x.channel === t.channel)!;
      const d = ((e.angleDeg - ref - t.angleDeg + 540) % 360) - 180;
      expect(Math.abs(d)).toBeLessThan(10);
    }
    expect(ns.shape.find((e) => e.channel === 'a1.x')!.magnitude).toBeCloseTo(1, 1);
    const ew = nearest(w, 0.62)!;
    expect(ew.frequencyHz).toBeCloseTo(0.62, 1);
    expect(Math.abs(ew.dampingPercent - 7)).toBeLessThan(3);
    // noise-floor poles are not reported: every mode stands out of the spectral floor
    expect(w.modes.every((m) => m.strength >= DEFAULT_AMBIENT_OPTIONS.minStrength)).toBe(true);
    expect(Object.keys(w.quality).sort()).toEqual([...NAMES].sort());
    expect(w.quality['a1.x']).toEqual({ samples: 36000, dropouts: 0, gaps: 0, longestGap: 0, flatLine: 0, outliers: 0 });
  });

  it('the acf-matrix-pencil method finds the same mode, with an interval', () => {
    const w = estimateAmbientWindow(synth(4), { ...OPTS, method: 'acf-matrix-pencil', arOrder: 12 });
    const ns = nearest(w, 0.3)!;
    expect(ns.frequencyHz).toBeCloseTo(0.3, 2);
    expect(Math.abs(ns.dampingPercent - 3)).toBeLessThan(1.5);
    expect(ns.dampingCi[0]).toBeLessThan(ns.dampingPercent);
    expect(ns.dampingCi[1]).toBeGreaterThan(ns.dampingPercent);
    // no nearly undamped spurious poles from surplus pencil orders
    expect(w.modes.filter((m) => !m.forced && m.dampingPercent < 1)).toEqual([]);
  });

  it('Monte Carlo, 12 windows at 3 %: bias, spread and 90 % interval coverage (paper: delete-a-group jackknife, Künsch 1989)', () => {
    const d: number[] = [];
    let coverD = 0;
    let coverF = 0;
    for (let seed = 101; seed <= 112; seed++) {
      const ns = nearest(estimateAmbientWindow(synth(seed), OPTS), 0.3)!;
      d.push(ns.dampingPercent);
      if (ns.dampingCi[0] <= 3 && 3 <= ns.dampingCi[1]) coverD++;
      if (ns.frequencyCi[0] <= 0.3 && 0.3 <= ns.frequencyCi[1]) coverF++;
      expect(Math.abs(ns.frequencyHz - 0.3)).toBeLessThan(0.01);
    }
    const mean = d.reduce((a, b) => a + b, 0) / d.length;
    const sd = Math.sqrt(d.reduce((a, b) => a + (b - mean) ** 2, 0) / (d.length - 1));
    expect(Math.abs(mean - 3)).toBeLessThan(0.5);
    expect(sd).toBeLessThan(1.0);
    expect(sd).toBeGreaterThan(0.1); // a real spread, not a constant answer
    expect(coverD).toBeGreaterThanOrEqual(9);
    expect(coverF).toBeGreaterThanOrEqual(9);
  });
});

describe('forced oscillations', () => {
  const forcedAt = (f: number, a: number) => ({
    forced: [{ frequencyHz: f, amplitude: [a, a * 0.5, a * 0.2, 0, 0, a * 0.1, a * 0.3, a * 0.6], phaseDeg: [0, 10, 20, 0, 0, 180, 170, 160] }],
  });

  it('marks a sustained 0.35 Hz or 0.5 Hz sinusoid forced, never as a poorly damped mode, and keeps the natural mode', () => {
    for (const [f, seed] of [
      [0.35, 201],
      [0.5, 202],
      [0.35, 203],
    ]) {
      const w = estimateAmbientWindow(synth(seed, forcedAt(f, 0.3)), OPTS);
      const line = w.modes.filter((m) => m.forced);
      expect(line).toHaveLength(1);
      expect(line[0].frequencyHz).toBeCloseTo(f, 3);
      expect(line[0].coherence!).toBeGreaterThan(0.5);
      // the line's shape is the injected amplitude pattern: largest on a1.x, b4.x in anti-phase
      expect(line[0].shape.find((e) => e.channel === 'a1.x')!.magnitude).toBeCloseTo(1, 1);
      // nothing natural and poorly damped sits at the line
      expect(w.modes.some((m) => !m.forced && Math.abs(m.frequencyHz - f) < 0.02 && m.dampingPercent < 3)).toBe(false);
      const ns = nearest(w, 0.3)!;
      expect(Math.abs(ns.dampingPercent - 3)).toBeLessThan(1.5);
    }
  });

  it('marks nothing forced in pure ambient data, even with the mode at 1 % damping', () => {
    for (let seed = 301; seed <= 306; seed++) {
      const w = estimateAmbientWindow(synth(seed, { modes: [{ ...NS, dampingPercent: seed % 2 ? 1 : 3 }, EW] }), OPTS);
      expect(w.modes.filter((m) => m.forced)).toEqual([]);
    }
  });

  it('can be switched off', () => {
    const w = estimateAmbientWindow(synth(201, forcedAt(0.5, 0.3)), { ...OPTS, forced: { enabled: false } });
    expect(w.modes.some((m) => m.forced)).toBe(false);
  });
});

describe('scanAmbient', () => {
  const rec40 = synth(401, { seconds: 1500 });

  it('slides windows every step, reports progress, and its first window is estimateAmbientWindow', () => {
    const progress: [number, number][] = [];
    const ws = scanAmbient(rec40, { ...OPTS, stepSeconds: 60 }, (d, t) => progress.push([d, t]));
    expect(ws).toHaveLength(6);
    expect(ws.map((w) => w.start)).toEqual([0, 60, 120, 180, 240, 300]);
    expect(progress.at(-1)).toEqual([6, 6]);
    const single = estimateAmbientWindow(rec40, OPTS);
    expect(ws[0].modes).toEqual(single.modes);
    expect(ws[0].quality).toEqual(single.quality);
  });

  it('gives the same windows when fed chunk by chunk through createAmbientScanner', () => {
    const whole = scanAmbient(rec40, { ...OPTS, stepSeconds: 120 });
    const got: AmbientWindowResult[] = [];
    const sc = createAmbientScanner({ rate: 30, startTime: 0, channelNames: NAMES }, { ...OPTS, stepSeconds: 120 }, (w) => got.push(w));
    const n = rec40.channels[0].values.length;
    const sizes = [7, 1799, 30000, 12345, 1];
    let i = 0;
    for (let k = 0; i < n; k++) {
      const j = Math.min(n, i + sizes[k % sizes.length]);
      sc.push(rec40.channels.map((c) => c.values.subarray(i, j)));
      i = j;
    }
    sc.finish();
    expect(got).toEqual(whole);
  });

  it('interpolates short gaps and skips windows touching a long one, with the reason', () => {
    const rec = synth(402, { seconds: 1500 });
    const v = rec.channels[2].values;
    v.fill(NaN, 30 * 100, 30 * 100 + 15); // 0.5 s: interpolated
    v.fill(NaN, 30 * 1300, 30 * 1305); // 5 s from 1300 s
    const ws = scanAmbient(rec, { ...OPTS, stepSeconds: 60 });
    expect(ws[0].skipped).toBe(false);
    expect(ws[0].quality['a3.x']).toMatchObject({ dropouts: 15, gaps: 1, longestGap: 15 });
    expect(ws[0].modes.length).toBeGreaterThan(0);
    // windows [60, 1260) still end before the gap (plus the anti-alias filter's reach); later ones touch it
    expect(ws[1].skipped).toBe(false);
    for (const w of ws.slice(2)) {
      expect(w.skipped).toBe(true);
      expect(w.modes).toEqual([]);
      expect(w.reason).toBe("channel 'a3.x' has a gap of 5 s at +1300 s (longer than maxGapSeconds 1 s) in or next to this window");
    }
  });

  it('after a long gap, skips the windows within ten DC-blocker time constants of its end (~5 min)', () => {
    const rec = synth(405, { seconds: 1900 });
    rec.channels[5].values.fill(NaN, 30 * 10, 30 * 15);
    const ws = scanAmbient(rec, { ...OPTS, stepSeconds: 60 });
    expect(ws.map((w) => w.skipped)).toEqual([true, true, true, true, true, true, false, false, false, false, false, false]);
    expect(ws[0].reason).toBe("channel 'b2.x' has a gap of 5 s at +10 s (longer than maxGapSeconds 1 s) in or next to this window");
    expect(ws[0].quality['b2.x']).toMatchObject({ dropouts: 150, gaps: 1, longestGap: 150 });
    expect(nearest(ws[6], 0.3)).toBeDefined();
  });

  it('skips a window missing too many samples', () => {
    const rec = synth(403, { seconds: 1200 });
    const v = rec.channels[0].values;
    for (let i = 0; i < v.length; i += 5) v[i] = NaN; // 20 % missing, every gap one sample
    const [w] = scanAmbient(rec, OPTS);
    expect(w.skipped).toBe(true);
    expect(w.reason).toBe("channel 'a1.x' misses 20 % of its samples in this window (limit maxMissingPercent 10 %)");
  });

  it('unwraps absolute angles and takes them relative to the reference (numpy.unwrap rule, library)', () => {
    // angles rotate with a 0.02 Hz off-nominal frequency and wrap at ±180°; relative angles are the
    // synthetic channels, so the result must equal the analysis of the relative data itself
    const rel = synth(404, { seconds: 1200, offset: [20, 25, 30, 35, -20, -25, -30, -35] });
    const n = rel.channels[0].values.length;
    const wrap = (a: number) => ((((a + 180) % 360) + 360) % 360) - 180;
    const refAngle = Float64Array.from({ length: n }, (_, i) => wrap(360 * 0.02 * (i / 30)));
    const abs: SampledRecord = {
      ...rel,
      channels: [
        ...rel.channels.map((c) => ({ name: c.name.replace('.x', '.angle'), values: Float64Array.from(c.values, (v, i) => wrap(v + refAngle[i])) })),
        { name: TARROW_ANGLE_REFERENCE, values: refAngle },
      ],
    };
    const a = estimateAmbientWindow(abs);
    const b = estimateAmbientWindow({ ...rel, channels: rel.channels.map((c) => ({ ...c, name: c.name.replace('.x', '.angle') })) }, OPTS);
    const fa = nearest(a, 0.3)!;
    const fb = nearest(b, 0.3)!;
    expect(fa.frequencyHz).toBeCloseTo(fb.frequencyHz, 8);
    expect(fa.dampingPercent).toBeCloseTo(fb.dampingPercent, 6);
  });
});

describe('modeShapeAt', () => {
  it('recovers the true shape at the modal frequency from raw channels', () => {
    const rec = synth(501);
    const res = modeShapeAt(rec, 0.3, { reference: 'a1.x' });
    expect(res.shape.find((e) => e.channel === 'a1.x')!.angleDeg).toBe(0);
    NS.shape.forEach((z, i) => {
      const e = res.shape[i];
      expect(e.channel).toBe(NAMES[i]);
      if (Math.hypot(z.re, z.im) < 0.3) return;
      expect(Math.abs(((e.angleDeg - (Math.atan2(z.im, z.re) * 180) / Math.PI + 540) % 360) - 180)).toBeLessThan(8);
      expect(e.magnitude).toBeCloseTo(Math.hypot(z.re, z.im), 1);
    });
    expect(res.dominance).toBeGreaterThan(0.8);
    expect(res.coherence).toBeLessThan(0.5);
  });

  it('refuses bad input', () => {
    expect(() => modeShapeAt({ rate: 5, signals: [[1, NaN, 2]], names: ['x'] }, 0.3)).toThrow(
      new ModalInputError("modeShapeAt: channel 'x' has a missing sample at index 1; fill gaps first"),
    );
    expect(() => modeShapeAt({ rate: 5, signals: [[1, 2, 3]], names: ['x'] }, 3)).toThrow(
      new ModalInputError('modeShapeAt: frequencyHz must lie between 0 and half the rate (2.5 Hz), got 3'),
    );
  });
});

describe('on the simulated Tarrow grid (truth: the simulator eigenvalues)', () => {
  it('estimates the east–west mode (weak in Highmoor, next to the north–south mode) and the Greyscar local mode, each once, with their shapes', () => {
    const transfer = transferAtDampingPercent('north-south', 3)!;
    const model = buildTarrowModel(transfer);
    const w = estimateAmbientWindow(simulateAmbient(model, { minutes: 20, seed: 8 }));
    const natural = w.modes.filter((m) => !m.forced);
    for (const track of ['east-west', 'greyscar']) {
      const truth = model.trueModes.find((m) => m.track === track)!;
      // one estimate per physical mode: none other within the true half-power half-width (a
      // pooled high-order AR model split the east–west peak into two poles)
      const halfWidth = -truth.sigma / (2 * Math.PI);
      const near = natural.filter((m) => Math.abs(m.frequencyHz - truth.frequencyHz) < halfWidth);
      expect(near, track).toHaveLength(1);
      const est = near[0];
      expect(Math.abs(est.frequencyHz - truth.frequencyHz), track).toBeLessThan(track === 'greyscar' ? 0.04 : 0.01);
      expect(Math.abs(est.dampingPercent - truth.dampingPercent), track).toBeLessThan(2);
      expect(est.dampingCi[0]).toBeLessThan(est.dampingPercent);
      expect(est.dampingCi[1]).toBeGreaterThan(est.dampingPercent);
      // shape: relative angles against the eigenvector on every channel that moves (|true| ≥ 0.05)
      const angles = est.shape.filter((e) => e.channel.endsWith('.angle'));
      const ref = angles.reduce((b, e) => (e.magnitude > b.magnitude ? e : b));
      const tru = modeOutputShape(model, truth, angles.map((e) => e.channel), { angleReference: TARROW_ANGLE_REFERENCE, reference: ref.channel });
      expect(mac(angles, tru), track).toBeGreaterThan(0.95);
      for (const t of tru) {
        if (t.magnitude < 0.05) continue;
        const e = angles.find((x) => x.channel === t.channel)!;
        expect(Math.abs(((e.angleDeg - ref.angleDeg - t.angleDeg + 540) % 360) - 180), `${track} ${t.channel}`).toBeLessThan(15);
      }
    }
    // the Greyscar mode lives in the Greyscar channels
    const gs = natural.find((m) => m.frequencyHz > 1 && m.frequencyHz < 1.6)!;
    expect(gs.shape.filter((e) => e.channel.endsWith('.angle')).sort((a, b) => b.magnitude - a.magnitude)[0].channel).toBe('greyscar.angle');
  });

  it('estimates the north–south mode at 3 % and its shape against the true eigenvector', () => {
    const transfer = transferAtDampingPercent('north-south', 3)!;
    const model = buildTarrowModel(transfer);
    const truth = model.trueModes.find((m) => m.track === 'north-south')!;
    const w = estimateAmbientWindow(simulateAmbient(model, { minutes: 20, seed: 7 }));
    const est = nearest(w, truth.frequencyHz)!;
    expect(Math.abs(est.frequencyHz - truth.frequencyHz)).toBeLessThan(0.01);
    expect(Math.abs(est.dampingPercent - truth.dampingPercent)).toBeLessThan(1.5);
    const angles = est.shape.filter((e) => e.channel.endsWith('.angle'));
    const ref = angles.reduce((b, e) => (e.magnitude > b.magnitude ? e : b));
    const tru = modeOutputShape(model, truth, angles.map((e) => e.channel), { angleReference: TARROW_ANGLE_REFERENCE, reference: ref.channel });
    expect(mac(angles, tru)).toBeGreaterThan(0.9);
    for (const t of tru) {
      if (t.magnitude < 0.2) continue;
      const e = angles.find((x) => x.channel === t.channel)!;
      expect(Math.abs(((e.angleDeg - ref.angleDeg - t.angleDeg + 540) % 360) - 180)).toBeLessThan(15);
    }
  });
});
