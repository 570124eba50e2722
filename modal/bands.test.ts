import { describe, expect, it } from 'vitest';
import { DEFAULT_BAND_THRESHOLDS, bandOf, bandOfEstimate, checkBandThresholds } from './bands';
import { ModalInputError } from './errors';

describe('damping bands (common practice: 3–5 % alert rule)', () => {
  it('defaults to poor below 3 %, low below 5 %, ample from 5 %', () => {
    expect(DEFAULT_BAND_THRESHOLDS).toEqual({ poorBelow: 3, lowBelow: 5 });
    expect(bandOf(2.99)).toBe('poor');
    expect(bandOf(3)).toBe('low');
    expect(bandOf(4.99)).toBe('low');
    expect(bandOf(5)).toBe('ample');
    expect(bandOf(12)).toBe('ample');
    expect(bandOf(-1)).toBe('poor'); // a growing oscillation
  });

  it('uses per-track thresholds', () => {
    const t = { poorBelow: 4, lowBelow: 8 };
    expect(bandOf(3.9, t)).toBe('poor');
    expect(bandOf(7.9, t)).toBe('low');
    expect(bandOf(8, t)).toBe('ample');
    expect(bandOf(5.5, { lowBelow: 6 })).toBe('low'); // poorBelow from the default
    expect(bandOf(2.5, { lowBelow: 6 })).toBe('poor');
  });

  it('gives a forced oscillation the band forced, never poor', () => {
    expect(bandOfEstimate({ dampingPercent: 0.1, forced: true })).toBe('forced');
    expect(bandOfEstimate({ dampingPercent: 0.1, forced: false })).toBe('poor');
    expect(bandOfEstimate({ dampingPercent: 6, forced: false }, { poorBelow: 3, lowBelow: 7 })).toBe('low');
  });

  it('refuses bad thresholds and damping with precise messages', () => {
    expect(() => checkBandThresholds({ poorBelow: 6, lowBelow: 5 })).toThrow(
      new ModalInputError('poorBelow (6 %) must not exceed lowBelow (5 %)'),
    );
    expect(() => bandOf(4, { poorBelow: NaN })).toThrow(
      new ModalInputError('poorBelow must be a damping ratio in percent from 0 to 100, got NaN'),
    );
    expect(() => bandOf(4, { lowBelow: 101 })).toThrow(
      new ModalInputError('lowBelow must be a damping ratio in percent from 0 to 100, got 101'),
    );
    expect(() => bandOf(NaN)).toThrow(new ModalInputError('dampingPercent must be a number, got NaN'));
    expect(() => bandOfEstimate({ dampingPercent: 1, forced: true }, { poorBelow: 9, lowBelow: 5 })).toThrow(ModalInputError);
  });
});
