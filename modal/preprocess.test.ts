import { beforeAll, describe, expect, it } from 'vitest';
import { runReference } from '../tests/reference/run-reference';
import { ModalInputError } from './errors';
import {
  angleDifferenceDeg,
  bandpass,
  butterBandpassSos,
  butterLowpassSos,
  checkReportingRate,
  checkTimestamps,
  cheby1LowpassSos,
  decimate,
  detrend,
  fillGaps,
  type Sos,
  sosfiltfilt,
  sosfiltZi,
  TimestampError,
  unwrapDeg,
  windowQuality,
  wrapDeg,
} from './preprocess';
import { createRng } from './random';

// Reference values: Debian's scipy/numpy (library), one call of tests/reference/modal_ref.py.

const rng = createRng(99);
const noise = (n: number, std = 1) => rng.fillNormal(new Float64Array(n), std);
const ringdown = (n: number, rate: number) =>
  Float64Array.from({ length: n }, (_, i) => Math.exp(-0.06 * (i / rate)) * Math.cos(2 * Math.PI * 0.3 * (i / rate) + 0.4) + 0.02 * i / rate);

const bpCases = [
  { order: 4, low: 0.1, high: 2.0, fs: 30 },
  { order: 4, low: 0.1, high: 2.0, fs: 10 },
  { order: 2, low: 0.2, high: 1.0, fs: 30 },
  { order: 5, low: 0.05, high: 3, fs: 60 },
  { order: 3, low: 0.5, high: 4, fs: 25 },
];
const lpCases = [
  { order: 1, cutoff: 2, fs: 30 },
  { order: 3, cutoff: 1.5, fs: 10 },
  { order: 4, cutoff: 2, fs: 30 },
  { order: 6, cutoff: 10, fs: 60 },
];
const chebyFactors = [2, 3, 4, 5, 6, 7, 10, 13];
const filtSignals = [
  { sosIdx: 0, x: Float64Array.from(ringdown(600, 30), (v) => v + 0.05 * rng.normal()) },
  { sosIdx: 1, x: noise(200) },
  { sosIdx: 2, x: noise(40) }, // just above the padding length (3·(2·2+1) = 15)
];
const decCases = [
  { x: Float64Array.from(ringdown(600, 30), (v) => v + 0.05 * rng.normal()), q: 3 },
  { x: noise(601), q: 5 },
  { x: noise(1000), q: 6 },
  { x: noise(500), q: 13 },
  { x: noise(29), q: 2 }, // shortest length the order-8 anti-alias filter accepts (> 27)
];
const unwrapInput = Float64Array.from([170, -175, -160, 175, 10, -170, 180, 0, 180, 540, -200, 179.5, -179.5, 0]);
const detrendInput = Float64Array.from(ringdown(300, 30), (v) => v + 3 + 0.1 * rng.normal());

let results: Record<string, unknown>[];
let bpSos: Sos[];

beforeAll(() => {
  bpSos = bpCases.map((c) => butterBandpassSos(c.order, c.low, c.high, c.fs));
  const reply = runReference([
    ...bpCases.map((c) => ({ kind: 'butter_bp', ...c })),
    ...lpCases.map((c) => ({ kind: 'butter_lp', ...c })),
    ...chebyFactors.map((q) => ({ kind: 'cheby1_lp', order: 8, rp: 0.05, wn: 0.8 / q })),
    ...filtSignals.map((f) => ({ kind: 'sosfiltfilt', sos: bpSos[f.sosIdx], x: f.x })),
    ...decCases.map((c) => ({ kind: 'decimate', x: c.x, q: c.q })),
    { kind: 'unwrap_deg', x: unwrapInput },
    { kind: 'detrend', x: detrendInput, type: 'linear' },
    { kind: 'detrend', x: detrendInput, type: 'constant' },
    { kind: 'sosfilt_zi', sos: bpSos[0] },
  ]);
  results = reply.results;
});

/** Section-by-section agreement relative to each section's largest coefficient. */
function expectSosClose(ours: Sos, theirs: number[][], tol: number) {
  expect(ours).toHaveLength(theirs.length);
  ours.forEach((sec, i) => {
    const scaleB = Math.max(...theirs[i].slice(0, 3).map(Math.abs));
    const scaleA = Math.max(...theirs[i].slice(3).map(Math.abs));
    sec.forEach((v, j) => expect(Math.abs(v - theirs[i][j])).toBeLessThanOrEqual(tol * (j < 3 ? scaleB : scaleA)));
  });
}

