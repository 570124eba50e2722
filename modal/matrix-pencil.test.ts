import { beforeAll, describe, expect, it } from 'vitest';
import { maxPairedDistance, runReference } from '../tests/reference/run-reference';
import { addNoise, dampedSum, type TrueMode } from '../tests/reference/signals';
import { defaultPencil, matrixPencilFit, selectOrder } from './matrix-pencil';
import { createRng } from './random';
import { poleFromZ } from './ringdown';

// Known-answer data (CHECKS.md §1, exact when noise-free) and an independent matrix pencil written
// with numpy.linalg.svd / lstsq / eigvals (library) in tests/reference/modal_ref.py.

const MODES: TrueMode[] = [
  { frequencyHz: 0.3, dampingRatio: 0.03, amplitude: 1, phaseDeg: 20 },
  { frequencyHz: 0.62, dampingRatio: 0.07, amplitude: 0.6, phaseDeg: -50 },
  { frequencyHz: 1.3, dampingRatio: 0.1, amplitude: 0.4, phaseDeg: 120 },
];

function upperModes(fit: ReturnType<typeof matrixPencilFit>, c = 0) {
  return fit.poles
    .map((z, k) => ({ z, pole: poleFromZ(z, fit.rate), r: fit.residues[c][k] }))
    .filter((m) => m.z.im > 0)
    .sort((a, b) => a.pole.frequencyHz - b.pole.frequencyHz);
}

function expectRecovered(fit: ReturnType<typeof matrixPencilFit>, truth: TrueMode[][], relTol: number) {
  truth.forEach((channelModes, c) => {
    const got = upperModes(fit, c);
    expect(got).toHaveLength(channelModes.length);
    got.forEach((g, k) => {
      const t = channelModes[k];
      expect(Math.abs(g.pole.frequencyHz / t.frequencyHz - 1)).toBeLessThan(relTol);
      expect(Math.abs(g.pole.dampingRatio / t.dampingRatio - 1)).toBeLessThan(relTol);
      expect(Math.abs((2 * Math.hypot(g.r.re, g.r.im)) / t.amplitude - 1)).toBeLessThan(relTol);
    });
  });
}

const noisyOne = addNoise(dampedSum(MODES, 10, 200), 20, 11);
const noisyThree = [0, 1, 2].map((c) =>
  addNoise(
    dampedSum(
      MODES.map((m) => ({ ...m, amplitude: m.amplitude * (1 + c), phaseDeg: m.phaseDeg + 40 * c })),
      10,
      180,
    ),
    15,
    20 + c,
  ),
);
let ref: Record<string, unknown>[];
beforeAll(() => {
  ref = runReference([
    { kind: 'mp_poles', signals: [noisyOne], order: 8, pencil: 67 },
    { kind: 'mp_poles', signals: noisyThree, order: 10, pencil: 80 },
  ]).results;
});

