import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { FirDecimator, besselI0, designDecimator, firwinKaiserLowpass, kaiserBeta, kaiserOrder } from './ambient-filters';
import { finalizeSummary, mergeSummaries, summarizeBlock, type QualitySummary } from './ambient-quality';
import { jackknifeSe, quickselect } from './ambient-stats';
import { studentTQuantile } from './student-t';
import { ModalInputError } from './errors';
import { windowQuality } from './preprocess';
import { createRng } from './random';

// Reference values: Debian's numpy/scipy (library), one call of tests/reference/ambient_ref.py.
// eslint-disable-next-line @typescript-eslint/no-explicit-any
function reference(cases: Record<string, unknown>[]): any[] {
  const script = path.resolve(__dirname, '../tests/reference/ambient_ref.py');
  const res = spawnSync('/usr/bin/python3', [script], { input: JSON.stringify({ cases }), encoding: 'utf8', maxBuffer: 1 << 28 });
  if (res.status !== 0) throw new Error(`ambient_ref.py failed: ${res.stderr}`);
  return JSON.parse(res.stdout).results;
}

const rng = createRng(31);
const ordCases = [
  { ripple: 60, width: 1 / 15 },
  { ripple: 40, width: 0.1 },
  { ripple: 21, width: 0.2 },
  { ripple: 80, width: 0.05 },
];
const firCases = [
  { numtaps: 111, cutoff: 2.5, fs: 30, beta: kaiserBeta(60) },
  { numtaps: 31, cutoff: 1, fs: 10, beta: kaiserBeta(40) },
  { numtaps: 8, cutoff: 3, fs: 20, beta: 0 },
];
const decSignal = Float64Array.from({ length: 1000 }, (_, i) => Math.cos(0.05 * i) + 0.3 * rng.normal() + 0.01 * i);
const decH = designDecimator(30, 6, 2.0);
const decH2 = designDecimator(10, 2, 2.0);
const tCases = [
  { p: 0.95, df: 9 },
  { p: 0.975, df: 4 },
  { p: 0.05, df: 9 },
  { p: 0.995, df: 30 },
  { p: 0.6, df: 1 },
  { p: 0.95, df: 200 },
];

// eslint-disable-next-line @typescript-eslint/no-explicit-any
let ref: any[];
beforeAll(() => {
  ref = reference([
    ...ordCases.map((c) => ({ kind: 'kaiserord', ...c })),
    ...firCases.map((c) => ({ kind: 'firwin', ...c })),
    { kind: 'fir_decimate', x: Array.from(decSignal), h: Array.from(decH), q: 6 },
    { kind: 'fir_decimate', x: Array.from(decSignal.subarray(0, 301)), h: Array.from(decH2), q: 2 },
    ...tCases.map((c) => ({ kind: 't_ppf', ...c })),
  ]);
});

describe('Kaiser FIR design', () => {
  it('kaiserOrder equals scipy.signal.kaiserord (library: scipy.signal.kaiserord)', () => {
    ordCases.forEach((c, i) => {
      const got = kaiserOrder(c.ripple, c.width);
      expect(got.numtaps).toBe(ref[i].numtaps);
      expect(got.beta).toBeCloseTo(ref[i].beta, 12);
    });
  });

  it('firwinKaiserLowpass equals scipy.signal.firwin with a Kaiser window (library: scipy.signal.firwin)', () => {
    firCases.forEach((c, i) => {
      const h = firwinKaiserLowpass(c.numtaps, c.cutoff, c.fs, c.beta);
      const r = ref[ordCases.length + i].h as number[];
      expect(h.length).toBe(r.length);
      h.forEach((v, k) => expect(v).toBeCloseTo(r[k], 13));
    });
  });

  it('I0 matches known values (textbook: Abramowitz & Stegun table 9.8)', () => {
    expect(besselI0(0)).toBe(1);
    expect(besselI0(1)).toBeCloseTo(1.2660658777520082, 14);
    expect(besselI0(5)).toBeCloseTo(27.239871823604442, 11);
  });

  it('the decimator filter passes the band flat and stops what would alias into it (from memory: Kaiser 60 dB design)', () => {
    const resp = (f: number) => {
      let re = 0;
      let im = 0;
      decH.forEach((h, k) => {
        re += h * Math.cos((2 * Math.PI * f * k) / 30);
        im -= h * Math.sin((2 * Math.PI * f * k) / 30);
      });
      return Math.hypot(re, im);
    };
    for (const f of [0, 0.3, 1, 1.9]) expect(Math.abs(resp(f) - 1)).toBeLessThan(2e-3);
    for (const f of [3.1, 4, 7, 14]) expect(resp(f)).toBeLessThan(2e-3);
    expect(decH.length % 2).toBe(1);
  });

  it('refuses impossible designs', () => {
    expect(() => designDecimator(10, 2, 2.6)).toThrow(
      new ModalInputError('designDecimator: the output rate 5 samples/s must exceed twice the pass edge 2.6 Hz'),
    );
    expect(() => kaiserOrder(5, 0.1)).toThrow(new ModalInputError('kaiserOrder: the attenuation must be at least 8 dB, got 5'));
  });
});

