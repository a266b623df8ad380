import { describe, expect, it } from 'vitest';
import { geometricForce } from '../../src/model/geometry.ts';
import { isPlausibleSarcomereUm, PLAUSIBLE_SARCOMERE_UM } from '../../src/model/plausible-sarcomere.ts';
import { SPECIES, speciesCurve } from '../../src/model/species.ts';

describe('PLAUSIBLE_SARCOMERE_UM', () => {
  it('holds the published force-producing spans: human 1.27–4.24 µm, frog 1.27–3.65 µm', () => {
    // Rassier, MacIntosh & Herzog 1999, J Appl Physiol 86:1445–1457 (human); Gordon, Huxley & Julian 1966,
    // J Physiol 184:170–192 (frog).
    for (const um of [1.27, 4.24, 3.65]) expect(isPlausibleSarcomereUm(um)).toBe(true);
  });

  it('holds every length at which a species curve gives force', () => {
    for (const species of SPECIES) {
      const curve = speciesCurve(species);
      for (let um = 0.5; um <= 6; um += 0.01) {
        if (geometricForce(curve, um) > 0) expect(isPlausibleSarcomereUm(um), `${species} at ${um.toFixed(2)} µm`).toBe(true);
      }
    }
  });

  it('takes its ends, and refuses what lies beyond them, NaN and infinities', () => {
    expect([PLAUSIBLE_SARCOMERE_UM.min, PLAUSIBLE_SARCOMERE_UM.max].map((um) => isPlausibleSarcomereUm(um))).toEqual([true, true]);
    for (const um of [0.99, 5.01, Number.NaN, Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY]) expect(isPlausibleSarcomereUm(um)).toBe(false);
  });
});
