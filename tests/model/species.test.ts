import { describe, expect, it } from 'vitest';
import { breakpoints, curveFromGeometry, geometricForce, plateauMiddleUm, shallowLimbWidthUm, steepBreakForceFromDoubleOverlap } from '../../src/model/geometry.ts';
import {
  DEFAULT_SPECIES,
  FROG_STEEP_BREAK_FORCE,
  HUMAN_STEEP_BREAK_FORCE,
  HUMAN_THIN_PERIODS,
  HUMAN_THIN_PERIOD_NM,
  SPECIES,
  SPECIES_GEOMETRY,
  isSpecies,
  speciesCurve,
} from '../../src/model/species.ts';

describe('frog preset against Gordon, Huxley & Julian 1966 (J Physiol 184:170–192)', () => {
  const c = speciesCurve('frog');

  it('has its plateau between 2.05 and 2.2 µm (abstract, point 2a)', () => {
    expect(c.plateauStartUm).toBeCloseTo(2.05, 3);
    expect(c.plateauEndUm).toBeCloseTo(2.2, 3);
    expect(geometricForce(c, 2.1)).toBe(1);
  });

  it('breaks from the shallow to the steep limb at about 1.67 µm (abstract, point 2c; geometry gives thick + Z-disc = 1.65)', () => {
    expect(Math.abs(c.steepBreakUm - 1.67)).toBeLessThanOrEqual(0.025);
  });

  it('reaches zero force at 3.65 µm, thick 1.6 + thin span 2.05 (text and Fig. 12 — from memory)', () => {
    expect(c.descendingZeroUm).toBeCloseTo(3.65, 3);
    expect(geometricForce(c, 3.65)).toBe(0);
  });

  it('has its steep limb extrapolate to zero at 1.27 µm (Fig. 12 — from memory)', () => {
    expect(c.steepZeroUm).toBeCloseTo(1.27, 3);
  });

  it('falls linearly on the descending limb: about 45% at 3.0 µm (Fig. 12 — from memory) and half-way at 2.925 µm', () => {
    expect(geometricForce(c, 3.0)).toBeCloseTo(0.45, 1);
    expect(geometricForce(c, (2.2 + 3.65) / 2)).toBeCloseTo(0.5, 6);
  });

  it('follows digitisations of Fig. 12 on the shallow limb: about 0.78 at 1.65 µm and 0.85 at 1.70 µm (from memory), to 0.03', () => {
    expect(FROG_STEEP_BREAK_FORCE).toBe(0.8);
    expect(Math.abs(geometricForce(c, 1.65) - 0.78)).toBeLessThanOrEqual(0.03);
    expect(Math.abs(geometricForce(c, 1.7) - 0.85)).toBeLessThanOrEqual(0.03);
  });

  it('has a shallow limb 0.40 µm wide, 2 × thin − thick, over which the thin filaments come to overlap each other', () => {
    expect(shallowLimbWidthUm(SPECIES_GEOMETRY.frog)).toBeCloseTo(0.4, 12);
    expect(c.plateauStartUm - c.steepBreakUm).toBeCloseTo(0.4, 9);
  });
});