describe('matrixPencilFit', () => {
  it('recovers a noise-free sum of three damped sinusoids, choosing order 6 itself (textbook, exact: CHECKS.md §1)', () => {
    const fit = matrixPencilFit([dampedSum(MODES, 10, 200)], 10);
    expect(fit.order).toBe(6);
    expect(fit.pencil).toBe(67);
    expectRecovered(fit, [MODES], 1e-6);
  });

  it('recovers the modes from three channels through the stacked Hankel matrix (multi-channel, exact)', () => {
    const channels = [
      MODES,
      MODES.map((m) => ({ ...m, amplitude: 3 * m.amplitude, phaseDeg: m.phaseDeg - 100 })),
      MODES.map((m, k) => ({ ...m, amplitude: m.amplitude * 0.2 * (3 - k), phaseDeg: 0 })),
    ];
    const fit = matrixPencilFit(
      channels.map((ms) => dampedSum(ms, 10, 120)),
      10,
    );
    expect(fit.order).toBe(6);
    expectRecovered(fit, channels, 1e-6);
  });

  it('a mode absent from one channel still comes out right in the others (multi-channel, exact)', () => {
    const channels = [MODES.slice(0, 2), MODES.slice(1)];
    const fit = matrixPencilFit(
      channels.map((ms) => dampedSum(ms, 10, 150)),
      10,
    );
    expect(fit.order).toBe(6);
    const got = upperModes(fit, 0);
    got.forEach((g, k) => {
      expect(Math.abs(g.pole.frequencyHz / MODES[k].frequencyHz - 1)).toBeLessThan(1e-6);
      expect(Math.abs(g.pole.dampingRatio / MODES[k].dampingRatio - 1)).toBeLessThan(1e-6);
    });
    // channel 0 carries no 1.3 Hz mode, channel 1 no 0.3 Hz mode
    expect(Math.hypot(got[2].r.re, got[2].r.im)).toBeLessThan(1e-9);
    expect(Math.hypot(upperModes(fit, 1)[0].r.re, upperModes(fit, 1)[0].r.im)).toBeLessThan(1e-9);
  });

  it('is exact on oversampled 30 frames/s data too (textbook: CHECKS.md §1)', () => {
    const fit = matrixPencilFit([dampedSum(MODES, 30, 300)], 30);
    expect(fit.order).toBe(6);
    expectRecovered(fit, [MODES], 1e-6);
  });

  it('matches an independent numpy matrix pencil on noisy data, poles and singular values (library: numpy.linalg.svd, numpy.linalg.lstsq, numpy.linalg.eigvals)', () => {
    const one = matrixPencilFit([noisyOne], 10, { order: 8, pencil: 67 });
    expect(maxPairedDistance(one.poles, ref[0].poles as [number, number][])).toBeLessThan(1e-10);
    const s0 = ref[0].s as number[];
    one.singularValues.forEach((s, i) => expect(Math.abs(s - s0[i])).toBeLessThan(1e-12 * s0[0]));
    const three = matrixPencilFit(noisyThree, 10, { order: 10, pencil: 80 });
    expect(maxPairedDistance(three.poles, ref[1].poles as [number, number][])).toBeLessThan(1e-10);
  });

  it('finds all three modes in 20 dB noise with the automatic order', () => {
    const fit = matrixPencilFit([noisyOne], 10);
    expect(fit.order).toBeGreaterThanOrEqual(6);
    const got = upperModes(fit);
    for (const m of MODES) {
      const near = got.filter((g) => Math.abs(g.pole.frequencyHz - m.frequencyHz) < 0.05 * m.frequencyHz);
      expect(near.length).toBeGreaterThanOrEqual(1);
    }
  });

  it('refuses bad input with precise messages', () => {
    const x = dampedSum(MODES, 10, 20);
    expect(() => matrixPencilFit([x], 10, { order: 11 })).toThrow(
      'matrixPencilFit: order 11 is too large for 20 samples per channel (at most 10)',
    );
    expect(() => matrixPencilFit([x], 10, { order: 8, pencil: 6 })).toThrow('matrixPencilFit: order 8 exceeds the pencil parameter 6');
    expect(() => matrixPencilFit([x], 10, { pencil: 20 })).toThrow('matrixPencilFit: pencil must be an integer from 1 to 19, got 20');
    expect(() => matrixPencilFit([new Float64Array(2000).fill(1)], 10, { pencil: 600 })).toThrow(
      "matrixPencilFit: pencil 600 is above the supported maximum 500 (the SVD's cost grows with its cube)",
    );
    expect(() => matrixPencilFit([x.subarray(0, 3)], 10)).toThrow('matrixPencilFit: 3 samples per channel are too few (at least 4)');
    expect(() => matrixPencilFit([new Float64Array(30)], 10)).toThrow('matrixPencilFit: the signals are all zero; there is nothing to fit');
    expect(() => matrixPencilFit([x.map((v) => v * 1e300)], 10)).toThrow(
      'matrixPencilFit: the computation overflowed double precision (values too large); rescale the data',
    );
    const bad = x.slice();
    bad[2] = -Infinity;
    expect(() => matrixPencilFit([bad], 10)).toThrow('matrixPencilFit: signal 0 sample 2 is -Infinity');
  });
});

describe('order and pencil rules', () => {
  it('selectOrder: numerical rank when some singular values are numerically zero', () => {
    expect(selectOrder([10, 5, 1, 1e-3, 1e-14, 1e-15], 5)).toBe(4);
    expect(selectOrder([10, 5, 1, 1e-3, 1e-14, 1e-15], 2)).toBe(2);
    expect(selectOrder([0, 0], 2)).toBe(0);
  });

  it('selectOrder: singular values above 2.5× the median when the data are noisy', () => {
    const s = [50, 40, 9, 2.5, 1.3, 1.2, 1.1, 1.0, 0.9, 0.8, 0.7];
    // median 1.1 → threshold 2.75: 50, 40 and 9 count
    expect(selectOrder(s, 10)).toBe(3);
    expect(selectOrder(s, 10, 1e-9, 2)).toBe(4);
  });

  it('selectOrder on pure white noise stays small (random-matrix bound, textbook: Marchenko–Pastur)', () => {
    const rng = createRng(3);
    const fit = matrixPencilFit([rng.fillNormal(new Float64Array(300))], 10);
    expect(fit.order).toBeLessThanOrEqual(2);
  });

  it('default pencil is round(N/3) up to 150, raised to the order, at most floor(N/2) (paper: Sarkar & Pereira 1995)', () => {
    expect(defaultPencil(200)).toBe(67);
    expect(defaultPencil(200, 80)).toBe(80);
    expect(defaultPencil(200, 150)).toBe(100);
    expect(defaultPencil(7)).toBe(2);
    expect(defaultPencil(3000)).toBe(150); // capped: the SVD cost grows with L³
    expect(defaultPencil(3000, 180)).toBe(180);
  });
});
