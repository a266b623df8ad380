/** Filament-geometry presets. Thin-filament length differs between muscles: presets are defaults, not constants. */
import { curveFromGeometry, type FilamentGeometry, type ForceLengthCurve } from './geometry.ts';

export const SPECIES = ['human', 'frog'] as const;
export type Species = (typeof SPECIES)[number];
export const DEFAULT_SPECIES: Species = 'human';

/**
 * Frog: thick 1.6 µm, thin filaments 2.05 µm across the Z-disc, plateau 2.05–2.25 µm, zero at 3.65 µm,
 * steep limb to zero at 1.27 µm (Gordon, Huxley & Julian 1966, J Physiol 184:170–192).
 */
const FROG: FilamentGeometry = {
  thickUm: 1.6,
  thinUm: 1.0,
  bareZoneUm: 0.2,
  zDiscUm: 0.05,
  steepZeroUm: 1.27,
  // Read off the shallow/steep break of the published curve (Gordon, Huxley & Julian 1966, Fig. 12); from memory.
  steepBreakForce: 0.84,
};

/**
 * Human: thin filaments 33 × 38.5 nm ≈ 1.27 µm each, Z-disc 0.1 µm, so plateau start 2.64 µm
 * (Walker & Schrodt 1974, Anat Rec 178:63–81); plateau 2.64–2.81 µm and zero at 4.24 µm as used by
 * Rassier, MacIntosh & Herzog 1999 (J Appl Physiol 86:1445–1457).
 */
const HUMAN: FilamentGeometry = {
  thickUm: 1.6,
  thinUm: 1.27,
  bareZoneUm: 0.17,
  zDiscUm: 0.1,
  // No separate human measurement: the frog's compression span below the break is assumed (from memory).
  steepZeroUm: 1.27 + 0.05,
  steepBreakForce: 0.84,
};

export const SPECIES_GEOMETRY: Readonly<Record<Species, FilamentGeometry>> = { frog: FROG, human: HUMAN };

export function speciesCurve(species: Species): ForceLengthCurve {
  return curveFromGeometry(SPECIES_GEOMETRY[species]);
}
