import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { ModalInputError } from './errors';
import { createRng } from './random';
import { RealDft, csd, hannWindow, welch, type WelchOptions } from './spectral';

// Reference values: Debian's numpy/scipy (library), one call of tests/reference/ambient_ref.py.
// eslint-disable-next-line @typescript-eslint/no-explicit-any
function reference(cases: Record<string, unknown>[]): any[] {
  const script = path.resolve(__dirname, '../tests/reference/ambient_ref.py');
  const res = spawnSync('/usr/bin/python3', [script], { input: JSON.stringify({ cases }), encoding: 'utf8', maxBuffer: 1 << 28 });
  if (res.status !== 0) throw new Error(`ambient_ref.py failed: ${res.stderr}`);
  return JSON.parse(res.stdout).results;
}

const rng = createRng(2024);
const noise = (n: number) => Array.from(rng.fillNormal(new Float64Array(n)));
const tone = (n: number, fs: number, f: number, a: number, ph = 0) => Array.from({ length: n }, (_, i) => a * Math.cos(2 * Math.PI * f * (i / fs) + ph));
const add = (...xs: number[][]) => xs[0].map((_, i) => xs.reduce((s, x) => s + x[i], 0));

const welchCases: { x: number[]; fs: number; opts: WelchOptions }[] = [
  { x: add(noise(1000), tone(1000, 5, 0.3, 2)), fs: 5, opts: { nperseg: 256 } },
  { x: noise(777), fs: 30, opts: { nperseg: 100, noverlap: 25 } },
  { x: add(noise(600), tone(600, 5, 0.61, 1, 0.3)), fs: 5, opts: { nperseg: 300, nfft: 512 } },
  { x: noise(500), fs: 10, opts: { nperseg: 120, nfft: 150, detrend: 'linear', scaling: 'spectrum' } },
  { x: add(noise(300), Array.from({ length: 300 }, (_, i) => 0.01 * i)), fs: 1, opts: { nperseg: 64, noverlap: 0, detrend: false } },
  { x: noise(90), fs: 5, opts: { nperseg: 256 } }, // nperseg longer than the signal: cut to 90 as scipy does
  { x: noise(301), fs: 5, opts: { nperseg: 75, nfft: 75 } }, // odd nfft: no Nyquist bin
];
const csdCases = [
  { x: add(noise(1200), tone(1200, 5, 0.3, 1)), y: add(noise(1200), tone(1200, 5, 0.3, 0.5, 1.2)), fs: 5, opts: { nperseg: 300, nfft: 512 } },
  { x: noise(640), y: noise(640), fs: 30, opts: { nperseg: 128, noverlap: 96, detrend: 'linear' as const } },
  { x: noise(333), y: noise(333), fs: 2, opts: { nperseg: 111 } },
];
const dftLengths = [1, 2, 3, 7, 8, 30, 100, 256, 300, 1000, 1024];
const dftInputs = dftLengths.map((n) => noise(n));

// eslint-disable-next-line @typescript-eslint/no-explicit-any
let ref: any[];
beforeAll(() => {
  ref = reference([
    ...welchCases.map((c) => ({ kind: 'welch', x: c.x, fs: c.fs, ...c.opts })),
    ...csdCases.map((c) => ({ kind: 'csd', x: c.x, y: c.y, fs: c.fs, ...c.opts })),
    ...dftInputs.map((x) => ({ kind: 'rfft', x, n: x.length })),
    { kind: 'rfft', x: dftInputs[6], n: 512 }, // zero padding
  ]);
});

/** Largest error over the largest reference magnitude, real and imaginary parts together. */
function cplxErr(re: ArrayLike<number>, im: ArrayLike<number>, r: { re: number[]; im: number[] }): number {
  let num = 0;
  let den = 0;
  for (let i = 0; i < re.length; i++) {
    num = Math.max(num, Math.hypot(re[i] - r.re[i], im[i] - r.im[i]));
    den = Math.max(den, Math.hypot(r.re[i], r.im[i]));
  }
  return num / den;
}

function relErr(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let num = 0;
  let den = 0;
  for (let i = 0; i < a.length; i++) {
    num = Math.max(num, Math.abs(a[i] - b[i]));
    den = Math.max(den, Math.abs(b[i]));
  }
  return num / den;
}

