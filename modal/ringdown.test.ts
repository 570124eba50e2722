import { describe, expect, it } from 'vitest';
import { addNoise, dampedSum, sigmaOmega, type TrueMode } from '../tests/reference/signals';
import { ModalInputError } from './errors';
import {
  checkRingdownOptions,
  DEFAULT_RINGDOWN_OPTIONS,
  decimationFactor,
  fitRingdown,
  poleFromZ,
  type RingdownRequest,
  sortModes,
} from './ringdown';
import type { RingdownMethod, RingdownResult, SampledRecord } from './types';

// Known-answer data: sums of damped sinusoids from known parameters (CHECKS.md §1: exactly
// recoverable when noise-free), then noisy Monte-Carlo runs with bias/spread bounds.

const METHODS: RingdownMethod[] = ['matrix-pencil', 'prony'];
const MODES: TrueMode[] = [
  { frequencyHz: 0.3, dampingRatio: 0.03, amplitude: 1, phaseDeg: 20 },
  { frequencyHz: 0.62, dampingRatio: 0.07, amplitude: 0.6, phaseDeg: -50 },
  { frequencyHz: 1.3, dampingRatio: 0.1, amplitude: 0.4, phaseDeg: 120 },
];
const shifted = (ms: TrueMode[], gain: number, dPhase: number) =>
  ms.map((m) => ({ ...m, amplitude: m.amplitude * gain, phaseDeg: m.phaseDeg + dPhase }));

function record(rate: number, channels: Record<string, Float64Array>): SampledRecord {
  return { startTime: 1_700_000_000, rate, channels: Object.entries(channels).map(([name, values]) => ({ name, values })) };
}

const wrap180 = (d: number) => ((((d + 180) % 360) + 360) % 360) - 180;

/** Every true mode found once, to relTol in frequency, damping, and per-channel amplitude/phase. */
function expectModes(result: RingdownResult, truth: Record<string, TrueMode[]>, relTol: number) {
  const first = Object.values(truth)[0];
  expect(result.modes).toHaveLength(first.length);
  first.forEach((t, k) => {
    const m = result.modes.find((q) => Math.abs(q.frequencyHz - t.frequencyHz) < 0.05 * t.frequencyHz);
    expect(m, `mode near ${t.frequencyHz} Hz`).toBeDefined();
    expect(Math.abs(m!.frequencyHz / t.frequencyHz - 1)).toBeLessThan(relTol);
    expect(Math.abs(m!.dampingRatio / t.dampingRatio - 1)).toBeLessThan(relTol);
    expect(m!.dampingPercent).toBeCloseTo(100 * m!.dampingRatio, 12);
    for (const [name, ms] of Object.entries(truth)) {
      const ch = m!.channels.find((c) => c.channel === name)!;
      expect(Math.abs(ch.amplitude / ms[k].amplitude - 1)).toBeLessThan(relTol);
      expect(Math.abs(wrap180(ch.phaseDeg - ms[k].phaseDeg))).toBeLessThan(relTol * 360);
    }
  });
}

describe('poleFromZ and sortModes', () => {
  it('inverts z = exp(s/fs): s = fs·ln z, f = ω/2π, ζ = −Re(s)/|s| (textbook, exact: CHECKS.md §1)', () => {
    const fs = 10;
    const { sigma, omega } = sigmaOmega(MODES[0]);
    const z = { re: Math.exp(-sigma / fs) * Math.cos(omega / fs), im: Math.exp(-sigma / fs) * Math.sin(omega / fs) };
    const p = poleFromZ(z, fs);
    expect(p.frequencyHz).toBeCloseTo(0.3, 13);
    expect(p.dampingRatio).toBeCloseTo(0.03, 13);
    expect(p.dampingPercent).toBeCloseTo(3, 11);
    expect(p.sigma).toBeCloseTo(-sigma, 13);
    expect(p.omega).toBeCloseTo(omega, 13);
    // a growing oscillation has negative damping
    expect(poleFromZ({ re: 1.01, im: 0.1 }, fs).dampingRatio).toBeLessThan(0);
  });

  it('sorts by energy share, or by frequency', () => {
    const base = { dampingRatio: 0.05, dampingPercent: 5, sigma: -0.1, omega: 1 };
    const modes = [
      { ...base, frequencyHz: 1, energyShare: 0.2 },
      { ...base, frequencyHz: 0.5, energyShare: 0.7 },
      { ...base, frequencyHz: 2, energyShare: 0.1 },
    ];
    expect(sortModes([...modes]).map((m) => m.energyShare)).toEqual([0.7, 0.2, 0.1]);
    expect(sortModes([...modes], 'frequency').map((m) => m.frequencyHz)).toEqual([0.5, 1, 2]);
  });
});

