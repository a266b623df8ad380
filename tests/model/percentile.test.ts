import { describe, expect, it } from 'vitest';
import { percentileOfSorted } from '../../src/model/percentile.ts';

describe('percentileOfSorted', () => {
  it('interpolates between order statistics (type 7; common practice, no source)', () => {
    expect(percentileOfSorted([1, 2, 3, 4], 0.5)).toBe(2.5);
    expect(percentileOfSorted([1, 2, 3, 4, 5], 0.05)).toBeCloseTo(1.2, 12);
    expect(percentileOfSorted([], 0.5)).toBeNaN();
  });
});
