import { describe, expect, it } from 'vitest';
import { bucketSecondsFor } from './estimates';
import { staleAfterSeconds } from './watch';

describe('bucketSecondsFor', () => {
  it('takes the smallest nice width that keeps the buckets within maxPoints', () => {
    expect(bucketSecondsFor(4 * 3600, 10)).toBe(1800); // 24 min → 30 min
    expect(bucketSecondsFor(24 * 3600, 1000)).toBe(120); // 86.4 s → 2 min
    expect(bucketSecondsFor(7 * 86_400, 1000)).toBe(900); // 605 s → 15 min
    expect(bucketSecondsFor(3600, 1000)).toBe(60);
    expect(bucketSecondsFor(400 * 86_400, 10)).toBe(40 * 86_400); // past the list: whole days
    for (const [span, max] of [[12_345, 17], [999_999, 321], [86_400 * 30, 500]] as const) {
      expect(span / bucketSecondsFor(span, max)).toBeLessThanOrEqual(max);
    }
  });
});

describe('staleAfterSeconds', () => {
  it('allows three scan steps, at least five minutes', () => {
    expect(staleAfterSeconds(60)).toBe(300);
    expect(staleAfterSeconds(300)).toBe(900);
    expect(staleAfterSeconds(null)).toBe(300);
  });
});
