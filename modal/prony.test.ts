import { beforeAll, describe, expect, it } from 'vitest';
import { maxPairedDistance, runReference } from '../tests/reference/run-reference';
import { addNoise, dampedSum, sigmaOmega, type TrueMode } from '../tests/reference/signals';
import { type Complex } from './linalg';
import { fitResidues, pronyFit } from './prony';
import { poleFromZ } from './ringdown';

// Known-answer data: sums of damped sinusoids with known poles (CHECKS.md §1: recovered exactly,
// to rounding, at model order 2K when noise-free). Noisy data are compared with an independent
// least-squares Prony written with numpy.linalg.lstsq and numpy.roots (library).

const MODES: TrueMode[] = [
  { frequencyHz: 0.3, dampingRatio: 0.03, amplitude: 1, phaseDeg: 20 },
  { frequencyHz: 0.62, dampingRatio: 0.07, amplitude: 0.6, phaseDeg: -50 },
  { frequencyHz: 1.3, dampingRatio: 0.1, amplitude: 0.4, phaseDeg: 120 },
];

/** Upper-half-plane poles as modal quantities with the matching residue of channel c. */
function modesOf(fit: { poles: Complex[]; residues: Complex[][]; rate: number }, c = 0) {
  return fit.poles
    .map((z, k) => ({ pole: poleFromZ(z, fit.rate), r: fit.residues[c][k], z }))
    .filter((m) => m.z.im > 0)
    .sort((a, b) => a.pole.frequencyHz - b.pole.frequencyHz);
}

function expectRecovered(fit: Parameters<typeof modesOf>[0], truth: TrueMode[][], relTol: number) {
  truth.forEach((channelModes, c) => {
    const got = modesOf(fit, c);
    expect(got).toHaveLength(channelModes.length);
    got.forEach((g, k) => {
      const t = channelModes[k];
      expect(Math.abs(g.pole.frequencyHz / t.frequencyHz - 1)).toBeLessThan(relTol);
      expect(Math.abs(g.pole.dampingRatio / t.dampingRatio - 1)).toBeLessThan(relTol);
      // residue of the upper pole: x = 2|R|·e^{σt}cos(ωt + arg R)
      expect(Math.abs((2 * Math.hypot(g.r.re, g.r.im)) / t.amplitude - 1)).toBeLessThan(relTol);
      const phase = (Math.atan2(g.r.im, g.r.re) * 180) / Math.PI;
      expect(Math.abs(((phase - t.phaseDeg + 540) % 360) - 180)).toBeLessThan(relTol * 360);
    });
  });
}

const noisy = [addNoise(dampedSum(MODES, 10, 200), 20, 1), addNoise(dampedSum(MODES, 10, 200), 15, 2)];
let ref: Record<string, unknown>[];
beforeAll(() => {
  ref = runReference([
    { kind: 'prony_poles', signals: [noisy[0]], order: 12 },
    { kind: 'prony_poles', signals: noisy, order: 20 },
  ]).results;
});

