/**
 * The one entry point the pipeline calls per sample: a muscle's curve, built once from its species,
 * filament lengths, curve shape and sarcomere dispersion, then evaluated with no allocation per call.
 */
import {
  curveFromGeometry,
  geometryProblems,
  plateauMiddleUm,
  geometricForce,
  regionAt as geometricRegionAt,
  withFilaments,
  type FilamentGeometry,
  type ForceLengthCurve,
} from './geometry.ts';
import { DEFAULT_SPECIES, SPECIES_GEOMETRY, isSpecies, SPECIES, type Species } from './species.ts';
import { gaussianForceNorm, threeGaussianForceNorm } from './smooth-curves.ts';
import { convolvedTable, lookup, type LookupTable } from './dispersion.ts';
import { regionIndex, type RegionKey } from './regions.ts';

/** Which curve gives the force. Regions always come from the geometry. */
export const CURVE_SHAPES = ['geometric', 'gaussian', 'three-gaussian'] as const;
export type CurveShape = (typeof CURVE_SHAPES)[number];
export const DEFAULT_SHAPE: CurveShape = 'geometric';

export function isCurveShape(value: string): value is CurveShape {
  return (CURVE_SHAPES as readonly string[]).includes(value);
}

/** Largest sarcomere-length SD accepted for dispersion (µm); beyond it the curve is no longer meaningful. */
export const MAX_DISPERSION_SD_UM = 1;

/**
 * λ of the activation-dependent optimal length of Lloyd & Besier 2003 (J Biomech 36:765–776 — from memory,
 * the paper not at hand): L0(a) = L0·(λ(1 − a) + 1), λ = 0.15, so at activation 0.25 the human L0 of
 * 2.726 µm moves to 3.033 µm. It models the shift of the optimal length to longer lengths at low
 * activation that Rack & Westbury 1969 (J Physiol 204:443–460, abstract point 5) found in cat soleus: at
 * low stimulation rates near-maximal tension needed long muscle lengths.
 */
export const LLOYD_BESIER_SHIFT = 0.15;

/**
 * Said wherever a whole-muscle shape's force appears beside the geometry's region: the Gaussian shapes give
 * some force at every length, including where the filaments no longer overlap (region no_overlap) or are
 * pressed together (too_short). Null for the geometric curve.
 */
export function wholeMuscleShapeNote(shape: CurveShape): string | null {
  if (shape === 'geometric') return null;
  return (
    `force from the ${shape} shape, a whole-muscle curve: it gives force where the filament geometry gives none ` +
    '(too_short, no_overlap), so a force above 0 in those regions is no contradiction; regions always come from the geometry'
  );
}

/** Said wherever the activation-dependent optimal length is on: what moves and what does not. */
export function activationShiftNote(shift: number, constantActivation: number | undefined): string {
  const where = constantActivation !== undefined ? `activation ${constantActivation} where samples carry none` : 'activation 1 where samples carry none';
  return (
    `optimal length shifts with activation (L0(a) = L0·(${shift}(1 − a) + 1), Lloyd & Besier 2003; ${where}): ` +
    'force and the optimum move, regions stay with the geometry'
  );
}

/** L0(a)/L0 = λ(1 − a) + 1 for activation a in 0–1 (Lloyd & Besier 2003); 1 when λ is 0. */
export function optimalLengthFactor(activation: number, shift: number): number {
  return shift * (1 - activation) + 1;
}

export interface MuscleModelOptions {
  /** @default 'human' */
  readonly species?: Species;
  /** The muscle's own filament lengths, replacing the species preset's one by one. */
  readonly filaments?: Partial<FilamentGeometry>;
  /** @default 'geometric' */
  readonly shape?: CurveShape;
  /**
   * SD (µm) of sarcomere lengths between the muscle's fibres, around the estimate; 0 is off. @default 0
   * Fibres in parallel each add their force, so the muscle's force is the mean over that spread. (Sarcomeres
   * in series within one fibre all carry the same force: their spread is not averaged this way.)
   */
  readonly dispersionSdUm?: number;
  /** λ of the activation-dependent optimal length; 0 is off. @default 0 */
  readonly activationShift?: number;
}

export interface MuscleModel {
  readonly species: Species;
  readonly geometry: FilamentGeometry;
  /** The geometric curve: breakpoints and regions. */
  readonly curve: ForceLengthCurve;
  readonly shape: CurveShape;
  readonly dispersionSdUm: number;
  /** L0: the plateau middle (µm), the length of peak force and the unit of the normalized curves. */
  readonly optimalUm: number;
  /** λ of the activation-dependent optimal length; 0 when off. */
  readonly activationShift: number;
  /** Relative active force, 0–1, at a sarcomere length (µm); NaN gives NaN. */
  forceAt(sarcomereUm: number): number;
  /**
   * The force at an activation (0–1): the whole curve stretched by L0(a)/L0, so the force at SL is the
   * full-activation force at SL·L0/L0(a). The same as forceAt when the shift is off or the activation NaN.
   */
  forceAtActivation(sarcomereUm: number, activation: number): number;
  /** L0(a) (µm): where the optimum lies at that activation. */
  optimalUmAt(activation: number): number;
  /** Region of the geometric curve (pass finite lengths). */
  regionAt(sarcomereUm: number): RegionKey;
  /** Index of that region in REGION_KEYS, for flat accumulators. */
  regionIndexAt(sarcomereUm: number): number;
}