describe('fitRingdown on noise-free data (exact recovery, CHECKS.md §1)', () => {
  for (const method of METHODS) {
    it(`${method}: one channel at 30 frames/s with the default preprocessing, to 1e-6`, () => {
      const r = fitRingdown(record(30, { a: dampedSum(MODES, 30, 600) }), { method });
      expect(r.method).toBe(method);
      expect(r.rate).toBe(10); // decimated by 3 (analysisRate 'auto')
      expectModes(r, { a: MODES }, 1e-6);
      expect(r.snrDb).toBeGreaterThan(150);
    });

    it(`${method}: three channels sharing the modes, to 1e-6, amplitude and phase per channel`, () => {
      const truth = { a: MODES, b: shifted(MODES, 2.5, 70), c: shifted(MODES, 0.3, -140) };
      const rec = record(30, Object.fromEntries(Object.entries(truth).map(([k, ms]) => [k, dampedSum(ms, 30, 600)])));
      const r = fitRingdown(rec, { method });
      expectModes(r, truth, 1e-6);
      const shares = r.modes.map((m) => m.energyShare);
      expect(shares.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 12);
      expect([...shares].sort((a, b) => b - a)).toEqual(shares);
    });

    it(`${method}: without any preprocessing (native rate, no detrend), to 1e-6`, () => {
      const r = fitRingdown(record(30, { a: dampedSum(MODES, 30, 450) }), {
        method,
        analysisRate: 30,
        detrend: 'none',
        order: 6,
      });
      expect(r.rate).toBe(30);
      expect(r.order).toBe(6);
      expectModes(r, { a: MODES }, 1e-6);
    });
  }

  it('handles 60 and 50 frames/s records (decimation by 7 and 6) to 1e-6', () => {
    for (const rate of [60, 50]) {
      const r = fitRingdown(record(rate, { a: dampedSum(MODES, rate, 20 * rate) }));
      expect(r.rate).toBeCloseTo(rate / (rate === 60 ? 7 : 6), 12);
      expectModes(r, { a: MODES }, 1e-6);
    }
  });

  it('fits an interval after the event: amplitude and phase refer to the interval start', () => {
    const rate = 30;
    const pre = 5; // s of quiet signal before the event
    const values = new Float64Array(25 * rate).fill(0.25);
    const ring = dampedSum(MODES, rate, 20 * rate);
    for (let i = 0; i < ring.length; i++) values[pre * rate + i] += ring[i];
    const r = fitRingdown(record(rate, { a: values, b: values.map((v) => 2 * v) }), { fromSeconds: pre });
    expect(r.startIndex).toBe(pre * rate);
    expect(r.endIndex).toBe(values.length);
    expectModes(r, { a: MODES, b: shifted(MODES, 2, 0) }, 1e-6);
  });

  it('removes an offset and a ramp jointly with the modes; the shown input is the record minus that trend', () => {
    const rate = 30;
    const n = 600;
    const ring = dampedSum(MODES, rate, n);
    const values = ring.map((v, i) => v + 3 - 0.05 * (i / rate));
    const r = fitRingdown(record(rate, { a: values }));
    expectModes(r, { a: MODES }, 1e-6);
    const rec = r.reconstruction[0];
    rec.input.forEach((v, i) => expect(v).toBeCloseTo(ring[i], 8));
  });

  it('reconstructs on the record grid: per-mode parts sum to the total, residual = input − total', () => {
    const rate = 30;
    const r = fitRingdown(record(rate, { a: dampedSum(MODES, rate, 600), b: dampedSum(shifted(MODES, -1, 10), rate, 600) }), {
      fromSeconds: 2,
      toSeconds: 18,
      minEnergyShare: 0, // from 2 s on, the 1.3 Hz mode carries under 0.1 % of the energy
    });
    expect(r.modes).toHaveLength(3);
    expect(r.recordRate).toBe(30);
    const n = 16 * rate + 1;
    expect(r.reconstruction.map((x) => x.channel)).toEqual(['a', 'b']);
    for (const ch of r.reconstruction) {
      expect(ch.input).toHaveLength(n);
      expect(ch.total).toHaveLength(n);
      expect(ch.perMode).toHaveLength(r.modes.length);
      for (let i = 0; i < n; i++) {
        const sum = ch.perMode.reduce((s, pm) => s + pm[i], 0);
        expect(ch.total[i]).toBeCloseTo(sum, 12);
        expect(ch.residual[i]).toBeCloseTo(ch.input[i] - ch.total[i], 12);
        expect(Math.abs(ch.residual[i])).toBeLessThan(1e-8);
      }
    }
  });

  it('keeps a growing oscillation, drops out-of-band modes unless the band includes them', () => {
    const growing: TrueMode = { frequencyHz: 0.45, dampingRatio: -0.02, amplitude: 0.5, phaseDeg: 0 };
    const fast: TrueMode = { frequencyHz: 3, dampingRatio: 0.05, amplitude: 1, phaseDeg: 0 };
    const rec = record(30, { a: dampedSum([MODES[0], growing, fast], 30, 600) });
    const r = fitRingdown(rec);
    expect(r.modes.map((m) => Math.round(m.frequencyHz * 100) / 100).sort()).toEqual([0.3, 0.45]);
    expect(r.modes.find((m) => Math.abs(m.frequencyHz - 0.45) < 1e-3)!.dampingRatio).toBeCloseTo(-0.02, 6);
    const wide = fitRingdown(rec, { bandHz: [0.1, 4] });
    expect(wide.rate).toBe(30); // max(5, 4·4) = 16 samples/s needed: no whole factor of 30 above it but 1
    expect(wide.modes.some((m) => Math.abs(m.frequencyHz - 3) < 1e-6 && Math.abs(m.dampingRatio - 0.05) < 1e-6)).toBe(true);
  });

  it('gives the same modes for data scaled by 1e−300 or 1e300 (no under- or overflow), amplitudes in the data units', () => {
    for (const scale of [1e-300, 1e300]) {
      const truth = MODES.map((m) => ({ ...m, amplitude: m.amplitude * scale }));
      for (const method of METHODS) {
        const r = fitRingdown(record(30, { a: dampedSum(truth, 30, 600) }), { method });
        expectModes(r, { a: truth }, 1e-6);
        expect(r.reconstruction[0].total[0] / scale).toBeCloseTo(dampedSum(MODES, 30, 1)[0], 6);
      }
    }
  });

  it('drops modes under minEnergyShare, keeps them when the threshold is 0', () => {
    const weak: TrueMode = { frequencyHz: 1.1, dampingRatio: 0.15, amplitude: 0.05, phaseDeg: 0 };
    const rec = record(30, { a: dampedSum([MODES[0], weak], 30, 600) });
    const r = fitRingdown(rec);
    expect(r.modes).toHaveLength(1);
    const all = fitRingdown(rec, { minEnergyShare: 0 });
    expect(all.modes).toHaveLength(2);
    expect(all.modes[1].energyShare).toBeLessThan(0.01);
    expect(Math.abs(all.modes[1].dampingRatio / 0.15 - 1)).toBeLessThan(1e-6);
  });
});

