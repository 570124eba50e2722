// Unit tests of the ingest building blocks: cell and time reading, reporting-rate detection and
// the frame grid, chunking, min/max decimation.
import { describe, expect, it } from 'vitest';
import { FrameAligner, standardRates } from './aligner';
import { ChunkWriter } from './chunker';
import { downsampleMinMax } from './downsample';
import { FileRefusedError } from './errors';
import { numberProblem, parseCell, parseTimeCell } from './text-values';

describe('cells', () => {
  it('reads plain decimals and exponents; empty is a dropout; anything else is refused', () => {
    expect(parseCell('60.0012')).toBe(60.0012);
    expect(parseCell('-1.5e-3')).toBe(-0.0015);
    expect(parseCell('+.5')).toBe(0.5);
    expect(parseCell('')).toBeNaN();
    for (const bad of ['0x1F', 'Infinity', 'NaN', '1,5', '1.2.3', 'abc', '1e999', ' ']) expect(parseCell(bad), bad).toBeUndefined();
    expect(numberProblem('1e999')).toBe("value '1e999' is out of range");
    expect(numberProblem('0x1F')).toBe("value '0x1F' is not a number");
  });

  it('reads epoch seconds and ISO-8601 UTC times with full sub-millisecond precision', () => {
    expect(parseTimeCell('1735689600.0333333')).toEqual({ t: 1735689600.0333333, format: 'epoch' });
    // 2025-01-01T00:00:00Z is 1 735 689 600 s after the epoch (common practice: `date -u -d @1735689600`).
    const iso = parseTimeCell('2025-01-01T00:00:00.0333333Z');
    expect(iso).toMatchObject({ format: 'iso' });
    expect((iso as { t: number }).t - 1735689600).toBeCloseTo(0.0333333, 7);
    expect(parseTimeCell('2025-01-01 05:30:00+05:30')).toEqual({ t: 1735689600, format: 'iso' });
    expect(parseTimeCell('2024-12-31T19:00:00-0500')).toEqual({ t: 1735689600, format: 'iso' });
  });

  it('refuses impossible dates, zone-less ISO times and negative epochs', () => {
    expect(parseTimeCell('2025-02-30T00:00:00Z')).toBe("time '2025-02-30T00:00:00Z' is not a valid calendar date and time");
    expect(parseTimeCell('2025-01-01T24:00:00Z')).toBe("time '2025-01-01T24:00:00Z' is not a valid calendar date and time");
    expect(parseTimeCell('-5')).toBe("time '-5' is before 1970 (epoch seconds must not be negative)");
    expect(parseTimeCell('')).toBe('the time cell is empty');
    expect(parseTimeCell('yesterday')).toBe(
      "time 'yesterday' is neither epoch seconds nor an ISO-8601 UTC time (e.g. 2025-01-01T00:00:00.000Z)",
    );
  });
});

describe('reporting rates and the frame grid', () => {
  it('lists the IEEE C37.118.1 rates (standard)', () => {
    expect(standardRates(60)).toEqual([10, 12, 15, 20, 30, 60]);
    expect(standardRates(50)).toEqual([10, 25, 50]);
    expect(standardRates()).toEqual([10, 12, 15, 20, 25, 30, 50, 60]);
  });

  function run(times: number[]): { rate?: number; slots: number[]; aligner: FrameAligner } {
    const slots: number[] = [];
    let rate: number | undefined;
    const a = new FrameAligner(
      { where: (l) => `line ${l}` },
      { begin: (_t, r) => void (rate = r), frame: (slot) => void slots.push(slot) },
    );
    times.forEach((t, i) => a.push({ line: i + 2, time: t, timeText: String(t), values: new Float64Array([i]) }));
    a.finish();
    return { rate, slots, aligner: a };
  }

  it('measures 30 frames/s although the first rows have gaps (median spacing, not the first)', () => {
    const times = [0, 2, 4, 5, ...Array.from({ length: 200 }, (_, k) => 6 + k)].map((k) => 1000 + k / 30);
    const r = run(times);
    expect(r.rate).toBe(30);
    expect(r.slots.slice(0, 5)).toEqual([0, 2, 4, 5, 6]);
    expect(r.aligner.gaps).toBe(2);
    expect(r.aligner.missingFrames).toBe(2);
  });

  it('tells 25 from 30 frames/s and refuses 28 frames/s (not a standard rate)', () => {
    expect(run(Array.from({ length: 50 }, (_, k) => k / 25)).rate).toBe(25);
    expect(() => run(Array.from({ length: 50 }, (_, k) => k / 28))).toThrow(FileRefusedError);
    expect(() => run(Array.from({ length: 50 }, (_, k) => k / 28))).toThrow(/\(28 frames\/s\), which is not a standard/);
  });

  it('catches 29.97 frames/s, too close to 30 to tell from the first rows, once it drifts off the grid', () => {
    // 0.1 % slow: after 250 frames a row is a quarter of a frame late.
    expect(() => run(Array.from({ length: 600 }, (_, k) => 1000 + k / 29.97))).toThrow(
      /^line 252: time [\d.]+ is 0\.25 of a frame off the 30 frames\/s grid that starts at line 2/,
    );
  });

  it('refuses two rows in the same frame slot', () => {
    const times = [...Array.from({ length: 20 }, (_, k) => k), 19.2, 20].map((k) => k / 30);
    expect(() => run(times)).toThrow("line 22: time 0.64 falls in the same 1/30 s frame as the previous row's time 0.633333");
  });
});

