import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { regionProbabilities, regionProbabilityRecord, strideRegionFractions } from '../../src/model/region-probability.ts';
import { plateauMiddleUm, regionAt } from '../../src/model/geometry.ts';
import { REGION_KEYS, regionIndex } from '../../src/model/regions.ts';
import { SPECIES, speciesCurve } from '../../src/model/species.ts';
import { SPREAD_SHAPES, type CountSpread } from '../../src/model/count-spread.ts';
import { createPrng } from '../../src/sim/prng.ts';

const human = speciesCurve('human');
const lognormal = (relativeSd: number): CountSpread => ({ relativeSd, shape: 'lognormal' });
const lengthNormal = (relativeSd: number): CountSpread => ({ relativeSd, shape: 'length_normal' });

/** The true length the Monte Carlo draws: SL·N̂/N for a lognormal N of relative SD cv, or SL(1 + cv·g). */
function trueLength(spread: CountSpread, sl: number, g: number): number {
  if (spread.shape === 'lognormal') return sl * Math.exp(Math.sqrt(Math.log(1 + spread.relativeSd ** 2)) * g);
  return sl * (1 + spread.relativeSd * g);
}

describe('regionProbabilities', () => {
  it('sums to 1 with every probability in 0–1, for any length, spread and shape', () => {
    fc.assert(
      fc.property(
        fc.constantFrom(...SPECIES),
        fc.constantFrom(...SPREAD_SHAPES),
        fc.double({ min: 0.3, max: 6, noNaN: true }),
        fc.double({ min: 0, max: 0.5, noNaN: true }),
        (species, shape, sl, cv) => {
          const p = regionProbabilities(speciesCurve(species), sl, { relativeSd: cv, shape });
          const sum = p.reduce((a, b) => a + b, 0);
          return Math.abs(sum - 1) < 1e-9 && p.every((x) => x >= -1e-9 && x <= 1 + 1e-9);
        },
      ),
    );
  });

  it('puts all probability in the estimate’s region when the calibration is exact', () => {
    const p = regionProbabilities(human, 3.3, lognormal(0));
    expect(p[regionIndex('descending')]).toBe(1);
    expect(p.reduce((a, b) => a + b, 0)).toBe(1);
  });

  it('splits evenly at a region boundary: half the probability lies above it, for both shapes', () => {
    for (const spread of [lognormal(0.02), lengthNormal(0.02)]) {
      const p = regionProbabilityRecord(human, human.plateauEndUm, spread);
      expect(p.descending + p.no_overlap).toBeCloseTo(0.5, 12);
      expect(p.plateau).toBeCloseTo(0.5, 2);
    }
  });

  it('at CV 0.2 from L0 gives P(no overlap) ≈ 0.0027 when the error lies in the reference sarcomere length, not a normal count’s 0.037', () => {
    // Estimate at L0 = 2.726 µm, no overlap from 4.241 µm. An error in the reference sarcomere length makes the
    // true length normal around the estimate: z = (1 − 4.241/2.726)/0.2 = −2.78, and Φ(−2.78) = 0.00272
    // (Abramowitz & Stegun 1964, Handbook of Mathematical Functions, Table 26.1 — from memory). A normal N
    // would give Φ((2.726/4.241 − 1)/0.2) = Φ(−1.79) = 0.0367 (same table), skewed towards long lengths.
    const l0 = plateauMiddleUm(human);
    expect(l0).toBeCloseTo(2.726, 3);
    expect(regionProbabilityRecord(human, l0, lengthNormal(0.2)).no_overlap).toBeCloseTo(0.0027, 4);
    // Lognormal (error in N itself): z = ln(2.726/4.241)/√ln(1.04) = −2.23, Φ(−2.23) = 0.0129 (same table).
    expect(regionProbabilityRecord(human, l0, lognormal(0.2)).no_overlap).toBeCloseTo(0.0128, 3);
  });

  it('matches a fixed-seed Monte Carlo of the true length, for both shapes, to within sampling error', () => {
    // The simulator's seeded generator (mulberry32 and Box–Muller normals): the same draws on every run.
    for (const spread of [lognormal(0.15), lengthNormal(0.15)]) {
      for (const sl of [2.2, 2.7, 3.6]) {
        const draw = createPrng(20261201).gauss;
        const counts = new Float64Array(REGION_KEYS.length);
        const runs = 40_000;
        for (let i = 0; i < runs; i++) {
          const r = regionIndex(regionAt(human, trueLength(spread, sl, draw())));
          counts[r] = (counts[r] as number) + 1;
        }
        const p = regionProbabilities(human, sl, spread);
        REGION_KEYS.forEach((_, r) => {
          // Binomial SE is at most 0.5/√40000 = 0.0025; allow 4 SE.
          expect(Math.abs((counts[r] as number) / runs - (p[r] as number))).toBeLessThan(0.01);
        });
      }
    }
  });

  it('writes into the array it is given', () => {
    const out = new Float64Array(6);
    expect(regionProbabilities(human, 2.7, lognormal(0.05), out)).toBe(out);
  });

  it('gives NaN for a NaN length, a non-positive length or a negative spread', () => {
    expect(regionProbabilities(human, Number.NaN, lognormal(0.05)).every(Number.isNaN)).toBe(true);
    expect(regionProbabilities(human, 0, lognormal(0.05)).every(Number.isNaN)).toBe(true);
    expect(regionProbabilities(human, 2.7, lognormal(-0.1)).every(Number.isNaN)).toBe(true);
  });
});

