import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { DE_GROOTE_2016, THELEN_GAMMA, gaussianForceNorm, threeGaussianForceNorm } from '../../src/model/smooth-curves.ts';

describe('gaussianForceNorm (Thelen 2003, J Biomech Eng 125:70–77)', () => {
  it('uses γ = 0.45', () => {
    expect(THELEN_GAMMA).toBe(0.45);
  });

  it('is 1 at the optimal length and 0.5738 at half and one and a half optimal lengths', () => {
    expect(gaussianForceNorm(1)).toBe(1);
    expect(gaussianForceNorm(0.5)).toBeCloseTo(0.5738, 4);
    expect(gaussianForceNorm(1.5)).toBeCloseTo(0.5738, 4);
  });

  it('stays within 0–1 and rises up to L0, falls after it', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 3, noNaN: true }), fc.double({ min: 0, max: 3, noNaN: true }), (a, b) => {
        const [lo, hi] = a < b ? [a, b] : [b, a];
        const f = gaussianForceNorm(lo);
        const rising = hi <= 1 ? f <= gaussianForceNorm(hi) : true;
        const falling = lo >= 1 ? f >= gaussianForceNorm(hi) : true;
        return f >= 0 && f <= 1 && rising && falling;
      }),
    );
  });
});

describe('threeGaussianForceNorm (De Groote, Kinney, Rao & Fregly 2016, Ann Biomed Eng 44:2922–2936)', () => {
  it('uses the paper’s table: the third Gaussian in closed form (b33 = 0.5·√0.5 = 0.353553…), the others as recalled (from memory)', () => {
    const [first, second, third] = DE_GROOTE_2016;
    expect(third).toEqual([0.1, 1, 0.5 * Math.sqrt(0.5), 0]);
    expect(third[2]).toBeCloseTo(0.353553390593274, 15);
    // Its width term squared is exactly 1/8, so the third Gaussian is 0.1·exp(−4(l − 1)²).
    expect(third[2] ** 2).toBeCloseTo(0.125, 15);
    // The first two rows as recalled (the table not at hand): pinned so that a changed digit is seen.
    expect(first).toEqual([0.814483478343008, 1.05503342897057, 0.162384573599574, 0.0633034484654646]);
    expect(second).toEqual([0.433004984392647, 0.71677541339776, -0.0299471169706956, 0.200356847296188]);
  });


  it('is about 1 at the optimal length', () => {
    expect(threeGaussianForceNorm(1)).toBeCloseTo(1, 2);
  });

  it('is about 0.054 at half the optimal length (the width term squared as a whole)', () => {
    expect(threeGaussianForceNorm(0.5)).toBeCloseTo(0.054, 3);
  });

  it('stays within 0–1 over every length', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 4, noNaN: true }), (l) => {
        const f = threeGaussianForceNorm(l);
        return f >= 0 && f <= 1;
      }),
    );
  });

  it('rises on the ascending side and falls on the descending side', () => {
    fc.assert(
      fc.property(fc.double({ min: 0.3, max: 2.2, noNaN: true }), fc.double({ min: 0.3, max: 2.2, noNaN: true }), (a, b) => {
        const [lo, hi] = a < b ? [a, b] : [b, a];
        if (hi <= 0.99) return threeGaussianForceNorm(lo) <= threeGaussianForceNorm(hi) + 1e-12;
        if (lo >= 1.01) return threeGaussianForceNorm(lo) >= threeGaussianForceNorm(hi) - 1e-12;
        return true;
      }),
    );
  });
});
