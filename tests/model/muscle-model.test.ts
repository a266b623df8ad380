import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { CURVE_SHAPES, isCurveShape, makeMuscleModel, muscleModelProblems, type CurveShape } from '../../src/model/muscle-model.ts';
import { geometricForce, regionAt } from '../../src/model/geometry.ts';
import { gaussianForceNorm, threeGaussianForceNorm } from '../../src/model/smooth-curves.ts';
import { REGION_KEYS } from '../../src/model/regions.ts';
import { SPECIES, speciesCurve, type Species } from '../../src/model/species.ts';

describe('makeMuscleModel', () => {
  it('defaults to the human geometric curve with no dispersion', () => {
    const m = makeMuscleModel();
    expect(m.species).toBe('human');
    expect(m.shape).toBe('geometric');
    expect(m.dispersionSdUm).toBe(0);
    expect(m.curve).toEqual(speciesCurve('human'));
    for (const sl of [1, 1.5, 2.2, 2.7, 3.3, 4.5]) expect(m.forceAt(sl)).toBe(geometricForce(m.curve, sl));
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
    expect(g.forceAt(0.5 * g.optimalUm)).toBeCloseTo(gaussianForceNorm(0.5), 12);
    expect(t.forceAt(0.5 * t.optimalUm)).toBeCloseTo(threeGaussianForceNorm(0.5), 12);
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
