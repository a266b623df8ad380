import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { formatNumber } from '../../src/sim/format-number.ts';

describe('formatNumber', () => {
  it('writes integers, six-decimal values, signs and zero as String() does', () => {
    for (const v of [0, -0, 1, -1, 0.1, 0.01, 0.000001, 44.973, -3.2, 97.5, 12345.678901, 1e-7, 1e21, 2 ** 53]) {
      expect(formatNumber(v)).toBe(String(v));
    }
  });

  it('writes non-finite values as String() does', () => {
    for (const v of [Number.NaN, Infinity, -Infinity]) expect(formatNumber(v)).toBe(String(v));
  });

  it('agrees with String() on any double, and on any value rounded to at most six decimals', () => {
    fc.assert(fc.property(fc.double(), (v) => formatNumber(v) === String(v)), { numRuns: 20_000 });
    fc.assert(
      fc.property(fc.integer({ min: -1e12, max: 1e12 }), fc.integer({ min: 0, max: 6 }), (n, d) => {
        const v = n / 10 ** d;
        return formatNumber(v) === String(v);
      }),
      { numRuns: 20_000 },
    );
  });
});
