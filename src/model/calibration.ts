/** Fascicle length → estimated sarcomere length, through the number of sarcomeres in series. */
import type { Species } from './species.ts';
import { plateauMiddleUm, type FilamentGeometry, type ForceLengthCurve } from './geometry.ts';
import { makeMuscleModel, type CurveShape, type MuscleModel, type MuscleModelOptions } from './muscle-model.ts';
import { PLAUSIBLE_SARCOMERE_UM } from './plausible-sarcomere.ts';

/** What every method may carry besides its numbers: the curve the muscle is placed on. */
export interface CalibrationCurveOptions {
  readonly species: Species;
  /** The muscle's own filament lengths (µm), replacing the species preset's one by one. */
  readonly filaments?: Partial<FilamentGeometry>;
  /** SD (µm) of sarcomere lengths around the estimate (non-uniformity); off when absent. */
  readonly dispersionSdUm?: number;
  /** @default 'geometric' */
  readonly shape?: CurveShape;
}

export type MuscleCalibration = CalibrationCurveOptions &
  (
    | {
        readonly method: 'sarcomere_count';
        readonly sarcomeresInSeries: number;
        /** SD of the count, when known (same unit: sarcomeres). */
        readonly sarcomeresInSeriesSd?: number;
      }
    | {
        readonly method: 'reference';
        readonly referenceFascicleMm: number;
        readonly referenceSarcomereUm: number;
        /** SD (µm) of the reference sarcomere length (e.g. across biopsy or imaging measurements). */
        readonly referenceSarcomereSdUm?: number;
        /** SD (mm) of the reference fascicle length. */
        readonly referenceFascicleSdMm?: number;
      }
    | {
        readonly method: 'optimal_length';
        readonly optimalFascicleMm: number;
        /** SD (mm) of the optimal fascicle length. */
        readonly optimalFascicleSdMm?: number;
      }
  );

/** A whole calibration: per muscle name. Validated from JSON at the edge (adapters/calibration-file.ts). */
export interface CalibrationSpec {
  readonly muscles: Readonly<Record<string, MuscleCalibration>>;
}

/** Sarcomere length (µm) = fascicle length (mm) × 1000 / sarcomeres in series. */
export function sarcomereUmFromFascicle(fascicleMm: number, sarcomeresInSeries: number): number {
  return (fascicleMm * 1000) / sarcomeresInSeries;
}

/**
 * Number of sarcomeres in series that a calibration implies, for the muscle's curve: given; or reference
 * fascicle (mm) × 1000 / reference sarcomere length (µm); or optimal fascicle (mm) × 1000 / plateau middle (µm).
 */
export function sarcomeresInSeries(cal: MuscleCalibration, curve: ForceLengthCurve): number {
  switch (cal.method) {
    case 'sarcomere_count':
      return cal.sarcomeresInSeries;
    case 'reference':
      return (cal.referenceFascicleMm * 1000) / cal.referenceSarcomereUm;
    case 'optimal_length':
      return (cal.optimalFascicleMm * 1000) / plateauMiddleUm(curve);
  }
}

/** The curve options of a calibration, for makeMuscleModel. */
export function modelOptionsFor(cal: MuscleCalibration): MuscleModelOptions {
  return {
    species: cal.species,
    ...(cal.filaments !== undefined ? { filaments: cal.filaments } : {}),
    ...(cal.shape !== undefined ? { shape: cal.shape } : {}),
    ...(cal.dispersionSdUm !== undefined ? { dispersionSdUm: cal.dispersionSdUm } : {}),
  };
}

/** The per-sample model of a calibrated muscle (its species, filaments, shape and dispersion). */
export function muscleModelFor(cal: MuscleCalibration): MuscleModel {
  return makeMuscleModel(modelOptionsFor(cal));
}

/** The calibration's sarcomere count as a normal distribution: mean and SD relative to the mean. */
export interface SarcomereCountSpread {
  readonly count: number;
  /** SD of the count / the count; 0 when the calibration states no uncertainty. */
  readonly relativeSd: number;
}

