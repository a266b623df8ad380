import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { normalCdf, normalPdf, normalQuantile } from '../../src/model/normal.ts';

describe('normalCdf (Abramowitz & Stegun 1964, 26.2.17)', () => {
  // Reference values: Abramowitz & Stegun 1964, Handbook of Mathematical Functions, Table 26.1 (from memory;
  // the same values any statistics package gives for the standard normal distribution).
  const table: ReadonlyArray<readonly [number, number]> = [
    [0, 0.5],
    [0.5, 0.6914624613],
    [1, 0.8413447461],
    [1.96, 0.9750021049],
    [2, 0.9772498681],
    [2.5, 0.9937903347],
    [3, 0.998650102],
  ];

  it('matches the table to 1e-7 on both sides of zero', () => {
    for (const [z, p] of table) {
      expect(Math.abs(normalCdf(z) - p)).toBeLessThan(1e-7);
      expect(Math.abs(normalCdf(-z) - (1 - p))).toBeLessThan(1e-7);
    }
  });

  it('gives 0.95 at z = 1.644854 (the one-sided 5% point; Abramowitz & Stegun 1964, Table 26.5 — from memory)', () => {
    expect(normalCdf(1.6448536)).toBeCloseTo(0.95, 6);
  });

  it('is non-decreasing, within 0–1, and symmetric', () => {
    fc.assert(
      fc.property(fc.double({ min: -10, max: 10, noNaN: true }), fc.double({ min: -10, max: 10, noNaN: true }), (a, b) => {
        const [lo, hi] = a < b ? [a, b] : [b, a];
        const pa = normalCdf(lo);
        return pa >= 0 && pa <= 1 && pa <= normalCdf(hi) + 1e-15 && Math.abs(normalCdf(a) + normalCdf(-a) - 1) < 1e-12;
      }),
    );
  });

  it('handles infinities and NaN', () => {
    expect(normalCdf(Number.POSITIVE_INFINITY)).toBe(1);
    expect(normalCdf(Number.NEGATIVE_INFINITY)).toBe(0);
    expect(normalCdf(Number.NaN)).toBeNaN();
  });
});

describe('normalPdf', () => {
  it('is 1/√(2π) ≈ 0.3989423 at 0 (common practice, no source)', () => {
    expect(normalPdf(0)).toBeCloseTo(0.3989422804, 9);
  });
});

describe('normalQuantile', () => {
  it('inverts normalCdf: 1.959964 at 0.975 (Abramowitz & Stegun 1964, Table 26.5 — from memory)', () => {
    expect(normalQuantile(0.975)).toBeCloseTo(1.959964, 5);
    expect(normalQuantile(0.5)).toBeCloseTo(0, 9);
  });

  it('round-trips through normalCdf', () => {
    fc.assert(
      fc.property(fc.double({ min: 1e-6, max: 1 - 1e-6, noNaN: true }), (p) => Math.abs(normalCdf(normalQuantile(p)) - p) < 1e-9),
    );
  });

  it('gives ±∞ at 0 and 1 and NaN outside', () => {
    expect(normalQuantile(0)).toBe(Number.NEGATIVE_INFINITY);
    expect(normalQuantile(1)).toBe(Number.POSITIVE_INFINITY);
    expect(normalQuantile(1.5)).toBeNaN();
    expect(normalQuantile(Number.NaN)).toBeNaN();
  });
});