/** Why the options cannot make a model; empty when they can. Messages say what is accepted. */
export function muscleModelProblems(options: MuscleModelOptions): string[] {
  const problems: string[] = [];
  const species = options.species ?? DEFAULT_SPECIES;
  if (!isSpecies(species)) {
    problems.push(`unknown species "${String(species)}"; accepted: ${SPECIES.join(', ')}`);
    return problems;
  }
  const shape = options.shape ?? DEFAULT_SHAPE;
  if (!isCurveShape(shape)) problems.push(`unknown curve shape "${String(shape)}"; accepted: ${CURVE_SHAPES.join(', ')}`);
  const sd = options.dispersionSdUm ?? 0;
  if (!(Number.isFinite(sd) && sd >= 0 && sd <= MAX_DISPERSION_SD_UM)) {
    problems.push(`between-fibre SD is ${String(sd)} µm; accepted: 0 (off) to ${MAX_DISPERSION_SD_UM} µm (about 0.2 between the fibres of a human vastus lateralis)`);
  }
  const shift = options.activationShift ?? 0;
  if (!(Number.isFinite(shift) && shift >= 0 && shift <= 1)) {
    problems.push(`activation shift is ${String(shift)}; accepted: 0 (off) to 1 (${LLOYD_BESIER_SHIFT} in Lloyd & Besier 2003)`);
  }
  problems.push(...geometryProblems(withFilaments(SPECIES_GEOMETRY[species], options.filaments)));
  return problems;
}

/** The force of a shape before dispersion, as a closure over the curve (used only while building). */
function baseForce(shape: CurveShape, curve: ForceLengthCurve, optimalUm: number): (slUm: number) => number {
  switch (shape) {
    case 'geometric':
      return (slUm) => geometricForce(curve, slUm);
    case 'gaussian':
      return (slUm) => gaussianForceNorm(slUm / optimalUm);
    case 'three-gaussian':
      return (slUm) => threeGaussianForceNorm(slUm / optimalUm);
  }
}

/** Where a shape's force is worth tabulating (µm); outside, the undispersed force is used. */
function tableSpanUm(shape: CurveShape, curve: ForceLengthCurve, optimalUm: number, sdUm: number): [number, number] {
  const margin = 7 * sdUm;
  if (shape === 'geometric') return [curve.steepZeroUm - margin, curve.descendingZeroUm + margin];
  return [Math.max(0, 0.2 * optimalUm - margin), 2.2 * optimalUm + margin];
}

/**
 * Builds a muscle's model. Throws a RangeError naming every problem when the options are invalid (the
 * edges validate first with muscleModelProblems, so this is a programming error inside).
 */
export function makeMuscleModel(options: MuscleModelOptions = {}): MuscleModel {
  const problems = muscleModelProblems(options);
  if (problems.length > 0) throw new RangeError(`cannot build the muscle model: ${problems.join('; ')}`);
  const species = options.species ?? DEFAULT_SPECIES;
  const shape = options.shape ?? DEFAULT_SHAPE;
  const dispersionSdUm = options.dispersionSdUm ?? 0;
  const activationShift = options.activationShift ?? 0;
  const geometry = withFilaments(SPECIES_GEOMETRY[species], options.filaments);
  const curve = curveFromGeometry(geometry);
  const optimalUm = plateauMiddleUm(curve);
  const base = baseForce(shape, curve, optimalUm);

  let forceAt: (slUm: number) => number;
  if (dispersionSdUm > 0) {
    const [lo, hi] = tableSpanUm(shape, curve, optimalUm, dispersionSdUm);
    const table: LookupTable = convolvedTable(base, lo, hi, dispersionSdUm);
    forceAt = (slUm) => {
      const v = lookup(table, slUm);
      if (Number.isNaN(v)) return base(slUm);
      return v < 0 ? 0 : v > 1 ? 1 : v;
    };
  } else if (shape === 'geometric') {
    forceAt = (slUm) => geometricForce(curve, slUm);
  } else {
    forceAt = base;
  }

  const forceAtFull = forceAt;
  const forceAtActivation =
    activationShift > 0
      ? (slUm: number, activation: number): number =>
          Number.isNaN(activation) ? forceAtFull(slUm) : forceAtFull(slUm / optimalLengthFactor(activation, activationShift))
      : (slUm: number): number => forceAtFull(slUm);

  return {
    species,
    geometry,
    curve,
    shape,
    dispersionSdUm,
    optimalUm,
    activationShift,
    forceAt,
    forceAtActivation,
    optimalUmAt: (activation) => (Number.isNaN(activation) ? optimalUm : optimalUm * optimalLengthFactor(activation, activationShift)),
    regionAt: (slUm) => geometricRegionAt(curve, slUm),
    regionIndexAt: (slUm) => regionIndex(geometricRegionAt(curve, slUm)),
  };
}
