import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { regionProbabilities, regionProbabilityRecord, strideRegionFractions } from '../../src/model/region-probability.ts';
import { regionAt } from '../../src/model/geometry.ts';
import { REGION_KEYS, regionIndex } from '../../src/model/regions.ts';
import { SPECIES, speciesCurve } from '../../src/model/species.ts';
import { createPrng } from '../../src/sim/prng.ts';

const human = speciesCurve('human');

describe('regionProbabilities', () => {
  it('sums to 1 with every probability in 0–1, for any length and spread', () => {
    fc.assert(
      fc.property(
        fc.constantFrom(...SPECIES),
        fc.double({ min: 0.3, max: 6, noNaN: true }),
        fc.double({ min: 0, max: 0.3, noNaN: true }),
        (species, sl, cv) => {
          const p = regionProbabilities(speciesCurve(species), sl, cv);
          const sum = p.reduce((a, b) => a + b, 0);
          return Math.abs(sum - 1) < 1e-9 && p.every((x) => x >= -1e-9 && x <= 1 + 1e-9);
        },
      ),
    );
  });

  it('puts all probability in the estimate’s region when the calibration is exact', () => {
    const p = regionProbabilities(human, 3.3, 0);
    expect(p[regionIndex('descending')]).toBe(1);
    expect(p.reduce((a, b) => a + b, 0)).toBe(1);
  });

  it('splits evenly at a region boundary: half the probability lies above it', () => {
    const p = regionProbabilityRecord(human, human.plateauEndUm, 0.02);
    expect(p.descending + p.no_overlap).toBeCloseTo(0.5, 12);
    expect(p.plateau).toBeCloseTo(0.5, 2);
  });

  it('matches a fixed-seed Monte Carlo of N ~ Normal(N̂, (cv·N̂)²) to within sampling error', () => {
    // The simulator's seeded generator (mulberry32 and Box–Muller normals): the same draws on every run.
    const draw = createPrng(20261201).gauss;
    const sl = 2.7;
    const cv = 0.04;
    const counts = new Float64Array(REGION_KEYS.length);
    const runs = 40_000;
    for (let i = 0; i < runs; i++) {
      const ratio = 1 + cv * draw();
      counts[regionIndex(regionAt(human, sl / ratio))] = (counts[regionIndex(regionAt(human, sl / ratio))] as number) + 1;
    }
    const p = regionProbabilities(human, sl, cv);
    REGION_KEYS.forEach((_, r) => {
      // Binomial SE is at most 0.5/√40000 = 0.0025; allow 4 SE.
      expect(Math.abs((counts[r] as number) / runs - (p[r] as number))).toBeLessThan(0.01);
    });
  });

  it('writes into the array it is given', () => {
    const out = new Float64Array(6);
    expect(regionProbabilities(human, 2.7, 0.05, out)).toBe(out);
  });

  it('gives NaN for a NaN length, a non-positive length or a negative spread', () => {
    expect(regionProbabilities(human, Number.NaN, 0.05).every(Number.isNaN)).toBe(true);
    expect(regionProbabilities(human, 0, 0.05).every(Number.isNaN)).toBe(true);
    expect(regionProbabilities(human, 2.7, -0.1).every(Number.isNaN)).toBe(true);
  });
});

describe('strideRegionFractions', () => {
  const stride = Array.from({ length: 120 }, (_, i) => 2.4 + 0.7 * Math.sin((i / 120) * 2 * Math.PI));
  const durations = stride.map(() => 0.01);

  it('with no uncertainty gives the plain time fractions and a zero-width interval', () => {
    const r = strideRegionFractions(human, stride, durations, 0);
    const plain = Object.fromEntries(REGION_KEYS.map((k) => [k, 0])) as Record<string, number>;
    for (const sl of stride) plain[regionAt(human, sl)] = (plain[regionAt(human, sl)] as number) + 1 / stride.length;
    for (const k of REGION_KEYS) {
      expect(r.expected[k]).toBeCloseTo(plain[k] as number, 12);
      expect(r.low[k]).toBe(r.expected[k]);
      expect(r.high[k]).toBe(r.expected[k]);
    }
  });

  it('has expected fractions summing to 1 and a 90% interval around them', () => {
    const r = strideRegionFractions(human, stride, durations, 0.05);
    expect(REGION_KEYS.reduce((a, k) => a + r.expected[k], 0)).toBeCloseTo(1, 9);
    for (const k of REGION_KEYS) {
      expect(r.low[k]).toBeLessThanOrEqual(r.high[k]);
      expect(r.low[k]).toBeLessThanOrEqual(r.expected[k] + 0.02);
      expect(r.high[k]).toBeGreaterThanOrEqual(r.expected[k] - 0.02);
    }
  });

  it('widens the interval as the calibration gets less certain', () => {
    const narrow = strideRegionFractions(human, stride, durations, 0.01);
    const wide = strideRegionFractions(human, stride, durations, 0.08);
    expect(wide.high.descending - wide.low.descending).toBeGreaterThan(narrow.high.descending - narrow.low.descending);
  });

  it('is deterministic: the same stride gives the same interval', () => {
    expect(strideRegionFractions(human, stride, durations, 0.05)).toEqual(strideRegionFractions(human, stride, durations, 0.05));
  });

  it('gives NaN fractions for an empty stride and skips NaN lengths', () => {
    const empty = strideRegionFractions(human, [], [], 0.05);
    expect(Number.isNaN(empty.expected.plateau)).toBe(true);
    const one = strideRegionFractions(human, [Number.NaN, 2.7], [0.01, 0.01], 0.001);
    expect(one.expected.plateau).toBeCloseTo(1, 6);
  });

  it('weighs each sample by the time it stands for', () => {
    const r = strideRegionFractions(human, [2.7, 3.5], [0.03, 0.01], 0);
    expect(r.expected.plateau).toBeCloseTo(0.75, 12);
    expect(r.expected.descending).toBeCloseTo(0.25, 12);
  });
});