describe('fitRingdown precision in noise (Monte Carlo, seeded)', () => {
  // 0.3 Hz, 3 % mode, 20 s at 30 frames/s, SNR 20 dB = signal power / noise power over the
  // interval. Bounds are the product's accuracy targets (damping bias within ±0.2 percentage
  // points, spread ≤ 0.3 points, frequency spread ≤ 0.005 Hz); measured here over 200 runs:
  // matrix pencil bias +0.005 points, spread 0.050; Prony bias +0.006, spread 0.061.
  const truth: TrueMode = { frequencyHz: 0.3, dampingRatio: 0.03, amplitude: 1, phaseDeg: 23 };
  const clean = dampedSum([truth], 30, 600);
  for (const method of METHODS) {
    it(`${method}: 30 realisations meet the bias and spread targets`, () => {
      const f: number[] = [];
      const d: number[] = [];
      for (let k = 0; k < 30; k++) {
        const r = fitRingdown(record(30, { a: addNoise(clean, 20, 1000 + k) }), { method });
        const m = r.modes.find((q) => Math.abs(q.frequencyHz - 0.3) < 0.03);
        expect(m).toBeDefined();
        f.push(m!.frequencyHz);
        d.push(m!.dampingPercent);
        expect(r.snrDb).toBeGreaterThan(15);
        expect(r.snrDb).toBeLessThan(25);
      }
      const mean = (a: number[]) => a.reduce((s, v) => s + v, 0) / a.length;
      const sd = (a: number[]) => Math.sqrt(a.reduce((s, v) => s + (v - mean(a)) ** 2, 0) / (a.length - 1));
      expect(Math.abs(mean(d) - 3)).toBeLessThan(0.2);
      expect(sd(d)).toBeLessThan(0.3);
      expect(Math.abs(mean(f) - 0.3)).toBeLessThan(0.002);
      expect(sd(f)).toBeLessThan(0.005);
    });
  }

  it('optional pre-filter still finds the mode within the targets on one run', () => {
    const r = fitRingdown(record(30, { a: addNoise(clean, 20, 7) }), { prefilter: true });
    const m = r.modes.find((q) => Math.abs(q.frequencyHz - 0.3) < 0.03)!;
    expect(Math.abs(m.dampingPercent - 3)).toBeLessThan(0.5);
  });
});

