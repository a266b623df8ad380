/**
 * Filament-geometry presets. Thin-filament length differs between muscles (and between fibres of one
 * muscle), so these presets are defaults, not constants: a calibration may give a muscle its own
 * filament lengths (`"filaments"`).
 */
import { curveFromGeometry, steepBreakForceFromDoubleOverlap, type FilamentGeometry, type ForceLengthCurve } from './geometry.ts';

export const SPECIES = ['human', 'frog'] as const;
export type Species = (typeof SPECIES)[number];
export const DEFAULT_SPECIES: Species = 'human';

export function isSpecies(value: string): value is Species {
  return (SPECIES as readonly string[]).includes(value);
}

/**
 * Relative force where the frog's shallow ascending limb meets the steep one, at about 1.67 µm: 0.8, read
 * off Gordon, Huxley & Julian 1966 (J Physiol 184:170–192), Fig. 12 — from memory, the figure not at hand
 * (digitisations of it give about 0.78 at 1.65 µm and 0.85 at 1.70 µm, also from memory).
 */
export const FROG_STEEP_BREAK_FORCE = 0.8;

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
  steepBreakForce: FROG_STEEP_BREAK_FORCE,
};

/** Thin-filament period of human muscle (nm): the 38.5 nm repeat (Walker & Schrodt 1974, Anat Rec 178:63–81). */
export const HUMAN_THIN_PERIOD_NM = 38.5;
/** Periods along one human thin filament: 33, i.e. 66 across the two filaments of one I-segment. */
export const HUMAN_THIN_PERIODS = 33;

/**
 * Human: each thin filament 33 × 38.5 nm ≈ 1.27 µm, Z-disc 0.1 µm, so the thin-filament span is
 * 66 × 38.5 nm + 0.1 µm ≈ 2.64 µm, the plateau start (Walker & Schrodt 1974, Anat Rec 178:63–81).
 * Thick filaments 1.6 µm and bare zone 0.17 µm give plateau 2.64–2.81 µm, the standard model's optimum
 * that Gollapudi & Lin 2009 (J Biomech 42:2011–2016, abstract) compare human fibres with, and zero force
 * at 4.24 µm; the steep limb breaks at 1.7 µm (= 1.6 + 0.1) and extrapolates to zero at 1.27 µm (the human
 * curve of Rassier, MacIntosh & Herzog 1999, J Appl Physiol 86:1445–1457, Fig. 3 — as transcribed, the
 * paper not at hand).
 */
const HUMAN_FILAMENTS = {
  thickUm: 1.6,
  thinUm: (HUMAN_THIN_PERIODS * HUMAN_THIN_PERIOD_NM) / 1000,
  bareZoneUm: 0.17,
  zDiscUm: 0.1,
  steepZeroUm: 1.27,
} as const;

/**
 * The human force at the steep/shallow break: no measured value is at hand, so it is derived from the
 * frog's (steepBreakForceFromDoubleOverlap): the human shallow limb is 0.94 µm wide where the frog's is
 * 0.40, and at the frog's 0.5 of peak force per µm of double overlap it ends at 1 − 0.2 × 0.941/0.40 ≈ 0.53.
 * Borrowing the frog's 0.8 as it is would have no source. A setting: `steep_break_force` in a muscle's
 * filaments.
 */
export const HUMAN_STEEP_BREAK_FORCE = steepBreakForceFromDoubleOverlap({ ...HUMAN_FILAMENTS, steepBreakForce: Number.NaN }, FROG);

const HUMAN: FilamentGeometry = { ...HUMAN_FILAMENTS, steepBreakForce: HUMAN_STEEP_BREAK_FORCE };

export const SPECIES_GEOMETRY: Readonly<Record<Species, FilamentGeometry>> = { frog: FROG, human: HUMAN };

export function speciesCurve(species: Species): ForceLengthCurve {
  return curveFromGeometry(SPECIES_GEOMETRY[species]);
}
