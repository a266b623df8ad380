/**
 * The tool's quantiles against d3-array's, a general-purpose library that computes Hyndman & Fan's type 7
 * ("R-7"; Hyndman RJ, Fan Y 1996, Sample quantiles in statistical packages, The American Statistician
 * 50:361–365), the definition src/model/stats.ts uses throughout.
 */
import fc from 'fast-check';
import { median as d3Median, quantile as d3Quantile, quantileSorted as d3QuantileSorted } from 'd3-array';
import { describe, expect, it } from 'vitest';
import { binnedQuantile, median, medianSorted, quantile, quantileBySelection, quantileOfMidpoints, quantileSorted } from '../../src/model/stats.ts';

const values = fc.array(fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e6, max: 1e6 }), { minLength: 1, maxLength: 60 });
const q = fc.double({ min: 0, max: 1, noNaN: true });
const ascending = (xs: readonly number[]): number[] => [...xs].sort((a, b) => a - b);

describe('quantileSorted, quantile and quantileBySelection', () => {
  it('give type 7 quantiles, the same doubles as d3-array', () => {
    fc.assert(
      fc.property(values, q, (xs, p) => {
        const sorted = ascending(xs);
        const reference = d3QuantileSorted(sorted, p) as number;
        // === and not toBe: a signed zero at either end may come out as +0 here and -0 there.
        expect(quantileSorted(sorted, p) === reference).toBe(true);
        expect(quantile(xs, p) === reference).toBe(true);
        expect(quantileBySelection(Float64Array.from(xs), p) === reference).toBe(true);
        expect(quantileSorted(Float64Array.from(sorted), p) === reference).toBe(true);
      }),
      { numRuns: 3000 },
    );
  });

  it('give the median of d3-array, for odd and even counts', () => {
    fc.assert(
      fc.property(values, (xs) => {
        expect(median(xs) === d3Median(xs)).toBe(true);
        expect(medianSorted(ascending(xs)) === d3Median(xs)).toBe(true);
      }),
      { numRuns: 2000 },
    );
  });

  it('interpolate between order statistics: worked values of the definition', () => {
    // h = (n − 1)q: n = 4, q = ½ → h = 1.5, between 2 and 3; n = 5, q = 0.05 → h = 0.2, a fifth of the way from 1 to 2.
    expect(quantileSorted([1, 2, 3, 4], 0.5)).toBe(2.5);
    expect(quantileSorted([1, 2, 3, 4, 5], 0.05)).toBeCloseTo(1.2, 12);
    expect(quantileSorted([7], 0.95)).toBe(7);
    expect(quantile([3, 1, 2], 0)).toBe(1);
    expect(quantile([3, 1, 2], 1)).toBe(3);
  });

  it('give NaN for no values, and leave the caller\'s values in their order', () => {
    expect(quantileSorted([], 0.5)).toBeNaN();
    expect(median([])).toBeNaN();
    const xs = [3, 1, 2];
    quantile(xs, 0.5);
    expect(xs).toEqual([3, 1, 2]);
  });
});

describe('binnedQuantile', () => {
  it('agrees, within the spacing of the points, with the type 7 quantile of weight spread evenly in each bin', () => {
    // Each bin's weight as k equal points per unit spread evenly across the bin: the binned quantile is
    // the limit of their quantile as k grows, within half a point's spacing (1/(2k) of a bin) for any k
    // while no bin between them is empty (type 7 draws a line across an empty bin; the binned one jumps it).
    const k = 50;
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 1, max: 6 }), { minLength: 1, maxLength: 12 }), fc.double({ min: 0, max: 1, noNaN: true }), (counts, p) => {
        const points: number[] = [];
        counts.forEach((count, bin) => {
          for (let i = 0; i < count * k; i++) points.push(bin + ((i % k) + 0.5) / k);
        });
        expect(Math.abs(binnedQuantile(counts, p, 1) - (d3Quantile(points, p) as number))).toBeLessThanOrEqual(0.5 / k + 1e-9);
      }),
      { numRuns: 1000 },
    );
  });

  it('reads only the bins it is given, in bin widths', () => {
    // Bins 2 and 3 hold equal weight: half the weight lies below the start of bin 3, at 3 × 0.5.
    expect(binnedQuantile([9, 0, 1, 1, 9], 0.5, 0.5, 2, 3)).toBe(1.5);
    expect(binnedQuantile([0, 0], 0.5, 1)).toBeNaN();
    // An empty bin is jumped: half the weight lies in bin 0, so the median is the end of bin 0.
    expect(binnedQuantile([1, 0, 1], 0.5, 1)).toBe(1);
  });
});

describe('quantileOfMidpoints', () => {
  it('puts the i-th of M values at (i − ½)/M: type 5 of Hyndman & Fan 1996 (Am Stat 50:361–365 — from memory)', () => {
    // Type 5 of 1…4: the 25th percentile is 1.5, the median 2.5, the 10th and 90th clamp to the ends.
    expect(quantileOfMidpoints([1, 2, 3, 4], 0.25)).toBe(1.5);
    expect(quantileOfMidpoints([1, 2, 3, 4], 0.5)).toBe(2.5);
    expect(quantileOfMidpoints([1, 2, 3, 4], 0.1)).toBe(1);
    expect(quantileOfMidpoints([1, 2, 3, 4], 0.9)).toBe(4);
    expect(quantileOfMidpoints([], 0.5)).toBeNaN();
  });

  it('returns the 5th percentile of equal-probability points of a distribution at probability 0.05 exactly', () => {
    // 200 points at (i − ½)/200 of the uniform distribution: the 5th percentile must be 0.05, which type 7 misses (0.05225).
    const u = Array.from({ length: 200 }, (_, i) => (i + 0.5) / 200);
    expect(quantileOfMidpoints(u, 0.05)).toBeCloseTo(0.05, 12);
    expect(quantileOfMidpoints(u, 0.95)).toBeCloseTo(0.95, 12);
    expect(quantileSorted(u, 0.05)).toBeCloseTo(0.05225, 12);
  });
});