describe('fitRingdown refuses bad input with precise messages (and never hangs)', () => {
  const rate = 30;
  const a = dampedSum(MODES, rate, 600);
  const base = () => ({ a: a.slice(), b: a.map((v) => -v), flat: new Float64Array(600).fill(1.5) });
  const expectRefusal = (channels: Record<string, Float64Array>, req: RingdownRequest, message: string) => {
    const run = () => fitRingdown(record(rate, channels), req);
    expect(run).toThrow(ModalInputError);
    expect(run).toThrow(message);
  };

  it('unknown, duplicate or no channels', () => {
    expectRefusal(base(), { channels: ['a', 'x'] }, 'Unknown channel "x"; the record has: a, b, flat');
    expectRefusal(base(), { channels: ['a', 'a'] }, 'Channel "a" is selected twice');
    expectRefusal(base(), { channels: [] }, 'No channels selected; choose at least one');
    expect(() => fitRingdown({ startTime: 0, rate, channels: [] })).toThrow('The record has no channels');
  });

  it('NaN or Inf inside the interval', () => {
    const ch = base();
    ch.b[75] = NaN;
    expectRefusal(
      ch,
      { channels: ['a', 'b'] },
      'Channel "b" has a missing or non-finite sample (NaN) at 2.5 s (sample 75); fill the gap or choose an interval without it',
    );
    ch.b[75] = 0;
    ch.a[599] = -Infinity;
    expectRefusal(
      ch,
      { channels: ['a'] },
      'Channel "a" has a missing or non-finite sample (-Infinity) at 19.966667 s (sample 599); fill the gap or choose an interval without it',
    );
    // outside the interval it does not matter
    expect(fitRingdown(record(rate, { a: ch.a }), { toSeconds: 19 }).modes.length).toBe(3);
  });

  it('constant channels and channels that are only a trend', () => {
    expectRefusal(base(), {}, 'Channel "flat" is constant (1.5) over the interval; a ring-down fit needs an oscillation');
    const ramp = Float64Array.from({ length: 600 }, (_, i) => 60 + 0.001 * i);
    expectRefusal({ ramp }, {}, 'Channel "ramp" has nothing left to fit after removing its straight-line trend');
  });

  it('too-short intervals', () => {
    expectRefusal(
      base(),
      { channels: ['a'], toSeconds: 0.5 },
      'The interval is too short: 16 samples (0.5 s at 30 samples/s); a ring-down fit needs at least 58 (1.9 s)',
    );
    expect(() => fitRingdown(record(10, { a: dampedSum(MODES, 10, 19) }))).toThrow(
      'The interval is too short: 19 samples (1.8 s at 10 samples/s); a ring-down fit needs at least 20 (1.9 s)',
    );
  });

  it('orders and pencils larger than the data allow', () => {
    expectRefusal(
      base(),
      { channels: ['a'], order: 150 },
      'Model order 150 is too large for this interval: 200 samples at the analysis rate of 10 samples/s allow at most 100',
    );
    expectRefusal(
      base(),
      { channels: ['a'], method: 'prony', order: 101 },
      'Model order 101 is too large for this interval: 200 samples at the analysis rate of 10 samples/s allow at most 100',
    );
    expectRefusal(
      base(),
      { channels: ['a'], pencil: 120 },
      'Pencil parameter 120 is too large for this interval: 200 samples at the analysis rate of 10 samples/s allow at most 100',
    );
    expectRefusal(base(), { channels: ['a'], pencil: 20, order: 30 }, 'Model order 30 must not exceed the pencil parameter 20');
  });

  it('intervals longer than a ring-down (bounded work: no hang on an hour of data)', () => {
    const long = new Float64Array(3600 * 10);
    for (let i = 0; i < long.length; i++) long[i] = Math.sin(i / 7);
    expect(() => fitRingdown(record(10, { a: long }))).toThrow(
      'The interval is 3599.9 s long; a ring-down fit takes at most 600 s — choose the interval after the event',
    );
  });

  it('intervals outside the record', () => {
    expectRefusal(base(), { fromSeconds: 10, toSeconds: 5 }, 'Interval end 5 s must be after its start 10 s');
    expectRefusal(base(), { fromSeconds: -1 }, 'Interval start must be a number of seconds ≥ 0, got -1');
    expectRefusal(base(), { toSeconds: 25 }, "Interval end 25 s is beyond the record's last sample at 19.966667 s");
    expectRefusal(base(), { fromSeconds: 21, toSeconds: 22 }, "Interval start 21 s is beyond the record's last sample at 19.966667 s");
    expectRefusal(base(), { toSeconds: NaN }, 'Interval end must be a finite number of seconds, got NaN');
  });

  it('record problems', () => {
    expect(() => fitRingdown({ startTime: 0, rate: 0, channels: [{ name: 'a', values: a }] })).toThrow(
      "The record's rate must be a positive number of samples/s, got 0",
    );
    expect(() =>
      fitRingdown({
        startTime: 0,
        rate,
        channels: [
          { name: 'a', values: a },
          { name: 'b', values: a.subarray(1) },
        ],
      }),
    ).toThrow('Channel "b" has 599 samples but channel "a" has 600');
  });
});