describe('pronyFit', () => {
  it('recovers a noise-free sum of three damped sinusoids at order 6 to 1e-6 (textbook, exact: CHECKS.md §1)', () => {
    const fit = pronyFit([dampedSum(MODES, 10, 200)], 10, 6);
    expect(fit.order).toBe(6);
    expectRecovered(fit, [MODES], 1e-6);
    expect(fit.relativeResidual[0]).toBeLessThan(1e-9);
  });

  it('recovers the same modes from three channels sharing the poles (multi-channel, exact)', () => {
    const channels = [
      MODES,
      MODES.map((m) => ({ ...m, amplitude: 2 * m.amplitude, phaseDeg: m.phaseDeg + 90 })),
      MODES.map((m, k) => ({ ...m, amplitude: m.amplitude * (k + 1) * 0.1, phaseDeg: -m.phaseDeg })),
    ];
    const fit = pronyFit(
      channels.map((ms) => dampedSum(ms, 10, 150)),
      10,
      6,
    );
    expectRecovered(fit, channels, 1e-6);
  });

  it('is exact even on oversampled 30 frames/s data when noise-free (textbook: CHECKS.md §1)', () => {
    const fit = pronyFit([dampedSum(MODES, 30, 600)], 30, 6);
    expectRecovered(fit, [MODES], 1e-6);
  });

  it('order 2 on one damped cosine gives a1 = −2e^{−σT}cos ωT, a2 = e^{−2σT} (textbook: CHECKS.md §1)', () => {
    const m = MODES[0];
    const T = 0.1;
    const fit = pronyFit([dampedSum([m], 1 / T, 50)], 1 / T, 2);
    const [z1, z2] = fit.poles;
    const { sigma, omega } = sigmaOmega(m);
    // monic polynomial z² + a1 z + a2 with roots z1, z2: a1 = −(z1 + z2), a2 = z1·z2
    const a1 = -(z1.re + z2.re);
    const a2 = z1.re * z2.re - z1.im * z2.im;
    expect(a1).toBeCloseTo(-2 * Math.exp(-sigma * T) * Math.cos(omega * T), 12);
    expect(a2).toBeCloseTo(Math.exp(-2 * sigma * T), 12);
  });

  it('matches an independent numpy least-squares Prony on noisy data (library: numpy.linalg.lstsq, numpy.roots)', () => {
    const one = pronyFit([noisy[0]], 10, 12);
    expect(maxPairedDistance(one.poles, ref[0].poles as [number, number][])).toBeLessThan(1e-9);
    const two = pronyFit(noisy, 10, 20);
    expect(maxPairedDistance(two.poles, ref[1].poles as [number, number][])).toBeLessThan(1e-9);
  });

  it('rank-truncated (Kumaresan–Tufts) prediction keeps the signal poles exact and puts the extra ones inside the unit circle (paper: Kumaresan & Tufts 1982)', () => {
    const fit = pronyFit([dampedSum(MODES, 10, 200)], 10, 20, { rank: 6 });
    const signal = fit.poles.filter((z) => MODES.some((m) => Math.abs(poleFromZ(z, 10).frequencyHz - m.frequencyHz) < 1e-6 && z.im > 0));
    expect(signal).toHaveLength(3);
    signal.forEach((z) => {
      const p = poleFromZ(z, 10);
      const t = MODES.find((m) => Math.abs(p.frequencyHz - m.frequencyHz) < 1e-6)!;
      expect(Math.abs(p.dampingRatio / t.dampingRatio - 1)).toBeLessThan(1e-6);
    });
    const signalPoles = new Set(fit.poles.filter((z) => signal.some((s) => Math.abs(s.re - z.re) < 1e-12 && Math.abs(Math.abs(s.im) - Math.abs(z.im)) < 1e-12)));
    const extraneous = fit.poles.filter((z) => !signalPoles.has(z));
    expect(extraneous).toHaveLength(14);
    for (const z of extraneous) expect(Math.hypot(z.re, z.im)).toBeLessThan(1);
  });

  it('refuses bad input with precise messages', () => {
    const x = dampedSum(MODES, 10, 20);
    expect(() => pronyFit([x], 10, 11)).toThrow('pronyFit: order 11 is too large for 20 samples per channel (at most 10)');
    expect(() => pronyFit([x], 10, 0)).toThrow('pronyFit: order must be a positive integer, got 0');
    expect(() => pronyFit([x, x.subarray(1)], 10, 2)).toThrow(
      'pronyFit: signal 1 has 19 samples but signal 0 has 20; all signals must have the same length',
    );
    const bad = x.slice();
    bad[4] = NaN;
    expect(() => pronyFit([bad], 10, 2)).toThrow('pronyFit: signal 0 sample 4 is NaN');
    expect(() => pronyFit([], 10, 2)).toThrow('pronyFit: no signals given');
    expect(() => pronyFit([new Float64Array(20)], 10, 2)).toThrow('pronyFit: the signals are all zero; there is nothing to fit');
    expect(() => pronyFit([x], -1, 2)).toThrow('pronyFit: rate must be a positive number, got -1');
  });
});

describe('fitResidues', () => {
  it('returns the residues and the nuisance polynomial of a known signal (exact)', () => {
    const m = MODES[1];
    const rate = 10;
    const n = 120;
    const x = dampedSum([m], rate, n);
    for (let t = 0; t < n; t++) x[t] += 0.5 - 0.3 * (t / (n - 1));
    const { sigma, omega } = sigmaOmega(m);
    const z = { re: Math.exp(-sigma / rate) * Math.cos(omega / rate), im: Math.exp(-sigma / rate) * Math.sin(omega / rate) };
    const { residues, polynomial, relativeResidual } = fitResidues([x], [z, { re: z.re, im: -z.im }], 1);
    const r = residues[0][0];
    expect(2 * Math.hypot(r.re, r.im)).toBeCloseTo(m.amplitude, 10);
    expect((Math.atan2(r.im, r.re) * 180) / Math.PI).toBeCloseTo(m.phaseDeg, 8);
    expect(residues[0][1]).toEqual({ re: r.re, im: -r.im });
    expect(polynomial[0][0]).toBeCloseTo(0.5, 10);
    expect(polynomial[0][n - 1]).toBeCloseTo(0.2, 10);
    expect(relativeResidual[0]).toBeLessThan(1e-10);
  });
});
