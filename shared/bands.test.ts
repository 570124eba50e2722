import { describe, expect, it } from 'vitest';
import { bandOf, DEFAULT_THRESHOLDS } from './bands';

describe('damping bands', () => {
  it('defaults follow the 3 % / 5 % rule (common practice): poor < 3, low < 5, else ample', () => {
    expect(DEFAULT_THRESHOLDS).toEqual({ poorBelow: 3, lowBelow: 5 });
    expect(bandOf(2.99)).toBe('poor');
    expect(bandOf(3)).toBe('low');
    expect(bandOf(4.99)).toBe('low');
    expect(bandOf(5)).toBe('ample');
    expect(bandOf(-1)).toBe('poor');
  });

  it('uses the track’s own thresholds', () => {
    expect(bandOf(4, { poorBelow: 4.5, lowBelow: 8 })).toBe('poor');
    expect(bandOf(7, { poorBelow: 4.5, lowBelow: 8 })).toBe('low');
  });

  it('a forced oscillation is its own band, never poor', () => {
    expect(bandOf(0.5, DEFAULT_THRESHOLDS, true)).toBe('forced');
  });
});