describe('human preset against Walker & Schrodt 1974 (Anat Rec 178:63–81) and Rassier, MacIntosh & Herzog 1999 (J Appl Physiol 86:1445–1457)', () => {
  const c = speciesCurve('human');

  it('spans its thin filaments 66 × 38.5 nm + 0.1 µm ≈ 2.64 µm (Walker & Schrodt 1974)', () => {
    const g = SPECIES_GEOMETRY.human;
    expect(2 * HUMAN_THIN_PERIODS).toBe(66);
    expect(HUMAN_THIN_PERIOD_NM).toBe(38.5);
    expect(2 * g.thinUm + g.zDiscUm).toBeCloseTo((66 * 38.5) / 1000 + 0.1, 9);
    expect(2 * g.thinUm + g.zDiscUm).toBeCloseTo(2.64, 2);
  });

  it('has its plateau at 2.64–2.81 µm: the standard model’s optimum of Gollapudi & Lin 2009 (J Biomech 42:2011–2016, abstract)', () => {
    expect(c.plateauStartUm).toBeCloseTo(2.64, 2);
    expect(c.plateauEndUm).toBeCloseTo(2.81, 2);
    // Inside their measured tolerance interval for the optimal length of type-I human fibres, 2.37–2.95 µm.
    expect(c.plateauStartUm).toBeGreaterThan(2.37);
    expect(c.plateauEndUm).toBeLessThan(2.95);
  });

  it('reaches zero force at 4.24 µm (Rassier et al. 1999, Fig. 3 — key points as transcribed, paper not at hand)', () => {
    expect(c.descendingZeroUm).toBeCloseTo(4.24, 2);
  });

  it('falls more steeply on both limbs than human fibres measured by Gollapudi & Lin 2009 (0.42 and −0.52 F0/µm), as they found of the standard model', () => {
    const shallowSlope = (1 - c.steepBreakForce) / (c.plateauStartUm - c.steepBreakUm);
    const descendingSlope = -1 / (c.descendingZeroUm - c.plateauEndUm);
    expect(shallowSlope).toBeGreaterThan(0.42);
    expect(descendingSlope).toBeLessThan(-0.52);
    // The standard model's descending slope, −1/(4.24 − 2.81) ≈ −0.70 F0/µm.
    expect(descendingSlope).toBeCloseTo(-0.7, 2);
  });

  it('derives its force at the steep/shallow break from the frog’s, assuming each µm of thin-filament double overlap costs the same share of force', () => {
    // Human shallow limb: 2 × 1.2705 − 1.6 = 0.941 µm wide, against the frog's 0.40 µm at 0.2 of peak force lost.
    expect(shallowLimbWidthUm(SPECIES_GEOMETRY.human)).toBeCloseTo(0.941, 9);
    expect(HUMAN_STEEP_BREAK_FORCE).toBeCloseTo(1 - (0.2 * 0.941) / 0.4, 9);
    expect(HUMAN_STEEP_BREAK_FORCE).toBeCloseTo(0.53, 2);
    expect(geometricForce(c, c.steepBreakUm)).toBeCloseTo(HUMAN_STEEP_BREAK_FORCE, 12);
    // The same slope as the frog's shallow limb: 0.5 of peak force per µm.
    expect((1 - HUMAN_STEEP_BREAK_FORCE) / shallowLimbWidthUm(SPECIES_GEOMETRY.human)).toBeCloseTo(0.5, 9);
    expect(steepBreakForceFromDoubleOverlap(SPECIES_GEOMETRY.frog, SPECIES_GEOMETRY.frog)).toBeCloseTo(0.8, 12);
  });

  it('breaks to the steep limb at 1.7 µm and extrapolates to zero at 1.27 µm (Rassier et al. 1999, Fig. 3 — as transcribed)', () => {
    expect(c.steepBreakUm).toBeCloseTo(1.7, 6);
    expect(c.steepZeroUm).toBeCloseTo(1.27, 6);
  });

  it('falls linearly on the descending limb from 2.81 to 4.24 µm: half force at about 3.525 µm', () => {
    expect(geometricForce(c, (c.plateauEndUm + c.descendingZeroUm) / 2)).toBeCloseTo(0.5, 9);
    expect(geometricForce(c, 3.525)).toBeCloseTo(0.5, 2);
  });

  it('peaks at the plateau middle, about 2.73 µm', () => {
    expect(plateauMiddleUm(c)).toBeCloseTo(2.726, 3);
  });
});

describe('species list', () => {
  it('defaults to human', () => {
    expect(DEFAULT_SPECIES).toBe('human');
  });

  it('recognises every preset and nothing else', () => {
    for (const s of SPECIES) expect(isSpecies(s)).toBe(true);
    expect(isSpecies('cat')).toBe(false);
    expect(isSpecies('')).toBe(false);
  });

  it('gives each preset five ascending breakpoints', () => {
    for (const s of SPECIES) {
      const xs = breakpoints(curveFromGeometry(SPECIES_GEOMETRY[s])).map((b) => b.slUm);
      expect(xs).toEqual([...xs].sort((a, b) => a - b));
      expect(new Set(xs).size).toBe(5);
    }
  });
});