describe('downsampleMinMax', () => {
  it('keeps each bucket\'s extremes so that a one-sample spike survives', () => {
    const v = new Float64Array(1000).fill(1);
    v[517] = 50;
    v[100] = -3;
    const d = downsampleMinMax(v, 100, 10, 10);
    expect(d.bucketSamples).toBe(100);
    expect(d.bucketSeconds).toBe(10);
    expect(d.t).toEqual([100, 110, 120, 130, 140, 150, 160, 170, 180, 190]);
    expect(d.max[5]).toBe(50);
    expect(d.min[1]).toBe(-3);
    expect(d.min[5]).toBe(1);
  });

  it('gives null for buckets with no finite sample and returns short series unchanged', () => {
    const v = Float64Array.from([1, NaN, NaN, NaN, 4, 5, 6]);
    const d = downsampleMinMax(v, 0, 1, 3);
    expect(d.bucketSamples).toBe(3);
    expect(d.min).toEqual([1, 4, 6]);
    expect(downsampleMinMax(Float64Array.from([NaN, NaN]), 0, 1, 1).min).toEqual([null]);
    const same = downsampleMinMax(Float64Array.from([3, 2]), 5, 2, 10);
    expect(same).toEqual({ t: [5, 5.5], min: [3, 2], max: [3, 2], bucketSamples: 1, bucketSeconds: 0.5 });
  });

  it('checks its arguments', () => {
    expect(() => downsampleMinMax(new Float64Array(3), 0, 0, 10)).toThrow('downsampleMinMax: rate must be positive, got 0');
    expect(() => downsampleMinMax(new Float64Array(3), 0, 30, 0)).toThrow('downsampleMinMax: maxPoints must be a whole number ≥ 1, got 0');
  });
});

describe('ChunkWriter', () => {
  it('cuts frames into fixed chunks per channel, leaves out chunks with no data, counts gaps across chunks', () => {
    const w = new ChunkWriter(2, 4);
    w.begin(100, 10);
    const frame = (slot: number, a: number, b: number) => w.frame(slot, Float64Array.from([a, b]));
    frame(0, 1, 10);
    frame(1, 1, NaN);
    frame(2, 2, 12);
    // slots 3..9 missing: chunk 1 (slots 4..7) holds nothing
    frame(10, 3, 13);
    frame(11, 3, 14);
    w.end();
    const chunks = w.take();
    expect(chunks.map((c) => [c.channel, c.seq, c.startSlot, c.startTime, Array.from(c.values)])).toEqual([
      [0, 0, 0, 100, [1, 1, 2, NaN]],
      [1, 0, 0, 100, [10, NaN, 12, NaN]],
      [0, 2, 8, 100.8, [NaN, NaN, 3, 3]],
      [1, 2, 8, 100.8, [NaN, NaN, 13, 14]],
    ]);
    expect(w.frames).toBe(12);
    const [qa, qb] = w.qualities(0);
    expect(qa).toMatchObject({ samples: 12, dropouts: 7, gaps: 1, longestGap: 7 });
    expect(qb).toMatchObject({ samples: 12, dropouts: 8, gaps: 2, longestGap: 7 });
  });
});