describe('strideRegionFractions', () => {
  const stride = Array.from({ length: 120 }, (_, i) => 2.4 + 0.7 * Math.sin((i / 120) * 2 * Math.PI));
  const durations = stride.map(() => 0.01);

  it('with no uncertainty gives the plain time fractions and a zero-width interval', () => {
    const r = strideRegionFractions(human, stride, durations, lognormal(0));
    const plain = Object.fromEntries(REGION_KEYS.map((k) => [k, 0])) as Record<string, number>;
    for (const sl of stride) plain[regionAt(human, sl)] = (plain[regionAt(human, sl)] as number) + 1 / stride.length;
    for (const k of REGION_KEYS) {
      expect(r.expected[k]).toBeCloseTo(plain[k] as number, 12);
      expect(r.low[k]).toBe(r.expected[k]);
      expect(r.high[k]).toBe(r.expected[k]);
    }
  });

  it('has expected fractions summing to 1 and a 90% interval around them', () => {
    const r = strideRegionFractions(human, stride, durations, lognormal(0.05));
    expect(REGION_KEYS.reduce((a, k) => a + r.expected[k], 0)).toBeCloseTo(1, 9);
    for (const k of REGION_KEYS) {
      expect(r.low[k]).toBeLessThanOrEqual(r.high[k]);
      expect(r.low[k]).toBeLessThanOrEqual(r.expected[k] + 0.02);
      expect(r.high[k]).toBeGreaterThanOrEqual(r.expected[k] - 0.02);
    }
  });

  it('gives a 90% interval that is one: its ends match a fixed-seed Monte Carlo of N to 0.005, and it holds 90% of the draws', () => {
    // An invented stride of 2000 samples spread evenly in log length across the plateau end (2.81 µm ×
    // e^(−0.18…0.18)), so its descending-limb time changes smoothly and monotonically with N (no sample
    // reaches no overlap, 4.24 µm, within 4.5 SD of N).
    const fine = Array.from({ length: 2000 }, (_, i) => human.plateauEndUm * Math.exp(-0.18 + (0.36 * (i + 0.5)) / 2000));
    const dt = fine.map(() => 0.0005);
    /** Descending-limb share when every true length is the estimate × r (lengths ascending: two binary searches). */
    const descendingShare = (r: number): number => {
      const firstAtLeast = (x: number): number => {
        let lo = 0;
        let hi = fine.length;
        while (lo < hi) {
          const mid = (lo + hi) >> 1;
          if ((fine[mid] as number) * r >= x) hi = mid;
          else lo = mid + 1;
        }
        return lo;
      };
      // Descending: strictly above the plateau end, below the no-overlap length.
      let start = firstAtLeast(human.plateauEndUm);
      while (start < fine.length && (fine[start] as number) * r <= human.plateauEndUm) start++;
      return (firstAtLeast(human.descendingZeroUm) - start) / fine.length;
    };
    for (const spread of [lognormal(0.05), lengthNormal(0.05)]) {
      const ours = strideRegionFractions(human, fine, dt, spread);
      const draw = createPrng(90_2026).gauss;
      const runs = 200_000;
      const share = new Float64Array(runs);
      for (let j = 0; j < runs; j++) share[j] = descendingShare(trueLength(spread, 1, draw()));
      const sorted = Float64Array.from(share).sort();
      // Empirical 5th and 95th percentiles of the draws (order statistics 10 000 and 190 000).
      expect(Math.abs(ours.low.descending - (sorted[9_999] as number))).toBeLessThan(0.005);
      expect(Math.abs(ours.high.descending - (sorted[189_999] as number))).toBeLessThan(0.005);
      let covered = 0;
      for (const x of share) if (x >= ours.low.descending && x <= ours.high.descending) covered++;
      // 90 % of the draws (the Monte Carlo SE of a coverage of 0.9 over 200 000 draws is 0.0007); type-7
      // percentiles of the 200 points would hold 89.5 %, a 5th–95th taken as 10th–90th 80 %.
      expect(Math.abs(covered / runs - 0.9)).toBeLessThan(0.002);
    }
  });

  it('widens the interval as the calibration gets less certain', () => {
    const narrow = strideRegionFractions(human, stride, durations, lognormal(0.01));
    const wide = strideRegionFractions(human, stride, durations, lognormal(0.08));
    expect(wide.high.descending - wide.low.descending).toBeGreaterThan(narrow.high.descending - narrow.low.descending);
  });

  it('is deterministic: the same stride gives the same interval', () => {
    expect(strideRegionFractions(human, stride, durations, lognormal(0.05))).toEqual(strideRegionFractions(human, stride, durations, lognormal(0.05)));
  });

  it('gives NaN fractions for an empty stride and skips NaN lengths', () => {
    const empty = strideRegionFractions(human, [], [], lognormal(0.05));
    expect(Number.isNaN(empty.expected.plateau)).toBe(true);
    const one = strideRegionFractions(human, [Number.NaN, 2.7], [0.01, 0.01], lognormal(0.001));
    expect(one.expected.plateau).toBeCloseTo(1, 6);
  });

  it('weighs each sample by the time it stands for', () => {
    const r = strideRegionFractions(human, [2.7, 3.5], [0.03, 0.01], lognormal(0));
    expect(r.expected.plateau).toBeCloseTo(0.75, 12);
    expect(r.expected.descending).toBeCloseTo(0.25, 12);
  });
});
