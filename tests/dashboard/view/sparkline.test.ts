import { describe, expect, it } from 'vitest';
import { sparkline } from '../../../src/dashboard/view/sparkline.ts';

describe('sparkline', () => {
  it('is empty for no values or no room', () => {
    expect(sparkline([], 10).text).toBe('');
    expect(sparkline([2.5, 2.6], 0).text).toBe('');
    expect(sparkline([], 10).min).toBeNaN();
  });
  it('draws one value at mid height', () => {
    expect(sparkline([2.7], 10)).toEqual({ text: '▄', min: 2.7, max: 2.7 });
  });
  it('scales many values from the lowest to the highest block', () => {
    const s = sparkline([2.0, 2.5, 3.0], 10);
    expect(s.text).toBe('▁▅█');
    expect([s.min, s.max]).toEqual([2.0, 3.0]);
  });
  it('keeps only the newest values that fit', () => {
    expect(sparkline([9, 1, 2, 3], 3).text).toBe('▁▅█');
  });
  it('skips values that are not numbers', () => {
    expect(sparkline([2, Number.NaN, 3, Number.POSITIVE_INFINITY], 10).text).toBe('▁█');
  });
});
