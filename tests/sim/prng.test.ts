import { describe, expect, it } from 'vitest';
import { createPrng, deriveSeed } from '../../src/sim/prng.ts';

describe('createPrng', () => {
  it('gives the same sequence for the same seed and another for another seed', () => {
    const a = createPrng(42);
    const b = createPrng(42);
    const c = createPrng(43);
    const sa = Array.from({ length: 100 }, () => a.next());
    expect(Array.from({ length: 100 }, () => b.next())).toEqual(sa);
    expect(Array.from({ length: 100 }, () => c.next())).not.toEqual(sa);
  });

  it('draws uniforms in [0, 1) with mean 1/2 and variance 1/12', () => {
    const p = createPrng(1);
    const xs = Array.from({ length: 100_000 }, () => p.next());
    expect(Math.min(...xs)).toBeGreaterThanOrEqual(0);
    expect(Math.max(...xs)).toBeLessThan(1);
    const mean = xs.reduce((s, x) => s + x, 0) / xs.length;
    const variance = xs.reduce((s, x) => s + (x - mean) ** 2, 0) / xs.length;
    // Uniform(0, 1): mean 1/2, variance 1/12 (common practice, no source).
    expect(mean).toBeCloseTo(0.5, 2);
    expect(variance).toBeCloseTo(1 / 12, 2);
  });

  it('draws standard normals: mean 0, SD 1, about 68.3 % within one SD', () => {
    const p = createPrng(2);
    const xs = Array.from({ length: 100_000 }, () => p.gauss());
    const mean = xs.reduce((s, x) => s + x, 0) / xs.length;
    const sd = Math.sqrt(xs.reduce((s, x) => s + (x - mean) ** 2, 0) / xs.length);
    expect(mean).toBeCloseTo(0, 1);
    expect(sd).toBeCloseTo(1, 1);
    // P(|Z| < 1) = 0.6827 for a standard normal (common practice, no source).
    expect(xs.filter((x) => Math.abs(x) < 1).length / xs.length).toBeCloseTo(0.6827, 2);
    expect(xs.every(Number.isFinite)).toBe(true);
  });
});

describe('deriveSeed', () => {
  it('gives distinct 32-bit seeds for distinct streams of one seed', () => {
    const seeds = new Set(Array.from({ length: 1000 }, (_, i) => deriveSeed(7, i)));
    expect(seeds.size).toBe(1000);
    for (const s of seeds) expect(s >>> 0).toBe(s);
  });
});
