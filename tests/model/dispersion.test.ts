import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { convolvedTable, dispersedGeometricForceExact, lookup, tableStepUm } from '../../src/model/dispersion.ts';
import { breakpoints, geometricForce } from '../../src/model/geometry.ts';
import { makeMuscleModel } from '../../src/model/muscle-model.ts';
import { SPECIES, speciesCurve } from '../../src/model/species.ts';

const speciesArb = fc.constantFrom(...SPECIES);

describe('convolvedTable', () => {
  it('leaves a constant and a straight line unchanged', () => {
    const flat = convolvedTable(() => 0.7, 0, 1, 0.1);
    const line = convolvedTable((x) => 2 * x - 1, 0, 1, 0.1);
    for (const x of [0, 0.123, 0.5, 0.999]) {
      expect(lookup(flat, x)).toBeCloseTo(0.7, 12);
      expect(lookup(line, x)).toBeCloseTo(2 * x - 1, 9);
    }
  });

  it('gives NaN outside its span, so the caller falls back', () => {
    const t = convolvedTable(() => 1, 1, 2, 0.05);
    expect(lookup(t, 0.5)).toBeNaN();
    expect(lookup(t, 2.5)).toBeNaN();
    expect(lookup(t, Number.NaN)).toBeNaN();
  });

  it('uses a step no coarser than a tenth of the SD', () => {
    expect(tableStepUm(0.2)).toBe(0.001);
    expect(tableStepUm(0.005)).toBeCloseTo(0.0005, 12);
  });
});

describe('dispersed geometric force', () => {
  it('agrees with the closed-form convolution of the straight pieces to 1e-5', () => {
    for (const species of SPECIES) {
      for (const sd of [0.02, 0.2, 0.5]) {
        const model = makeMuscleModel({ species, dispersionSdUm: sd });
        for (let sl = 0.8; sl < 5; sl += 0.0173) {
          expect(Math.abs(model.forceAt(sl) - dispersedGeometricForceExact(model.curve, sl, sd))).toBeLessThan(1e-5);
        }
      }
    }
  });

  it('leaves the linear segments unchanged away from the corners', () => {
    fc.assert(
      fc.property(speciesArb, fc.double({ min: 0.01, max: 0.08, noNaN: true }), fc.double({ min: 1, max: 4.5, noNaN: true }), (species, sd, sl) => {
        const model = makeMuscleModel({ species, dispersionSdUm: sd });
        const nearest = Math.min(...breakpoints(model.curve).map((b) => Math.abs(b.slUm - sl)));
        fc.pre(nearest > 5 * sd);
        return Math.abs(model.forceAt(sl) - geometricForce(model.curve, sl)) < 1e-5;
      }),
      { numRuns: 40 },
    );
  });

  it('always lowers the force at a concave corner (plateau start, plateau end, steep/shallow break)', () => {
    fc.assert(
      fc.property(speciesArb, fc.double({ min: 0.005, max: 0.3, noNaN: true }), (species, sd) => {
        const model = makeMuscleModel({ species, dispersionSdUm: sd });
        const c = model.curve;
        return [c.plateauStartUm, c.plateauEndUm, c.steepBreakUm].every((x) => model.forceAt(x) < geometricForce(c, x));
      }),
      { numRuns: 40 },
    );
  });

  it('raises the force at a convex corner (the two zeros): sarcomeres spread into overlap', () => {
    const model = makeMuscleModel({ dispersionSdUm: 0.2 });
    expect(model.forceAt(model.curve.steepZeroUm)).toBeGreaterThan(0);
    expect(model.forceAt(model.curve.descendingZeroUm)).toBeGreaterThan(0);
  });

  it('spreads a Gaussian shape as the convolution of two Gaussians does, from 0.2 to 2.2 optimal lengths', () => {
    // A Gaussian exp(−(l − 1)²/γ) convolved with a normal density of SD s is √(γ/(γ + 2s²))·exp(−(l − 1)²/(γ + 2s²))
    // (the convolution of two Gaussians; common practice, no source). Here γ = 0.45 (Thelen 2003) and s = σ/L0.
    const model = makeMuscleModel({ shape: 'gaussian', dispersionSdUm: 0.21 });
    const s = 0.21 / model.optimalUm;
    const widened = 0.45 + 2 * s * s;
    for (const l of [0.25, 0.5, 1, 1.5, 1.9, 2.15]) {
      const exact = Math.sqrt(0.45 / widened) * Math.exp(-((l - 1) ** 2) / widened);
      expect(Math.abs(model.forceAt(l * model.optimalUm) - exact)).toBeLessThan(1e-5);
    }
  });

  it('stays within 0–1', () => {
    fc.assert(
      fc.property(speciesArb, fc.double({ min: 0.001, max: 0.6, noNaN: true }), fc.double({ min: -1, max: 8, noNaN: true }), (species, sd, sl) => {
        const f = makeMuscleModel({ species, dispersionSdUm: sd }).forceAt(sl);
        return f >= 0 && f <= 1;
      }),
      { numRuns: 25 },
    );
  });

  it('with the between-fibre SD of 0.21 µm (Chen, Sanchez, Schnitzer & Delp 2016, J Biomech 49:2989–2994) rounds the human plateau below 1', () => {
    const model = makeMuscleModel({ dispersionSdUm: 0.21 });
    const peak = model.forceAt(model.optimalUm);
    expect(peak).toBeLessThan(1);
    expect(peak).toBeGreaterThan(0.9);
    expect(speciesCurve('human').plateauEndUm - speciesCurve('human').plateauStartUm).toBeLessThan(0.2);
  });
});