function expectArrayClose(ours: Float64Array, theirs: number[], relTol: number) {
  expect(ours.length).toBe(theirs.length);
  const scale = Math.max(...theirs.map(Math.abs));
  let worst = 0;
  ours.forEach((v, i) => (worst = Math.max(worst, Math.abs(v - theirs[i]))));
  expect(worst).toBeLessThanOrEqual(relTol * scale);
}

/** |H(e^{jω})| of second-order sections at f Hz. */
function gainAt(sos: Sos, f: number, fs: number): number {
  const w = (2 * Math.PI * f) / fs;
  let g = 1;
  for (const [b0, b1, b2, a0, a1, a2] of sos) {
    const num = Math.hypot(b0 + b1 * Math.cos(w) + b2 * Math.cos(2 * w), b1 * Math.sin(w) + b2 * Math.sin(2 * w));
    const den = Math.hypot(a0 + a1 * Math.cos(w) + a2 * Math.cos(2 * w), a1 * Math.sin(w) + a2 * Math.sin(2 * w));
    g *= num / den;
  }
  return g;
}

describe('filter design', () => {
  bpCases.forEach((c, i) => {
    it(`butterBandpassSos(${c.order}, ${c.low}, ${c.high}, ${c.fs}) equals scipy.signal.butter(..., 'bandpass', output='sos') (library)`, () => {
      expectSosClose(bpSos[i], results[i].sos as number[][], 1e-11);
    });
  });
  lpCases.forEach((c, i) => {
    it(`butterLowpassSos(${c.order}, ${c.cutoff}, ${c.fs}) equals scipy.signal.butter(..., output='sos') (library)`, () => {
      expectSosClose(butterLowpassSos(c.order, c.cutoff, c.fs), results[bpCases.length + i].sos as number[][], 1e-11);
    });
  });
  chebyFactors.forEach((q, i) => {
    it(`cheby1LowpassSos(8, 0.05, 0.8/${q}) equals scipy.signal.cheby1(..., output='sos') (library)`, () => {
      expectSosClose(cheby1LowpassSos(8, 0.05, 0.8 / q), results[bpCases.length + lpCases.length + i].sos as number[][], 1e-9);
    });
  });

  it('Butterworth band-pass gain is 1/√2 at both band edges and 1 at the centre (textbook: Butterworth response, bilinear pre-warping)', () => {
    const sos = butterBandpassSos(4, 0.1, 2.0, 30);
    expect(gainAt(sos, 0.1, 30)).toBeCloseTo(Math.SQRT1_2, 10);
    expect(gainAt(sos, 2.0, 30)).toBeCloseTo(Math.SQRT1_2, 10);
    // geometric centre of the pre-warped band maps to gain 1
    const w1 = Math.tan((Math.PI * 0.1) / 30);
    const w2 = Math.tan((Math.PI * 2.0) / 30);
    const fc = (30 / Math.PI) * Math.atan(Math.sqrt(w1 * w2));
    expect(gainAt(sos, fc, 30)).toBeCloseTo(1, 10);
  });

  it('sosfiltZi equals scipy.signal.sosfilt_zi (library)', () => {
    const theirs = (results[results.length - 1].zi as number[][]).flat();
    expectArrayClose(sosfiltZi(bpSos[0]), theirs, 1e-11);
  });

  it('refuses bad designs with precise messages', () => {
    expect(() => butterBandpassSos(4, 2, 1, 30)).toThrow(
      'butterBandpassSos: band edges must satisfy 0 < lowHz < highHz < fs/2 = 15 Hz, got 2 and 1 Hz',
    );
    expect(() => butterLowpassSos(0, 1, 30)).toThrow('butterLowpassSos: order must be an integer from 1 to 20, got 0');
    expect(() => butterLowpassSos(2, 20, 30)).toThrow('butterLowpassSos: cutoff must satisfy 0 < cutoffHz < fs/2 = 15 Hz, got 20 Hz');
  });
});

