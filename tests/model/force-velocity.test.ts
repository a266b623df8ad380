import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  DEFAULT_HILL_K,
  DEFAULT_LENGTHENING_PLATEAU,
  DEFAULT_LENGTHENING_SLOPE_RATIO,
  DEFAULT_VMAX_L0_PER_S,
  alongTendonFactor,
  forceVelocityFactor,
  normalizedVelocity,
} from '../../src/model/force-velocity.ts';

describe('forceVelocityFactor: shortening (Hill 1938, Proc R Soc Lond B 126:136–195)', () => {
  it('is 1 when isometric and 0 at the maximum shortening velocity', () => {
    expect(forceVelocityFactor(0)).toBe(1);
    expect(forceVelocityFactor(-1)).toBe(0);
    expect(forceVelocityFactor(-1.5)).toBe(0);
  });

  it('is 1/6 at half the maximum velocity with a/F0 = 0.25 (the normalized hyperbola)', () => {
    expect(DEFAULT_HILL_K).toBe(0.25);
    expect(forceVelocityFactor(-0.5)).toBeCloseTo(1 / 6, 12);
  });

  it('puts peak power near 0.31 Vmax for a/F0 = 0.25 (√(k² + k) − k; common practice, no source)', () => {
    let best = 0;
    let at = 0;
    for (let u = 0; u <= 1; u += 0.0001) {
      const p = u * forceVelocityFactor(-u);
      if (p > best) [best, at] = [p, u];
    }
    expect(at).toBeCloseTo(Math.sqrt(0.25 * 0.25 + 0.25) - 0.25, 3);
  });

  it('falls monotonically with shortening speed, within 0–1', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 1.2, noNaN: true }), fc.double({ min: 0, max: 1.2, noNaN: true }), (a, b) => {
        const [lo, hi] = a < b ? [a, b] : [b, a];
        const f = forceVelocityFactor(-lo);
        return f >= 0 && f <= 1 && f >= forceVelocityFactor(-hi);
      }),
    );
  });
});

describe('forceVelocityFactor: lengthening', () => {
  it('rises monotonically towards a plateau of 1.5 F0 (Geyer & Herr 2010, IEEE Trans Neural Syst Rehabil Eng 18:263–273 — from memory)', () => {
    expect(DEFAULT_LENGTHENING_PLATEAU).toBe(1.5);
    expect(forceVelocityFactor(100)).toBeGreaterThan(1.49);
    expect(forceVelocityFactor(100)).toBeLessThan(1.5);
    fc.assert(
      fc.property(fc.double({ min: 0, max: 5, noNaN: true }), fc.double({ min: 0, max: 5, noNaN: true }), (a, b) => {
        const [lo, hi] = a < b ? [a, b] : [b, a];
        return forceVelocityFactor(lo) <= forceVelocityFactor(hi) && forceVelocityFactor(hi) < 1.5;
      }),
    );
  });

  it('leaves zero velocity twice as steeply as the shortening branch: a modelling convention (e.g. van Soest & Bobbert 1993, Biol Cybern 69:195–204 — from memory), not a measurement', () => {
    expect(DEFAULT_LENGTHENING_SLOPE_RATIO).toBe(2);
    const h = 1e-7;
    const lengthening = (forceVelocityFactor(h) - 1) / h;
    const shortening = (1 - forceVelocityFactor(-h)) / h;
    expect(lengthening / shortening).toBeCloseTo(2, 3);
  });

  it('takes a smaller plateau for in vivo use', () => {
    expect(forceVelocityFactor(100, { lengtheningPlateau: 1.1 })).toBeCloseTo(1.1, 2);
  });

  it('gives NaN for NaN', () => {
    expect(forceVelocityFactor(Number.NaN)).toBeNaN();
  });
});

describe('normalizedVelocity', () => {
  it('divides by the optimal fascicle length and Vmax = 10 L0/s (Thelen 2003, J Biomech Eng 125:70–77)', () => {
    expect(DEFAULT_VMAX_L0_PER_S).toBe(10);
    expect(normalizedVelocity(-300, 60)).toBeCloseTo(-0.5, 12);
  });
});

describe('alongTendonFactor', () => {
  it('is cos(pennation): 1 at 0°, √3/2 at 30°, 0.5 at 60° (common practice, no source)', () => {
    expect(alongTendonFactor(0)).toBe(1);
    expect(alongTendonFactor(30)).toBeCloseTo(Math.sqrt(3) / 2, 12);
    expect(alongTendonFactor(60)).toBeCloseTo(0.5, 12);
    expect(alongTendonFactor(90)).toBeCloseTo(0, 12);
  });

  it('gives NaN for NaN or an angle outside 0–90°', () => {
    expect(alongTendonFactor(Number.NaN)).toBeNaN();
    expect(alongTendonFactor(-1)).toBeNaN();
    expect(alongTendonFactor(91)).toBeNaN();
  });
});
