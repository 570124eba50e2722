// The transfer study assembly, on windows generated from known lines (damping 9 − 0.004·MW %, so
// 5 % at 1000 MW and 3 % at 1500 MW; angle 10° + 0.02°/MW, so 45° at 1750 MW).
import { describe, expect, it } from 'vitest';
import { createRng } from '@/modal/random';
import { buildTransferStudy, effectiveSampleSize, PRACTICAL_ANGLE_LIMIT_DEG, type StudyPoint } from './transfer';

function scanPoints(analysisId: number, mw: number, count: number, seed: number, t0: number): StudyPoint[] {
  const rng = createRng(seed);
  return Array.from({ length: count }, (_, i) => {
    const transferMw = mw + 15 * rng.normal();
    const d = 9 - 0.004 * transferMw + 0.7 * rng.normal();
    return {
      analysisId,
      windowStart: t0 + 60 * i,
      windowSeconds: 1200,
      stepSeconds: 60,
      dampingPercent: d,
      ciLow: d - 1,
      ciHigh: d + 1,
      transferMw,
      angleDeg: 10 + 0.02 * transferMw + 0.3 * rng.normal(),
      forced: false,
    };
  });
}

describe('effectiveSampleSize', () => {
  it('counts non-overlapping windows per analysis', () => {
    // 101 windows stepped 1 min with 20-min windows span 100 min: 100/20 + 1 = 6 independent windows
    const a = scanPoints(1, 800, 101, 1, 0);
    expect(effectiveSampleSize(a)).toBeCloseTo(6, 12);
    // two analyses add up; a single window counts once
    const b = scanPoints(2, 900, 1, 2, 0);
    expect(effectiveSampleSize([...a, ...b])).toBeCloseTo(7, 12);
    // windows further apart than their length are all independent (capped by the count)
    const sparse = scanPoints(3, 900, 5, 3, 0).map((p, i) => ({ ...p, windowStart: i * 3600 }));
    expect(effectiveSampleSize(sparse)).toBe(5);
  });
});

describe('buildTransferStudy', () => {
  const levels = [600, 850, 1100, 1350, 1600];
  const points = levels.flatMap((mw, k) => scanPoints(k + 1, mw, 121, 10 + k, k * 86_400));

  it('projects the 5 % and 3 % crossings of a known line with intervals that contain them', () => {
    const s = buildTransferStudy(points, { poorBelow: 3, lowBelow: 5 });
    expect(s.method).toBe('ols-fieller');
    expect(s.pointsUsed).toBe(points.length);
    expect(s.nEffective).toBeCloseTo(5 * 7, 9);
    expect(s.damping.fit!.slope).toBeCloseTo(-0.004, 3);
    const [low, poor] = s.damping.projections;
    expect(low.threshold).toBe('low');
    expect(poor.threshold).toBe('poor');
    expect(Math.abs(low.x! - 1000)).toBeLessThan(40);
    expect(Math.abs(poor.x! - 1500)).toBeLessThan(40);
    expect(low.lo!).toBeLessThan(1000);
    expect(low.hi!).toBeGreaterThan(1000);
    expect(poor.lo!).toBeLessThan(1500);
    expect(poor.hi!).toBeGreaterThan(1500);
    expect(poor.extrapolated).toBe(false);
    // the plotted line spans the data and the projections
    expect(s.damping.line[0].x).toBeLessThanOrEqual(Math.min(...points.map((p) => p.transferMw)));
    expect(s.damping.line.at(-1)!.x).toBeGreaterThanOrEqual(Math.max(...points.map((p) => p.transferMw)));
    for (const b of s.damping.line) expect(b.lo).toBeLessThan(b.hi);
  });

  it('finds the transfer at the 45° practical angle limit (common practice)', () => {
    const s = buildTransferStudy(points, { poorBelow: 3, lowBelow: 5 });
    expect(s.angle.limitDeg).toBe(PRACTICAL_ANGLE_LIMIT_DEG);
    expect(Math.abs(s.angle.atLimit!.x! - 1750)).toBeLessThan(20);
    expect(s.angle.atLimit!.extrapolated).toBe(true); // the data stop near 1600 MW
  });

  it('leaves forced estimates out of the regression', () => {
    const forced = scanPoints(99, 1600, 30, 99, 10 * 86_400).map((p) => ({ ...p, dampingPercent: 0.3, forced: true }));
    const a = buildTransferStudy(points, { poorBelow: 3, lowBelow: 5 });
    const b = buildTransferStudy([...points, ...forced], { poorBelow: 3, lowBelow: 5 });
    expect(b.pointsForced).toBe(30);
    expect(b.pointsUsed).toBe(points.length);
    expect(b.damping.fit!.slope).toBe(a.damping.fit!.slope);
    expect(b.points).toHaveLength(points.length + 30);
  });

  it('uses per-track thresholds', () => {
    const s = buildTransferStudy(points, { poorBelow: 4, lowBelow: 6 });
    expect(Math.abs(s.damping.projections[0].x! - 750)).toBeLessThan(40);
    expect(Math.abs(s.damping.projections[1].x! - 1250)).toBeLessThan(40);
  });

  it('says why there is no line when the data cannot give one', () => {
    const s = buildTransferStudy(points.slice(0, 2), { poorBelow: 3, lowBelow: 5 });
    expect(s.damping.fit).toBeNull();
    expect(s.damping.note).toBe('A regression line needs at least 3 points (got 2)');
    const noAngle = buildTransferStudy(points.map((p) => ({ ...p, angleDeg: null })), { poorBelow: 3, lowBelow: 5 });
    expect(noAngle.angle.fit).toBeNull();
    expect(noAngle.angle.note).toBe('A regression line needs at least 3 points (got 0)');
    expect(noAngle.damping.fit).not.toBeNull();
  });
});
