// The transfer-study answer's schema: at most STUDY_MAX_POINTS points, and counts that describe
// them (a mismatch would mislabel the sample on screen).
import { describe, expect, it } from 'vitest';
import { STUDY_MAX_POINTS, transferStudySchema } from './studies';

const point = (i: number) => ({
  analysisId: 1,
  start: new Date(Date.UTC(2031, 4, 4) + i * 60_000).toISOString(),
  end: new Date(Date.UTC(2031, 4, 4) + i * 60_000 + 1_200_000).toISOString(),
  transferMw: 1500,
  dampingPercent: 4.2,
  dampingLo: 3.5,
  dampingHi: 4.9,
  angleDeg: 31,
  forced: false,
});

function study(points: number, counts: { pointsTotal: number; pointsShown: number; pointsSampled: boolean }) {
  return {
    track: { code: 'north-south', name: 'North–south', poorBelow: 3, lowBelow: 5 },
    corridor: { code: 'highmoor-saltreach', name: 'Highmoor–Saltreach' },
    from: '2031-05-04T00:00:00.000Z',
    to: '2031-05-11T00:00:00.000Z',
    method: 'ols-fieller',
    confidenceLevel: 0.95,
    points: Array.from({ length: points }, (_, i) => point(i)),
    ...counts,
    pointsUsed: counts.pointsTotal,
    pointsForced: 0,
    nEffective: 10,
    damping: { fit: null, line: [], projections: [], note: null },
    angle: { fit: null, line: [], limitDeg: 45, atLimit: null, note: null },
    caution: 'Advisory.',
  };
}

const messages = (v: unknown) => {
  const r = transferStudySchema.safeParse(v);
  return r.success ? [] : r.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`);
};

describe('transferStudySchema', () => {
  it('accepts every window, and a sample with its counts', () => {
    expect(messages(study(12, { pointsTotal: 12, pointsShown: 12, pointsSampled: false }))).toEqual([]);
    expect(messages(study(STUDY_MAX_POINTS, { pointsTotal: 10_080, pointsShown: STUDY_MAX_POINTS, pointsSampled: true }))).toEqual([]);
  });

  it('refuses more points than the maximum and counts that do not describe the points', () => {
    expect(messages(study(STUDY_MAX_POINTS + 1, { pointsTotal: 10_080, pointsShown: STUDY_MAX_POINTS + 1, pointsSampled: true }))).toEqual([
      `points: Too big: expected array to have <=${STUDY_MAX_POINTS} items`,
    ]);
    expect(messages(study(12, { pointsTotal: 12, pointsShown: 11, pointsSampled: true }))).toEqual(['pointsShown: pointsShown (11) must equal the number of points (12)']);
    expect(messages(study(12, { pointsTotal: 10, pointsShown: 12, pointsSampled: false }))).toEqual(['pointsShown: pointsShown (12) must not exceed pointsTotal (10)']);
    expect(messages(study(12, { pointsTotal: 40, pointsShown: 12, pointsSampled: false }))).toEqual(['pointsSampled: pointsSampled must be true exactly when pointsShown < pointsTotal']);
    expect(messages(study(12, { pointsTotal: 12, pointsShown: 12, pointsSampled: true }))).toEqual(['pointsSampled: pointsSampled must be true exactly when pointsShown < pointsTotal']);
  });
});
