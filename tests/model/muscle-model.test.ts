import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { CURVE_SHAPES, LLOYD_BESIER_SHIFT, isCurveShape, makeMuscleModel, muscleModelProblems, type CurveShape } from '../../src/model/muscle-model.ts';
import { regionAt } from '../../src/model/geometry.ts';
import { REGION_KEYS } from '../../src/model/regions.ts';
import { SPECIES, speciesCurve, type Species } from '../../src/model/species.ts';

describe('makeMuscleModel', () => {
  it('defaults to the human geometric curve with no dispersion', () => {
    const m = makeMuscleModel();
    expect(m.species).toBe('human');
    expect(m.shape).toBe('geometric');
    expect(m.dispersionSdUm).toBe(0);
    expect(m.curve).toEqual(speciesCurve('human'));
    // Full force across the standard model's human plateau, 2.64–2.81 µm (Gollapudi & Lin 2009, J Biomech
    // 42:2011–2016, abstract); half force half-way down the descending limb to 4.24 µm; none past it or below 1.27 µm
    // (Rassier, MacIntosh & Herzog 1999, Fig. 3 — as transcribed).
    for (const sl of [2.65, 2.7, 2.8]) expect(m.forceAt(sl)).toBe(1);
    expect(m.forceAt(3.525)).toBeCloseTo(0.5, 2);
    expect(m.forceAt(4.3)).toBe(0);
    expect(m.forceAt(1.2)).toBe(0);
  });

  it('takes a muscle’s own filament lengths', () => {
    const m = makeMuscleModel({ species: 'human', filaments: { thinUm: 1.1, bareZoneUm: 0.2 } });
    expect(m.curve.plateauStartUm).toBeCloseTo(2.3, 9);
    expect(m.curve.plateauEndUm).toBeCloseTo(2.5, 9);
    expect(m.optimalUm).toBeCloseTo(2.4, 9);
  });

  it('gives the Gaussian shapes in normalized length, L0 at the plateau middle', () => {
    const g = makeMuscleModel({ shape: 'gaussian' });
    const t = makeMuscleModel({ shape: 'three-gaussian', species: 'frog' });
    expect(g.forceAt(g.optimalUm)).toBe(1);
    // Thelen 2003 (J Biomech Eng 125:70–77): exp(−0.25/0.45) = 0.5738 at half and one and a half optimal lengths.
    expect(g.forceAt(0.5 * g.optimalUm)).toBeCloseTo(0.5738, 4);
    expect(g.forceAt(1.5 * g.optimalUm)).toBeCloseTo(0.5738, 4);
    // De Groote et al. 2016 (Ann Biomed Eng 44:2922–2936): peak force about 1 at the optimal length, frog L0 2.125 µm.
    expect(t.optimalUm).toBeCloseTo(2.125, 9);
    expect(t.forceAt(t.optimalUm)).toBeCloseTo(1, 2);
  });

  it('takes regions from the geometry whatever the shape', () => {
    fc.assert(
      fc.property(fc.constantFrom(...CURVE_SHAPES), fc.constantFrom(...SPECIES), fc.double({ min: 0.5, max: 5, noNaN: true }), (shape: CurveShape, species: Species, sl) => {
        const m = makeMuscleModel({ shape, species });
        return m.regionAt(sl) === regionAt(speciesCurve(species), sl) && REGION_KEYS[m.regionIndexAt(sl)] === m.regionAt(sl);
      }),
    );
  });

  it('keeps every active force within 0–1, for every shape and dispersion', () => {
    const models = CURVE_SHAPES.flatMap((shape) => [0, 0.2].map((dispersionSdUm) => makeMuscleModel({ shape, dispersionSdUm })));
    fc.assert(
      fc.property(fc.constantFrom(...models), fc.double({ min: -2, max: 10, noNaN: true }), (m, sl) => {
        const f = m.forceAt(sl);
        return f >= 0 && f <= 1;
      }),
    );
  });

  it('moves the optimum with activation: L0(0.25) = 2.726 × 1.1125 = 3.033 µm (Lloyd & Besier 2003, J Biomech 36:765–776 — from memory)', () => {
    const m = makeMuscleModel({ activationShift: LLOYD_BESIER_SHIFT });
    expect(LLOYD_BESIER_SHIFT).toBe(0.15);
    expect(m.optimalUmAt(0.25)).toBeCloseTo(3.033, 3);
    expect(m.optimalUmAt(1)).toBe(m.optimalUm);
    // Full force at the moved optimum, and the whole curve stretched with it: the human no-overlap length 4.241 µm moves to 4.718 µm.
    expect(m.forceAtActivation(3.033, 0.25)).toBe(1);
    expect(m.forceAtActivation(4.241 * 1.1125 - 0.01, 0.25)).toBeGreaterThan(0);
    expect(m.forceAtActivation(4.241 * 1.1125 + 0.01, 0.25)).toBe(0);
    // Regions stay with the geometry; full activation and a NaN activation leave the force as it was.
    expect(m.regionAt(3.033)).toBe('descending');
    for (const sl of [1.5, 2.2, 2.7, 3.3]) {
      expect(m.forceAtActivation(sl, 1)).toBe(m.forceAt(sl));
      expect(m.forceAtActivation(sl, Number.NaN)).toBe(m.forceAt(sl));
    }
    // Off by default: activation changes nothing.
    expect(makeMuscleModel().forceAtActivation(3.033, 0.25)).toBe(makeMuscleModel().forceAt(3.033));
  });

  it('gives NaN force for a NaN length', () => {
    for (const shape of CURVE_SHAPES) {
      expect(makeMuscleModel({ shape }).forceAt(Number.NaN)).toBeNaN();
      expect(makeMuscleModel({ shape, dispersionSdUm: 0.1 }).forceAt(Number.NaN)).toBeNaN();
    }
  });

  it('refuses bad options with a RangeError naming each problem and what is accepted', () => {
    expect(() => makeMuscleModel({ species: 'cat' as Species })).toThrow(/unknown species "cat"; accepted: human, frog/);
    expect(() => makeMuscleModel({ shape: 'spline' as CurveShape })).toThrow(/unknown curve shape "spline"/);
    expect(() => makeMuscleModel({ dispersionSdUm: -0.1 })).toThrow(/between-fibre SD is -0.1 µm; accepted: 0 \(off\) to 1 µm/);
    expect(() => makeMuscleModel({ filaments: { thickUm: 5 } })).toThrow(RangeError);
  });

  it('lists no problem for good options', () => {
    expect(muscleModelProblems({ species: 'frog', shape: 'three-gaussian', dispersionSdUm: 0.2 })).toEqual([]);
  });

  it('knows its shapes', () => {
    expect(CURVE_SHAPES).toEqual(['geometric', 'gaussian', 'three-gaussian']);
    expect(isCurveShape('gaussian')).toBe(true);
    expect(isCurveShape('Gaussian')).toBe(false);
  });
});
