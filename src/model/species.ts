/**
 * Filament-geometry presets. Thin-filament length differs between muscles (and between fibres of one
 * muscle), so these presets are defaults, not constants: a calibration may give a muscle its own
 * filament lengths (`"filaments"`).
 */
import { curveFromGeometry, type FilamentGeometry, type ForceLengthCurve } from './geometry.ts';

export const SPECIES = ['human', 'frog'] as const;
export type Species = (typeof SPECIES)[number];
export const DEFAULT_SPECIES: Species = 'human';

export function isSpecies(value: string): value is Species {
  return (SPECIES as readonly string[]).includes(value);
}

/**
 * Relative force where the shallow ascending limb meets the steep one: read off the frog curve of
 * Gordon, Huxley & Julian 1966 (J Physiol 184:170–192), Fig. 12, at about 1.67 µm — from memory (the
 * figure was not at hand; about four fifths of the plateau force). No separate human value is
 * published that we know of; the human preset takes the frog's fraction.
 */
export const STEEP_BREAK_FORCE = 0.8;

/**
 * Frog (semitendinosus fibres), Gordon, Huxley & Julian 1966, J Physiol 184:170–192: thick filaments
 * 1.6 µm, thin filaments 2.05 µm across the Z-disc (so 1.0 µm each with a 0.05 µm Z-disc), bare zone
 * 0.15 µm. This gives the paper's plateau of 2.05–2.2 µm (abstract: "a plateau between sarcomere lengths
 * of 2.05 and 2.2 µm"), zero force at 1.6 + 2.05 = 3.65 µm, and thick filaments at the Z-discs at
 * 1.65 µm (the paper's break "at about 1.67 µm"). The steep limb extrapolates to zero at 1.27 µm.
 */
const FROG: FilamentGeometry = {
  thickUm: 1.6,
  thinUm: 1.0,
  bareZoneUm: 0.15,
  zDiscUm: 0.05,
  steepZeroUm: 1.27,
  steepBreakForce: STEEP_BREAK_FORCE,
};

/** Thin-filament period of human muscle (nm): the 38.5 nm repeat (Walker & Schrodt 1974, Anat Rec 178:63–81). */
export const HUMAN_THIN_PERIOD_NM = 38.5;
/** Periods along one human thin filament: 33, i.e. 66 across the two filaments of one I-segment. */
export const HUMAN_THIN_PERIODS = 33;

/**
 * Human: each thin filament 33 × 38.5 nm ≈ 1.27 µm, Z-disc 0.1 µm, so the thin-filament span is
 * 66 × 38.5 nm + 0.1 µm ≈ 2.64 µm, the plateau start (Walker & Schrodt 1974, Anat Rec 178:63–81).
 * Thick filaments 1.6 µm and bare zone 0.17 µm give plateau 2.64–2.81 µm and zero force at 4.24 µm,
 * the human curve of Rassier, MacIntosh & Herzog 1999 (J Appl Physiol 86:1445–1457, Fig. 3), whose
 * steep limb breaks at 1.7 µm (= 1.6 + 0.1) and extrapolates to zero at 1.27 µm.
 */
const HUMAN: FilamentGeometry = {
  thickUm: 1.6,
  thinUm: (HUMAN_THIN_PERIODS * HUMAN_THIN_PERIOD_NM) / 1000,
  bareZoneUm: 0.17,
  zDiscUm: 0.1,
  steepZeroUm: 1.27,
  steepBreakForce: STEEP_BREAK_FORCE,
};

export const SPECIES_GEOMETRY: Readonly<Record<Species, FilamentGeometry>> = { frog: FROG, human: HUMAN };

export function speciesCurve(species: Species): ForceLengthCurve {
  return curveFromGeometry(SPECIES_GEOMETRY[species]);
}