describe('FirDecimator', () => {
  function run(x: Float64Array, h: Float64Array, q: number, chunks: number[]): number[] {
    const d = new FirDecimator(h, q);
    const out: number[] = [];
    const buf = new Float64Array(4096);
    let i = 0;
    for (const c of chunks) {
      const k = d.push(x, i, Math.min(x.length, i + c), buf);
      out.push(...buf.subarray(0, k));
      i = Math.min(x.length, i + c);
    }
    if (i < x.length) out.push(...buf.subarray(0, d.push(x, i, x.length, buf)));
    out.push(...buf.subarray(0, d.finish(buf)));
    return out;
  }

  it('equals zero-phase FIR filtering with odd-reflection ends, then every q-th sample (library: numpy.convolve)', () => {
    const r = ref[ordCases.length + firCases.length].y as number[];
    const got = run(decSignal, decH, 6, [1000]);
    expect(got.length).toBe(r.length);
    got.forEach((v, k) => expect(v).toBeCloseTo(r[k], 11));
    const r2 = ref[ordCases.length + firCases.length + 1].y as number[];
    const got2 = run(decSignal.subarray(0, 301), decH2, 2, [301]);
    expect(got2.length).toBe(r2.length);
    got2.forEach((v, k) => expect(v).toBeCloseTo(r2[k], 11));
  });

  it('gives identical output whatever the chunking of the input', () => {
    const whole = run(decSignal, decH, 6, [1000]);
    expect(run(decSignal, decH, 6, [1, 2, 3, 50, 7, 333, 1])).toEqual(whole);
    expect(run(decSignal, decH, 6, Array(1000).fill(1))).toEqual(whole);
  });
});

describe('statistics helpers', () => {
  it('studentTQuantile equals scipy.stats.t.ppf (library: scipy.stats.t.ppf)', () => {
    tCases.forEach((c, i) => expect(studentTQuantile(c.p, c.df)).toBeCloseTo(ref[ref.length - tCases.length + i].t, 9));
  });

  it('jackknifeSe of leave-one-out means equals the standard error of the mean (textbook: Efron & Tibshirani 1993, §11.2)', () => {
    const x = Array.from({ length: 12 }, () => rng.normal());
    const mean = x.reduce((a, b) => a + b, 0) / x.length;
    const loo = x.map((_, i) => (mean * x.length - x[i]) / (x.length - 1));
    const sd = Math.sqrt(x.reduce((a, b) => a + (b - mean) ** 2, 0) / (x.length - 1));
    expect(jackknifeSe(loo)).toBeCloseTo(sd / Math.sqrt(x.length), 12);
  });

  it('quickselect finds the k-th smallest', () => {
    const a = Float64Array.from({ length: 501 }, () => rng.normal());
    const sorted = a.slice().sort();
    for (const k of [0, 17, 250, 500]) expect(quickselect(a.slice(), a.length, k)).toBe(sorted[k]);
  });
});

describe('block quality summaries', () => {
  it('merged over blocks, count dropouts, gaps, longest gap and flat lines exactly as windowQuality on the whole window', () => {
    const fs = 30;
    for (let trial = 0; trial < 20; trial++) {
      const n = 1800 * 4;
      const x = Float64Array.from({ length: n }, () => rng.normal());
      // gaps and frozen runs, some across block boundaries
      for (let g = 0; g < 6; g++) {
        const s = Math.floor(rng.uniform() * n);
        const len = 1 + Math.floor(rng.uniform() * (g % 2 ? 5 : 200));
        x.fill(NaN, s, Math.min(n, s + len));
      }
      for (let g = 0; g < 4; g++) {
        const s = Math.floor(rng.uniform() * n);
        const len = 10 + Math.floor(rng.uniform() * 100);
        x.fill(rng.normal(), s, Math.min(n, s + len));
      }
      if (trial === 0) x.fill(NaN, 1790, 1810);
      if (trial === 1) x.fill(2.5, 1700, 1900);
      if (trial === 2) x.fill(1.5, 0, 1800 * 2 + 10);
      const scratch = new Float64Array(1800);
      let acc: QualitySummary | null = null;
      for (let b = 0; b < 4; b++) {
        const s = summarizeBlock(x, b * 1800, (b + 1) * 1800, fs, scratch);
        acc = acc ? mergeSummaries(acc, s, fs) : s;
      }
      const got = finalizeSummary(acc!, fs);
      const want = windowQuality(x, fs);
      expect({ ...got, outliers: 0 }).toEqual({ ...want, outliers: 0 });
    }
  });

  it('counts outliers against each block median and MAD (common practice: 6 robust σ, σ = 1.4826·MAD)', () => {
    const x = Float64Array.from({ length: 1800 }, () => rng.normal());
    x[100] = 50;
    x[900] = -40;
    const s = summarizeBlock(x, 0, 1800, 30, new Float64Array(1800));
    expect(s.outliers).toBe(2);
    expect(s.outliers).toBe(windowQuality(x, 30).outliers);
  });
});
