// How a long scan is cut into blocks that several workers share (jobs/processors/scan.ts), and
// the block payload of a scan job.
import { describe, expect, it } from 'vitest';
import { scanJobSchema } from './analysis-queues';
import { scanBlocks, scanBlockSeconds } from './scan';

describe('scanBlocks', () => {
  it('cuts the windows into consecutive blocks that cover each window once', () => {
    expect(scanBlocks(71, 10)).toEqual([
      { from: 0, to: 10 },
      { from: 10, to: 20 },
      { from: 20, to: 30 },
      { from: 30, to: 40 },
      { from: 40, to: 50 },
      { from: 50, to: 60 },
      { from: 60, to: 70 },
      { from: 70, to: 71 },
    ]);
    for (const [total, per] of [[1421, 60], [1440, 60], [5, 60], [61, 60], [1000, 7.5]] as const) {
      const b = scanBlocks(total, per);
      const covered = b.flatMap((x) => Array.from({ length: x.to - x.from }, (_, i) => x.from + i));
      expect(covered).toEqual(Array.from({ length: total }, (_, i) => i));
    }
  });

  it('makes one block of a scan shorter than a block, none of an empty one', () => {
    expect(scanBlocks(21, 60)).toEqual([{ from: 0, to: 21 }]);
    expect(scanBlocks(0, 60)).toEqual([]);
    expect(scanBlocks(3, 0.4)).toEqual([{ from: 0, to: 1 }, { from: 1, to: 2 }, { from: 2, to: 3 }]); // at least one window per block
  });
});

describe('scanBlockSeconds', () => {
  it('defaults to an hour, takes 0 for never, and names a bad value', () => {
    expect(scanBlockSeconds({})).toBe(3600);
    expect(scanBlockSeconds({ KEEL_SCAN_BLOCK_SECONDS: '' })).toBe(3600);
    expect(scanBlockSeconds({ KEEL_SCAN_BLOCK_SECONDS: '600' })).toBe(600);
    expect(scanBlockSeconds({ KEEL_SCAN_BLOCK_SECONDS: '0' })).toBe(0);
    expect(() => scanBlockSeconds({ KEEL_SCAN_BLOCK_SECONDS: 'hourly' })).toThrow('KEEL_SCAN_BLOCK_SECONDS must be a number of seconds ≥ 0 (got "hourly")');
    expect(() => scanBlockSeconds({ KEEL_SCAN_BLOCK_SECONDS: '-5' })).toThrow('KEEL_SCAN_BLOCK_SECONDS must be a number of seconds ≥ 0 (got "-5")');
  });
});

describe('scan job payload', () => {
  it('takes a whole scan or one block of window indices, and refuses a bad block with its reason', () => {
    expect(scanJobSchema.parse({ analysisId: 4 })).toEqual({ analysisId: 4 });
    expect(scanJobSchema.parse({ analysisId: 4, block: { from: 60, to: 120 } })).toEqual({ analysisId: 4, block: { from: 60, to: 120 } });
    const messages = (data: unknown) => {
      const r = scanJobSchema.safeParse(data);
      return r.success ? [] : r.error.issues.map((i) => i.message);
    };
    expect(messages({ analysisId: 4, block: { from: 60, to: 60 } })).toEqual(['block.from must be below block.to']);
    expect(messages({ analysisId: 4, block: { from: -1, to: 5 } })).toEqual(['block.from must be a window index ≥ 0']);
    expect(messages({ analysisId: 4, block: { from: 0, to: 5, extra: 1 } })).toHaveLength(1);
  });
});