describe('zero-phase filtering and decimation', () => {
  const off = bpCases.length + lpCases.length + chebyFactors.length;
  filtSignals.forEach((f, i) => {
    it(`sosfiltfilt equals scipy.signal.sosfiltfilt with default odd padding, case ${i} (n = ${f.x.length}) (library)`, () => {
      expectArrayClose(sosfiltfilt(bpSos[f.sosIdx], f.x), results[off + i].y as number[], 1e-10);
    });
  });
  decCases.forEach((c, i) => {
    it(`decimate(x, ${c.q}) equals scipy.signal.decimate(ftype='iir', zero_phase=True), n = ${c.x.length} (library)`, () => {
      expectArrayClose(decimate(c.x, c.q), results[off + filtSignals.length + i].y as number[], 1e-9);
    });
  });

  it('bandpass passes an in-band sinusoid unchanged in phase and removes an offset (textbook: zero-phase filtering)', () => {
    const fs = 30;
    const x = Float64Array.from({ length: 3600 }, (_, i) => 5 + Math.sin(2 * Math.PI * 0.5 * (i / fs)));
    const y = bandpass(x, fs);
    // away from the ends: gain |H|² of the forward–backward pass, no phase shift
    const g2 = gainAt(butterBandpassSos(4, 0.1, 2.0, fs), 0.5, fs) ** 2;
    // (the 0.1 Hz edge's transients take tens of seconds to die out, hence the long signal)
    for (let i = 1200; i < 2400; i++) expect(y[i]).toBeCloseTo(g2 * Math.sin(2 * Math.PI * 0.5 * (i / fs)), 3);
  });

  it('refuses signals too short for the padding, non-finite samples and bad factors, precisely', () => {
    expect(() => sosfiltfilt(bpSos[0], new Float64Array(27))).toThrow(
      'sosfiltfilt: the signal has 27 samples; this filter needs more than 27 (its padding length)',
    );
    expect(() => sosfiltfilt(bpSos[0], Float64Array.from({ length: 100 }, (_, i) => (i === 7 ? NaN : 1)))).toThrow(
      'sosfiltfilt: sample 7 is NaN; fill gaps before filtering',
    );
    expect(() => decimate(noise(100), 2.5)).toThrow('decimate: factor must be a positive integer, got 2.5');
    expect(() => decimate(noise(1000), 15)).toThrow('decimate: factor 15 is above 13; decimate in stages (e.g. 5 then 3)');
    expect(Array.from(decimate(Float64Array.from([1, 2, 3]), 1))).toEqual([1, 2, 3]);
  });
});

describe('angles and detrending', () => {
  const off = bpCases.length + lpCases.length + chebyFactors.length + filtSignals.length + decCases.length;
  it('unwrapDeg equals numpy.unwrap(x, period=360), including exact ±180° steps (library)', () => {
    expect(Array.from(unwrapDeg(unwrapInput))).toEqual(results[off].y as number[]);
  });

  it('unwrapDeg keeps NaN dropouts and continues from the last finite sample', () => {
    const y = unwrapDeg(Float64Array.from([170, 179, NaN, NaN, -172, -160]));
    expect(Array.from(y)).toEqual([170, 179, NaN, NaN, 188, 200]);
  });

  it('angleDifferenceDeg is continuous when either angle wraps (known answer)', () => {
    // a rotates steadily, the reference lags it by 30° + a slow swing; both wrapped to (−180, 180]
    const n = 400;
    const truth = Float64Array.from({ length: n }, (_, i) => 30 + 200 * Math.sin(i / 60));
    const a = Float64Array.from({ length: n }, (_, i) => wrapDeg(3 * i));
    const ref = Float64Array.from({ length: n }, (_, i) => wrapDeg(3 * i - truth[i]));
    const d = angleDifferenceDeg(a, ref);
    d.forEach((v, i) => expect(v).toBeCloseTo(truth[i], 9));
    expect(() => angleDifferenceDeg(new Float64Array(3), new Float64Array(4))).toThrow(
      'angleDifferenceDeg: the channel has 3 samples but the reference has 4',
    );
  });

  it('detrend equals scipy.signal.detrend, linear and constant (library)', () => {
    expectArrayClose(detrend(detrendInput, 'linear'), results[off + 1].y as number[], 1e-12);
    expectArrayClose(detrend(detrendInput, 'constant'), results[off + 2].y as number[], 1e-12);
  });
});