describe('RealDft', () => {
  it('agrees with numpy.fft.rfft for power-of-two and other lengths (library: numpy.fft.rfft)', () => {
    dftInputs.forEach((x, i) => {
      const d = new RealDft(x.length);
      const re = new Float64Array(d.bins);
      const im = new Float64Array(d.bins);
      d.transform(x, re, im);
      const r = ref[welchCases.length + csdCases.length + i];
      expect(r.re.length).toBe(d.bins);
      expect(cplxErr(re, im, r)).toBeLessThan(1e-12);
    });
  });

  it('zero-pads a shorter input like numpy.fft.rfft(x, n) (library: numpy.fft.rfft)', () => {
    const d = new RealDft(512);
    const re = new Float64Array(d.bins);
    const im = new Float64Array(d.bins);
    d.transform(dftInputs[6], re, im, 100);
    expect(cplxErr(re, im, ref[ref.length - 1])).toBeLessThan(1e-12);
  });

  it('refuses a non-positive length', () => {
    expect(() => new RealDft(0)).toThrow(new ModalInputError('RealDft: the length must be a positive integer, got 0'));
  });
});

describe('welch', () => {
  it('matches scipy.signal.welch on noisy tones, overlaps, zero padding, detrending and scalings (library: scipy.signal.welch)', () => {
    welchCases.forEach((c, i) => {
      const out = welch(c.x, c.fs, c.opts);
      const r = ref[i];
      expect(Array.from(out.frequencies)).toEqual(r.f.map((v: number) => expect.closeTo(v, 12)));
      expect(relErr(out.psd, r.p)).toBeLessThan(1e-10);
    });
  });

  it('puts the power A²/2 of a sinusoid on an exact bin with spectrum scaling (textbook: Parseval, Hann window)', () => {
    // 0.5 Hz at fs = 8 with nperseg 64: bin 4 exactly; one-sided spectrum scaling gives A²/2
    const x = tone(64 * 20, 8, 0.5, 3);
    const out = welch(x, 8, { nperseg: 64, scaling: 'spectrum', detrend: false });
    expect(out.psd[4]).toBeCloseTo(4.5, 10);
    expect(out.frequencies[4]).toBe(0.5);
  });

  it('integrates white noise of variance σ² to about σ² with density scaling (textbook: Parseval)', () => {
    const r2 = createRng(5);
    const x = r2.fillNormal(new Float64Array(20000), 2);
    const out = welch(x, 10, { nperseg: 500 });
    const df = out.frequencies[1] - out.frequencies[0];
    const total = out.psd.reduce((s, v) => s + v, 0) * df;
    expect(total).toBeGreaterThan(4 * 0.95);
    expect(total).toBeLessThan(4 * 1.05);
  });

  it('refuses bad input with precise messages', () => {
    expect(() => welch([], 5)).toThrow(new ModalInputError('welch: x is empty'));
    expect(() => welch([1, NaN, 2], 5)).toThrow(new ModalInputError('welch: x has a non-finite sample at index 1 (NaN); fill gaps first'));
    expect(() => welch(noise(100), 0)).toThrow(new ModalInputError('welch: fs must be a positive number of samples/s, got 0'));
    expect(() => welch(noise(100), 5, { nperseg: 50, noverlap: 50 })).toThrow(
      new ModalInputError('welch: noverlap (50) must be less than nperseg (50)'),
    );
    expect(() => welch(noise(100), 5, { nperseg: 50, nfft: 40 })).toThrow(
      new ModalInputError('welch: nfft must be an integer of at least nperseg (50), got 40'),
    );
    expect(() => welch(noise(100), 5, { nperseg: 2.5 })).toThrow(new ModalInputError('welch: nperseg must be a positive integer, got 2.5'));
  });
});

describe('csd', () => {
  it('matches scipy.signal.csd, conj(X)·Y convention included (library: scipy.signal.csd)', () => {
    csdCases.forEach((c, i) => {
      const out = csd(c.x, c.y, c.fs, c.opts);
      const r = ref[welchCases.length + i];
      expect(cplxErr(out.re, out.im, r)).toBeLessThan(1e-10);
    });
  });

  it('gives the phase of y relative to x at a shared tone (textbook: cross-spectrum phase)', () => {
    // y = 0.5·cos(ωt + 1.2) leads x = cos(ωt) by 1.2 rad, so Pxy = conj(X)·Y has angle +1.2
    const x = add(tone(1200, 5, 0.3, 1), noise(1200).map((v) => 0.01 * v));
    const y = add(tone(1200, 5, 0.3, 0.5, 1.2), noise(1200).map((v) => 0.01 * v));
    const out = csd(x, y, 5, { nperseg: 300, nfft: 512 });
    const k = Math.round((0.3 * 512) / 5);
    expect(Math.atan2(out.im[k], out.re[k])).toBeCloseTo(1.2, 2);
  });

  it('refuses signals of different lengths', () => {
    expect(() => csd(noise(10), noise(11), 5)).toThrow(
      new ModalInputError('csd: x has 10 samples but y has 11; they must be the same length'),
    );
  });
});

describe('hannWindow', () => {
  it('is the periodic Hann window (library: scipy.signal.get_window("hann", n))', () => {
    const w = hannWindow(4);
    expect(Array.from(w)).toEqual([0, 0.5, 1, 0.5].map((v) => expect.closeTo(v, 15)));
  });
});
