import { describe, expect, it } from 'vitest';
import { percentileOfMidpoints, percentileOfSorted } from '../../src/model/percentile.ts';

describe('percentileOfSorted', () => {
  it('interpolates between order statistics (type 7; common practice, no source)', () => {
    expect(percentileOfSorted([1, 2, 3, 4], 0.5)).toBe(2.5);
    expect(percentileOfSorted([1, 2, 3, 4, 5], 0.05)).toBeCloseTo(1.2, 12);
    expect(percentileOfSorted([], 0.5)).toBeNaN();
  });
});

describe('percentileOfMidpoints', () => {
  it('puts the i-th of M values at (i − ½)/M: type 5 of Hyndman & Fan 1996 (Am Stat 50:361–365 — from memory)', () => {
    // Type 5 of 1…4: the 25th percentile is 1.5, the median 2.5, the 10th and 90th clamp to the ends.
    expect(percentileOfMidpoints([1, 2, 3, 4], 0.25)).toBe(1.5);
    expect(percentileOfMidpoints([1, 2, 3, 4], 0.5)).toBe(2.5);
    expect(percentileOfMidpoints([1, 2, 3, 4], 0.1)).toBe(1);
    expect(percentileOfMidpoints([1, 2, 3, 4], 0.9)).toBe(4);
    expect(percentileOfMidpoints([], 0.5)).toBeNaN();
  });

  it('returns the 5th percentile of equal-probability points of a distribution at probability 0.05 exactly', () => {
    // 200 points at (i − ½)/200 of the uniform distribution: the 5th percentile must be 0.05, which type 7 misses (0.05225).
    const u = Array.from({ length: 200 }, (_, i) => (i + 0.5) / 200);
    expect(percentileOfMidpoints(u, 0.05)).toBeCloseTo(0.05, 12);
    expect(percentileOfMidpoints(u, 0.95)).toBeCloseTo(0.95, 12);
    expect(percentileOfSorted(u, 0.05)).toBeCloseTo(0.05225, 12);
  });
});