describe('gaps and data quality', () => {
  it('fillGaps interpolates short gaps, splits at long ones and leaves missing ends out', () => {
    const fs = 10;
    const x = Float64Array.from({ length: 60 }, (_, i) => i);
    x[0] = NaN; // missing start
    for (const i of [5, 6, 7]) x[i] = NaN; // 0.3 s: filled
    for (let i = 20; i < 35; i++) x[i] = NaN; // 1.5 s: splits
    x[59] = NaN; // missing end
    const r = fillGaps(x, fs, { maxGapSeconds: 1 });
    expect(Array.from(r.values.subarray(4, 9))).toEqual([4, 5, 6, 7, 8]);
    expect(r.segments).toEqual([
      [1, 20],
      [35, 59],
    ]);
    expect(r.quality).toEqual({ samples: 60, dropouts: 20, gaps: 4, longestGap: 15, flatLine: 0, outliers: 0 });
    expect(Number.isNaN(r.values[25])).toBe(true);
    expect(() => fillGaps(x, fs, { maxGapSeconds: -1 })).toThrow('fillGaps: maxGapSeconds must be a non-negative number, got -1');
  });

  it('windowQuality counts flat lines of at least 1 s and 6-MAD outliers', () => {
    const fs = 30;
    const x = noise(600);
    for (let i = 100; i < 130; i++) x[i] = 0.25; // exactly 1 s frozen: flagged
    for (let i = 300; i < 329; i++) x[i] = -0.5; // 29 samples: under 1 s, not flagged
    x[400] = 50; // far outlier
    x[401] = -40;
    x[500] = Infinity; // counted as a dropout, not an outlier
    const q = windowQuality(x, fs);
    expect(q).toEqual({ samples: 600, dropouts: 1, gaps: 1, longestGap: 1, flatLine: 30, outliers: 2 });
  });

  it('checkReportingRate accepts the IEEE C37.118.1 rates and refuses others precisely (standard: IEEE C37.118.1-2011)', () => {
    for (const r of [10, 12, 15, 20, 30, 60]) expect(checkReportingRate(r, 60)).toBe(r);
    for (const r of [10, 25, 50]) expect(checkReportingRate(r, 50)).toBe(r);
    expect(checkReportingRate(29.99999999, 60)).toBe(30);
    expect(() => checkReportingRate(25, 60)).toThrow(
      'Reporting rate 25 frames/s is not a standard rate for a 60 Hz system (IEEE C37.118.1: 10, 12, 15, 20, 30, 60 frames/s)',
    );
    expect(() => checkReportingRate(30, 50)).toThrow(
      'Reporting rate 30 frames/s is not a standard rate for a 50 Hz system (IEEE C37.118.1: 10, 25, 50 frames/s)',
    );
    expect(() => checkReportingRate(29.5, 60)).toThrow(ModalInputError);
    expect(() => checkReportingRate(NaN, 60)).toThrow('Reporting rate must be a positive number of frames/s, got NaN');
    expect(() => checkReportingRate(30, 55 as 50)).toThrow('Nominal frequency must be 50 or 60 Hz, got 55');
  });

  it('checkTimestamps names the first duplicate or out-of-order sample and its times', () => {
    const t0 = 1_700_000_000;
    const ok = Float64Array.from({ length: 10 }, (_, i) => t0 + i / 30);
    const report = checkTimestamps(ok);
    expect(report.estimatedRate).toBeCloseTo(30, 3); // epoch seconds carry ~1e-7 s rounding
    expect(report.gaps).toBe(0);

    const gappy = Float64Array.from([0, 0.1, 0.2, 0.5, 0.6]);
    expect(checkTimestamps(gappy)).toMatchObject({ gaps: 1, missingFrames: 2 });

    const dup = Float64Array.from([t0, t0 + 0.1, t0 + 0.1, t0 + 0.2]);
    expect(() => checkTimestamps(dup)).toThrow(`Duplicate timestamp at sample 2: 1700000000.1 s, the same as sample 1`);
    const back = Float64Array.from([t0, t0 + 0.1, t0 + 0.2, t0 + 0.15]);
    expect(() => checkTimestamps(back)).toThrow(
      'Timestamps out of order at sample 3: 1700000000.15 s comes after 1700000000.2 s (sample 2)',
    );
    try {
      checkTimestamps(back);
    } catch (e) {
      expect(e).toBeInstanceOf(TimestampError);
      expect((e as TimestampError).sampleIndex).toBe(3);
      expect((e as TimestampError).code).toBe('MODAL_INPUT');
    }
    expect(() => checkTimestamps(Float64Array.from([0, NaN]))).toThrow(
      'Timestamp of sample 1 is NaN; timestamps must be finite numbers of seconds',
    );
  });
});