describe('checkRingdownOptions', () => {
  it('fills the documented defaults', () => {
    expect(checkRingdownOptions({})).toEqual({
      method: 'matrix-pencil',
      bandHz: [0.1, 2.0],
      analysisRate: 'auto',
      detrend: 'linear',
      prefilter: false,
      order: 'auto',
      pencil: 'auto',
      dampingRange: [-0.2, 0.5],
      minEnergyShare: 0.01,
      normalizeChannels: true,
    });
    expect(checkRingdownOptions({ method: 'prony', order: 12 })).toMatchObject({ method: 'prony', order: 12 });
    expect(Object.isFrozen(DEFAULT_RINGDOWN_OPTIONS)).toBe(true);
  });

  it('auto analysis rate: largest whole decimation keeping ≥ max(5, 4·bandHz[1]) samples/s', () => {
    const o = DEFAULT_RINGDOWN_OPTIONS;
    expect(decimationFactor(o, 30)).toBe(3);
    expect(decimationFactor(o, 60)).toBe(7);
    expect(decimationFactor(o, 50)).toBe(6);
    expect(decimationFactor(o, 25)).toBe(3);
    expect(decimationFactor(o, 10)).toBe(1);
    expect(decimationFactor({ ...o, analysisRate: 15 }, 60)).toBe(4);
  });

  const cases: [Record<string, unknown>, string][] = [
    [{ method: 'ls' }, 'Ring-down method must be one of "prony", "matrix-pencil", got "ls"'],
    [{ bandHz: [2, 1] }, 'bandHz must be [low, high] with 0 ≤ low < high (Hz), got [2, 1]'],
    [{ bandHz: [0.1] }, 'bandHz must be [low, high] with 0 ≤ low < high (Hz), got [0.1]'],
    [{ detrend: 'quadratic' }, 'detrend must be one of "none", "constant", "linear", got "quadratic"'],
    [{ prefilter: 'yes' }, 'prefilter must be true or false, got "yes"'],
    [{ order: 0 }, 'order must be "auto" or an integer from 1 to 200, got 0'],
    [{ order: 2.5 }, 'order must be "auto" or an integer from 1 to 200, got 2.5'],
    [{ order: 500 }, 'order must be "auto" or an integer from 1 to 200, got 500'],
    [{ pencil: -3 }, 'pencil must be "auto" or an integer from 1 to 500, got -3'],
    [{ pencil: 1000 }, 'pencil must be "auto" or an integer from 1 to 500, got 1000'],
    [{ method: 'prony', pencil: 30 }, 'pencil applies to the matrix pencil method only; method is "prony"'],
    [{ dampingRange: [0.5, 0.1] }, 'dampingRange must be [min, max] damping ratios with −1 ≤ min < max ≤ 1, got [0.5, 0.1]'],
    [{ minEnergyShare: 1 }, 'minEnergyShare must be a number in [0, 1), got 1'],
    [{ analysisRate: 0 }, 'analysisRate must be "auto" or a positive number of samples/s, got 0'],
    [{ normalizeChannels: 1 }, 'normalizeChannels must be true or false, got 1'],
    [{ orderr: 3 }, 'Unknown ring-down option "orderr"; known options: method, bandHz, analysisRate, detrend, prefilter, order, pencil, dampingRange, minEnergyShare, normalizeChannels'],
  ];
  for (const [opts, message] of cases) {
    it(`refuses ${JSON.stringify(opts)}`, () => {
      expect(() => checkRingdownOptions(opts as never)).toThrow(ModalInputError);
      expect(() => checkRingdownOptions(opts as never)).toThrow(message);
    });
  }

  it('checks what depends on the record rate', () => {
    expect(() => checkRingdownOptions({ analysisRate: 7 }, { rate: 30 })).toThrow(
      "analysisRate 7 samples/s must equal the record's rate 30 samples/s divided by a whole number",
    );
    expect(() => checkRingdownOptions({ analysisRate: 10, bandHz: [0.1, 6] }, { rate: 30 })).toThrow(
      'bandHz upper edge 6 Hz must lie below the Nyquist frequency 5 Hz of the analysis rate 10 samples/s',
    );
    expect(() => checkRingdownOptions({ analysisRate: 2 }, { rate: 60 })).toThrow(
      'analysisRate 2 samples/s needs decimation by 30; at most 13 is supported',
    );
  });
});
