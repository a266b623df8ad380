import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  breakpoints,
  curveFromGeometry,
  geometricForce,
  geometryProblems,
  regionAt,
  regionLowerBoundsUm,
  withFilaments,
  type FilamentGeometry,
} from '../../src/model/geometry.ts';
import { SPECIES, SPECIES_GEOMETRY, speciesCurve } from '../../src/model/species.ts';
import { REGION_KEYS } from '../../src/model/regions.ts';

/** Valid geometries: thick shorter than two thin filaments, steep zero below thick + Z-disc. */
const geometryArb: fc.Arbitrary<FilamentGeometry> = fc
  .record({
    thickUm: fc.double({ min: 1.2, max: 1.8, noNaN: true }),
    thinUm: fc.double({ min: 0.95, max: 1.5, noNaN: true }),
    bareZoneUm: fc.double({ min: 0.05, max: 0.3, noNaN: true }),
    zDiscUm: fc.double({ min: 0.03, max: 0.15, noNaN: true }),
    steepBreakForce: fc.double({ min: 0.5, max: 0.95, noNaN: true }),
    steepZeroOffset: fc.double({ min: 0.1, max: 0.5, noNaN: true }),
  })
  .map(({ steepZeroOffset, ...g }) => ({ ...g, steepZeroUm: g.thickUm + g.zDiscUm - steepZeroOffset }));

describe('curveFromGeometry', () => {
  it('computes every breakpoint from filament lengths', () => {
    const c = curveFromGeometry({ thickUm: 1.6, thinUm: 1.2, bareZoneUm: 0.2, zDiscUm: 0.1, steepZeroUm: 1.3, steepBreakForce: 0.8 });
    expect(c.steepBreakUm).toBeCloseTo(1.7, 9);
    expect(c.plateauStartUm).toBeCloseTo(2.5, 9);
    expect(c.plateauEndUm).toBeCloseTo(2.7, 9);
    expect(c.descendingZeroUm).toBeCloseTo(4.1, 9);
  });

  it('moves the breakpoints when a muscle gives its own thin-filament length', () => {
    const longer = curveFromGeometry(withFilaments(SPECIES_GEOMETRY.human, { thinUm: 1.3 }));
    const preset = speciesCurve('human');
    expect(longer.plateauStartUm - preset.plateauStartUm).toBeCloseTo(2 * (1.3 - preset.geometry.thinUm), 9);
    expect(longer.steepBreakUm).toBe(preset.steepBreakUm);
  });

  it('passes through the breakpoints with their forces', () => {
    for (const s of SPECIES) {
      const c = speciesCurve(s);
      for (const b of breakpoints(c)) expect(geometricForce(c, b.slUm)).toBeCloseTo(b.force, 9);
    }
  });
});

describe('geometricForce', () => {
  it('stays within 0–1 for any length and any valid geometry', () => {
    fc.assert(
      fc.property(geometryArb, fc.double({ min: -1, max: 8, noNaN: true }), (g, sl) => {
        const f = geometricForce(curveFromGeometry(g), sl);
        return f >= 0 && f <= 1;
      }),
    );
  });

  it('never falls with lengthening on the ascending limbs, never rises on the descending limb', () => {
    fc.assert(
      fc.property(geometryArb, fc.double({ min: 0, max: 1, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true }), (g, u, v) => {
        const c = curveFromGeometry(g);
        const [a, b] = u < v ? [u, v] : [v, u];
        const up = (t: number): number => c.steepZeroUm - 0.2 + t * (c.plateauEndUm - c.steepZeroUm + 0.2);
        const down = (t: number): number => c.plateauStartUm + t * (c.descendingZeroUm + 0.3 - c.plateauStartUm);
        return geometricForce(c, up(a)) <= geometricForce(c, up(b)) + 1e-12 && geometricForce(c, down(a)) >= geometricForce(c, down(b)) - 1e-12;
      }),
    );
  });

  it('gives NaN for NaN and zero far outside the overlap range', () => {
    const c = speciesCurve('human');
    expect(geometricForce(c, Number.NaN)).toBeNaN();
    expect(geometricForce(c, 0)).toBe(0);
    expect(geometricForce(c, -1)).toBe(0);
    expect(geometricForce(c, 10)).toBe(0);
    expect(geometricForce(c, Number.POSITIVE_INFINITY)).toBe(0);
  });
});

describe('regionAt', () => {
  const c = speciesCurve('human');

  it('names each region between the breakpoints', () => {
    expect(regionAt(c, 1.0)).toBe('too_short');
    expect(regionAt(c, 1.5)).toBe('steep_ascending');
    expect(regionAt(c, 2.2)).toBe('shallow_ascending');
    expect(regionAt(c, 2.7)).toBe('plateau');
    expect(regionAt(c, 3.5)).toBe('descending');
    expect(regionAt(c, 4.5)).toBe('no_overlap');
  });

  it('agrees with the lower bounds, which partition every positive length in REGION_KEYS order', () => {
    const lower = regionLowerBoundsUm(c);
    fc.assert(
      fc.property(fc.double({ min: 0.01, max: 6, noNaN: true }), (sl) => {
        let i = 0;
        while (i + 1 < lower.length && sl >= (lower[i + 1] as number)) i++;
        const r = regionAt(c, sl);
        // Boundaries themselves belong to the plateau (closed) and to too_short (≤ zero): skip exact hits.
        if (lower.includes(sl)) return true;
        return r === REGION_KEYS[i];
      }),
    );
  });
});

describe('geometryProblems', () => {
  it('accepts both presets', () => {
    for (const s of SPECIES) expect(geometryProblems(SPECIES_GEOMETRY[s])).toEqual([]);
  });

  it('names an out-of-range filament length and the accepted range', () => {
    const problems = geometryProblems(withFilaments(SPECIES_GEOMETRY.human, { thickUm: -1 }));
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatch(/thick filament length is -1; accepted: a number from 0.5 to 3 µm/);
  });

  it('rejects NaN lengths', () => {
    expect(geometryProblems(withFilaments(SPECIES_GEOMETRY.frog, { thinUm: Number.NaN }))[0]).toMatch(/thin filament length is NaN/);
  });

  it('rejects thick filaments too long for a shallow limb, saying what to check', () => {
    const problems = geometryProblems(withFilaments(SPECIES_GEOMETRY.frog, { thickUm: 2.1 }));
    expect(problems.join(' ')).toMatch(/must be shorter than 2 × thin \+ Z-disc.*check thick_um and thin_um/);
  });

  it('rejects a steep-limb zero above the steep break', () => {
    const problems = geometryProblems(withFilaments(SPECIES_GEOMETRY.human, { steepZeroUm: 1.8 }));
    expect(problems.join(' ')).toMatch(/steep limb's zero .* must lie below thick \+ Z-disc/);
  });
});