/**
 * Uncertainty of N by first-order error propagation (common practice, no source): for
 * N = F × 1000 / SL, (σN/N)² = (σF/F)² + (σSL/SL)²; for a given count, σN/N; for an optimal length, σF/F.
 */
export function sarcomereCountSpread(cal: MuscleCalibration, curve: ForceLengthCurve): SarcomereCountSpread {
  const count = sarcomeresInSeries(cal, curve);
  switch (cal.method) {
    case 'sarcomere_count':
      return { count, relativeSd: (cal.sarcomeresInSeriesSd ?? 0) / cal.sarcomeresInSeries };
    case 'reference': {
      const rs = (cal.referenceSarcomereSdUm ?? 0) / cal.referenceSarcomereUm;
      const rf = (cal.referenceFascicleSdMm ?? 0) / cal.referenceFascicleMm;
      return { count, relativeSd: Math.sqrt(rs * rs + rf * rf) };
    }
    case 'optimal_length':
      return { count, relativeSd: (cal.optimalFascicleSdMm ?? 0) / cal.optimalFascicleMm };
  }
}

export type CalibrationCheck =
  | { readonly ok: true; readonly slMinUm: number; readonly slMaxUm: number }
  | { readonly ok: false; readonly slMinUm: number; readonly slMaxUm: number; readonly message: string };

/**
 * Does a sarcomere count fit a trial? Flags a count whose implied sarcomere lengths, for the trial's
 * shortest and longest fascicle lengths, leave PLAUSIBLE_SARCOMERE_UM: the count (or the trial's muscle) is likely wrong.
 */
export function checkCalibrationAgainstTrial(
  muscle: string,
  sarcomeresInSeriesCount: number,
  fascicleMinMm: number,
  fascicleMaxMm: number,
): CalibrationCheck {
  const slMinUm = sarcomereUmFromFascicle(fascicleMinMm, sarcomeresInSeriesCount);
  const slMaxUm = sarcomereUmFromFascicle(fascicleMaxMm, sarcomeresInSeriesCount);
  if (!(Number.isFinite(slMinUm) && Number.isFinite(slMaxUm) && sarcomeresInSeriesCount > 0)) {
    return {
      ok: false,
      slMinUm,
      slMaxUm,
      message: `${muscle}: sarcomeres in series ${String(sarcomeresInSeriesCount)} and fascicle lengths ${String(fascicleMinMm)}–${String(fascicleMaxMm)} mm give no sarcomere length; check the calibration`,
    };
  }
  if (slMinUm >= PLAUSIBLE_SARCOMERE_UM.min && slMaxUm <= PLAUSIBLE_SARCOMERE_UM.max) return { ok: true, slMinUm, slMaxUm };
  const lo = Math.ceil((fascicleMaxMm * 1000) / PLAUSIBLE_SARCOMERE_UM.max);
  const hi = Math.floor((fascicleMinMm * 1000) / PLAUSIBLE_SARCOMERE_UM.min);
  const fits = lo <= hi ? `a count from ${lo} to ${hi} keeps them within ${PLAUSIBLE_SARCOMERE_UM.min}–${PLAUSIBLE_SARCOMERE_UM.max} µm` : `no single count keeps them within ${PLAUSIBLE_SARCOMERE_UM.min}–${PLAUSIBLE_SARCOMERE_UM.max} µm (is the fascicle length in mm?)`;
  return {
    ok: false,
    slMinUm,
    slMaxUm,
    message:
      `${muscle}: ${Math.round(sarcomeresInSeriesCount)} sarcomeres in series put this trial's fascicle lengths ` +
      `(${fascicleMinMm.toFixed(1)}–${fascicleMaxMm.toFixed(1)} mm) at ${slMinUm.toFixed(2)}–${slMaxUm.toFixed(2)} µm, ` +
      `outside the plausible ${PLAUSIBLE_SARCOMERE_UM.min}–${PLAUSIBLE_SARCOMERE_UM.max} µm; ${fits}. Check the calibration's muscle name and numbers.`,
  };
}
