// planRollupCover: which whole rollup buckets and which edge estimates a Trends span reads. The
// cover must tile [from, to] exactly — every instant in exactly one piece — with buckets aligned
// to their span, so that summing the pieces gives the same aggregate as the estimates themselves.
import { describe, expect, it } from 'vitest';
import { planRollupCover, type RollupCover } from './estimates';

const SPANS = [86_400, 3600, 600];
const S = 1000;

/** The pieces as [from, to) intervals (the tail closed at `to`, made half-open by +1 ms). */
function pieces(c: RollupCover): [number, number][] {
  const out: [number, number][] = c.rollups.map((r) => [r.fromMs, r.toMs]);
  if (c.head) out.push([c.head.fromMs, c.head.toMs]);
  if (c.tail) out.push([c.tail.fromMs, c.tail.toMs + 1]);
  return out.filter(([a, b]) => b > a).sort((x, y) => x[0] - y[0]);
}

function expectTiles(c: RollupCover, from: number, to: number) {
  const p = pieces(c);
  expect(p[0][0]).toBe(from);
  expect(p[p.length - 1][1]).toBe(to + 1);
  for (let i = 1; i < p.length; i++) expect(p[i][0]).toBe(p[i - 1][1]); // no gap, no overlap
  for (const r of c.rollups) {
    expect(r.fromMs % (r.span * S)).toBe(0);
    expect(r.toMs % (r.span * S)).toBe(0);
    expect(r.toMs).toBeGreaterThan(r.fromMs);
  }
}

describe('planRollupCover', () => {
  it('reads a year as whole days, with hours and 10-minute buckets towards odd edges', () => {
    const from = Date.UTC(2025, 0, 1, 7, 23, 11);
    const to = Date.UTC(2026, 0, 1, 18, 51, 40);
    const c = planRollupCover(from, to, SPANS);
    expectTiles(c, from, to);
    expect(c.rollups[0]).toEqual({ span: 86_400, fromMs: Date.UTC(2025, 0, 2), toMs: Date.UTC(2026, 0, 1) });
    // left: 07:30–08:00 in 10-minute buckets, 08:00–24:00 in hours; right: 00:00–18:00 in hours, 18:00–18:50 in 10 minutes
    expect(c.rollups.filter((r) => r.span === 3600)).toEqual([
      { span: 3600, fromMs: Date.UTC(2025, 0, 1, 8), toMs: Date.UTC(2025, 0, 2) },
      { span: 3600, fromMs: Date.UTC(2026, 0, 1), toMs: Date.UTC(2026, 0, 1, 18) },
    ]);
    expect(c.rollups.filter((r) => r.span === 600)).toEqual([
      { span: 600, fromMs: Date.UTC(2025, 0, 1, 7, 30), toMs: Date.UTC(2025, 0, 1, 8) },
      { span: 600, fromMs: Date.UTC(2026, 0, 1, 18), toMs: Date.UTC(2026, 0, 1, 18, 50) },
    ]);
    expect(c.head).toEqual({ fromMs: from, toMs: Date.UTC(2025, 0, 1, 7, 30) });
    expect(c.tail).toEqual({ fromMs: Date.UTC(2026, 0, 1, 18, 50), toMs: to });
  });

  it('leaves spans shorter than any whole bucket to the estimates', () => {
    const from = Date.UTC(2025, 5, 1, 10, 1);
    const to = Date.UTC(2025, 5, 1, 10, 9, 59);
    expect(planRollupCover(from, to, SPANS)).toEqual({ rollups: [], head: null, tail: { fromMs: from, toMs: to } });
    // exactly one bucket: [10:00, 10:10] holds the bucket and the instant 10:10 itself
    const c = planRollupCover(Date.UTC(2025, 5, 1, 10), Date.UTC(2025, 5, 1, 10, 10), SPANS);
    expect(c.rollups).toEqual([{ span: 600, fromMs: Date.UTC(2025, 5, 1, 10), toMs: Date.UTC(2025, 5, 1, 10, 10) }]);
    expect(c.head).toBeNull();
    expect(c.tail).toEqual({ fromMs: Date.UTC(2025, 5, 1, 10, 10), toMs: Date.UTC(2025, 5, 1, 10, 10) });
  });

  it('uses only the spans it is given (those that nest in the output buckets)', () => {
    const from = Date.UTC(2025, 0, 1, 0, 5);
    const to = Date.UTC(2025, 0, 3, 23, 55);
    const c = planRollupCover(from, to, [3600, 600]);
    expectTiles(c, from, to);
    expect(c.rollups.every((r) => r.span !== 86_400)).toBe(true);
    expect(planRollupCover(from, to, [])).toEqual({ rollups: [], head: null, tail: { fromMs: from, toMs: to } });
  });

  it('tiles random spans exactly', () => {
    let seed = 7;
    const rnd = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
    const t0 = Date.UTC(2025, 0, 1);
    for (let i = 0; i < 500; i++) {
      const from = t0 + Math.floor(rnd() * 40 * 86_400) * S + Math.floor(rnd() * 1000);
      const to = from + Math.floor(rnd() ** 3 * 60 * 86_400 * S);
      const spans = [SPANS, [3600, 600], [600], [86_400]][i % 4];
      const c = planRollupCover(from, to, spans);
      expectTiles(c, from, to);
      const spansSeen = c.rollups.map((r) => r.span);
      for (const s of spansSeen) expect(spans).toContain(s);
    }
  });
});
