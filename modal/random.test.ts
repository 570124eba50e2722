import { describe, expect, it } from 'vitest';
import { createRng } from './random';

describe('createRng', () => {
  it('is reproducible per seed and differs between nearby seeds', () => {
    const a = createRng(42);
    const b = createRng(42);
    const c = createRng(43);
    const sa = Array.from({ length: 50 }, () => a.uint32());
    expect(Array.from({ length: 50 }, () => b.uint32())).toEqual(sa);
    const sc = Array.from({ length: 50 }, () => c.uint32());
    expect(sc.filter((v, i) => v === sa[i]).length).toBe(0);
  });

  it('gives uniforms in [0, 1) with mean 1/2 and variance 1/12 (textbook: uniform distribution; range check)', () => {
    const rng = createRng(7);
    const n = 200_000;
    let s = 0;
    let s2 = 0;
    let min = 1;
    let max = 0;
    for (let i = 0; i < n; i++) {
      const u = rng.uniform();
      s += u;
      s2 += u * u;
      min = Math.min(min, u);
      max = Math.max(max, u);
    }
    expect(min).toBeGreaterThanOrEqual(0);
    expect(max).toBeLessThan(1);
    // standard errors: mean 6.5e-4, variance ~1.9e-4; bounds at ~5 standard errors
    expect(Math.abs(s / n - 0.5)).toBeLessThan(0.0033);
    expect(Math.abs(s2 / n - (s / n) ** 2 - 1 / 12)).toBeLessThan(0.001);
  });

  it('gives standard normals: mean 0, variance 1, about 95.45 % within ±2 (textbook: normal distribution; range check)', () => {
    const rng = createRng(11);
    const x = rng.fillNormal(new Float64Array(200_000));
    let s = 0;
    let s2 = 0;
    let within2 = 0;
    for (const v of x) {
      s += v;
      s2 += v * v;
      if (Math.abs(v) < 2) within2++;
    }
    const n = x.length;
    expect(Math.abs(s / n)).toBeLessThan(0.011);
    expect(Math.abs(s2 / n - 1)).toBeLessThan(0.016);
    expect(Math.abs(within2 / n - 0.9545)).toBeLessThan(0.0025);
    const scaled = createRng(11).fillNormal(new Float64Array(4), 3);
    expect(Array.from(scaled)).toEqual(Array.from(x.subarray(0, 4)).map((v) => 3 * v));
  });

  it('refuses a non-finite seed', () => {
    expect(() => createRng(NaN)).toThrow('createRng: seed must be a finite number, got NaN');
  });
});
