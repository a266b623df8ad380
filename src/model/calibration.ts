/** Fascicle length → estimated sarcomere length, through the number of sarcomeres in series. */
import type { Species } from './species.ts';
import { plateauMiddleUm, type FilamentGeometry, type ForceLengthCurve } from './geometry.ts';
import { makeMuscleModel, type CurveShape, type MuscleModel, type MuscleModelOptions } from './muscle-model.ts';
import { PLAUSIBLE_SARCOMERE_UM, type SarcomereRange } from './plausible-sarcomere.ts';
import type { CountSpread } from './count-spread.ts';

/** Where a calibration came from, carried with it into the outputs. Every field is free to be absent. */
export interface CalibrationProvenance {
  /** How it was made, in words (e.g. "two postures", "prior from published architecture"). */
  readonly method?: string;
  /** The trial file it was read from, and that file's SHA-256 (hex). */
  readonly sourceFile?: string;
  readonly sourceSha256?: string;
  /** The window(s) of the trial's clock, s. */
  readonly windowsS?: ReadonlyArray<readonly [number, number]>;
  /** The sarcomere length(s) assumed there, µm, and where they came from. */
  readonly sarcomereLengthsUm?: readonly number[];
  readonly sarcomereLengthSource?: string;
  /** When it was made (ISO 8601, UTC) and by which version of the tool. */
  readonly createdUtc?: string;
  readonly toolVersion?: string;
}

/** What every method may carry besides its numbers: the curve the muscle is placed on. */
export interface CalibrationCurveOptions {
  readonly species: Species;
  /** The muscle's own filament lengths (µm), replacing the species preset's one by one. */
  readonly filaments?: Partial<FilamentGeometry>;
  /** SD (µm) of sarcomere lengths between the muscle's fibres, around the estimate; off when absent. */
  readonly dispersionSdUm?: number;
  /** @default 'geometric' */
  readonly shape?: CurveShape;
  /** λ of the activation-dependent optimal length (muscle-model.ts); off when absent. */
  readonly activationShift?: number;
  /** Activation (0–1) assumed for samples that carry none; 1 when absent. */
  readonly activation?: number;
  readonly provenance?: CalibrationProvenance;
}

export type MuscleCalibration = CalibrationCurveOptions &
  (
    | {
        readonly method: 'sarcomere_count';
        readonly sarcomeresInSeries: number;
        /** SD of the count, when known (same unit: sarcomeres). */
        readonly sarcomeresInSeriesSd?: number;
        /**
         * Where that SD comes from: the count itself ('count', the default: lognormal) or the sarcomere
         * length the count was derived from ('sarcomere_length': normal in the length).
         */
        readonly sarcomeresInSeriesSdFrom?: 'count' | 'sarcomere_length';
        /**
         * The constant part of the tracked length that holds no sarcomeres (aponeurosis or tendon pieces in
         * the tracked line, a tracking offset), mm: sarcomere length = (fascicle − offset) × 1000 / N. @default 0
         */
        readonly fascicleOffsetMm?: number;
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
    | {
        /**
         * A prior from published architecture: N = a published fibre length (mm, from dissection) × 1000 /
         * the sarcomere length (µm) it is normalised to. Cadaveric fibre length is not the living fascicle
         * length, so this is a prior, not a measurement of the person.
         */
        readonly method: 'architecture_prior';
        readonly priorFibreMm: number;
        /** SD (mm) of that fibre length across the specimens. */
        readonly priorFibreSdMm?: number;
        readonly priorSarcomereUm: number;
        /** The publication the values come from (authors, year, journal, table). */
        readonly priorSource: string;
      }
  );

/** What every output calls a calibration method. */
export const METHOD_LABEL: Readonly<Record<MuscleCalibration['method'], string>> = {
  sarcomere_count: 'sarcomere count',
  reference: 'reference lengths',
  optimal_length: 'optimal fascicle length',
  architecture_prior: 'prior from published architecture',
};

/** Said with every calibration from published architecture, on screen and in the outputs. */
export const ARCHITECTURE_PRIOR_CAUTION =
  'cadaveric fibre length is not the living fascicle length (fixation, posture, and the person all differ); treat its sarcomere lengths as a prior, not a measurement';

/** A whole calibration: per muscle name. Validated from JSON at the edge (adapters/calibration-file.ts). */
export interface CalibrationSpec {
  readonly muscles: Readonly<Record<string, MuscleCalibration>>;
}

/** Sarcomere length (µm) = (fascicle length − constant part) (mm) × 1000 / sarcomeres in series. */
export function sarcomereUmFromFascicle(fascicleMm: number, sarcomeresInSeries: number, offsetMm = 0): number {
  return ((fascicleMm - offsetMm) * 1000) / sarcomeresInSeries;
}

/** The constant part (mm) of the tracked length a calibration says holds no sarcomeres; 0 for most methods. */
export function fascicleOffsetMm(cal: MuscleCalibration): number {
  return cal.method === 'sarcomere_count' ? (cal.fascicleOffsetMm ?? 0) : 0;
}

/**
 * Number of sarcomeres in series that a calibration implies, for the muscle's curve: given; or reference
 * fascicle (mm) × 1000 / reference sarcomere length (µm); or optimal fascicle (mm) × 1000 / plateau middle
 * (µm); or published fibre length (mm) × 1000 / the sarcomere length it is normalised to (µm).
 */
export function sarcomeresInSeries(cal: MuscleCalibration, curve: ForceLengthCurve): number {
  switch (cal.method) {
    case 'sarcomere_count':
      return cal.sarcomeresInSeries;
    case 'reference':
      return (cal.referenceFascicleMm * 1000) / cal.referenceSarcomereUm;
    case 'optimal_length':
      return (cal.optimalFascicleMm * 1000) / plateauMiddleUm(curve);
    case 'architecture_prior':
      return (cal.priorFibreMm * 1000) / cal.priorSarcomereUm;
  }
}

/** The curve options of a calibration, for makeMuscleModel. */
export function modelOptionsFor(cal: MuscleCalibration): MuscleModelOptions {
  return {
    species: cal.species,
    ...(cal.filaments !== undefined ? { filaments: cal.filaments } : {}),
    ...(cal.shape !== undefined ? { shape: cal.shape } : {}),
    ...(cal.dispersionSdUm !== undefined ? { dispersionSdUm: cal.dispersionSdUm } : {}),
    ...(cal.activationShift !== undefined ? { activationShift: cal.activationShift } : {}),
  };
}

/** The per-sample model of a calibrated muscle (its species, filaments, shape and dispersion). */
export function muscleModelFor(cal: MuscleCalibration): MuscleModel {
  return makeMuscleModel(modelOptionsFor(cal));
}

/** The calibration's sarcomere count with its uncertainty (src/model/count-spread.ts). */
export interface SarcomereCountSpread extends CountSpread {
  readonly count: number;
}

/**
 * Uncertainty of N by first-order error propagation (common practice, no source): for
 * N = F × 1000 / SL, (σN/N)² = (σF/F)² + (σSL/SL)²; for a given count, σN/N; for an optimal or published
 * fibre length, σF/F. Its shape follows where the error lies: in the sarcomere length N was derived from
 * (a reference calibration stating only that SD, or a count said to come from it) gives a length-normal
 * spread; every other error is in N itself, lognormal.
 */
export function sarcomereCountSpread(cal: MuscleCalibration, curve: ForceLengthCurve): SarcomereCountSpread {
  const count = sarcomeresInSeries(cal, curve);
  switch (cal.method) {
    case 'sarcomere_count':
      return {
        count,
        relativeSd: (cal.sarcomeresInSeriesSd ?? 0) / cal.sarcomeresInSeries,
        shape: cal.sarcomeresInSeriesSdFrom === 'sarcomere_length' ? 'length_normal' : 'lognormal',
      };
    case 'reference': {
      const rs = (cal.referenceSarcomereSdUm ?? 0) / cal.referenceSarcomereUm;
      const rf = (cal.referenceFascicleSdMm ?? 0) / cal.referenceFascicleMm;
      return { count, relativeSd: Math.sqrt(rs * rs + rf * rf), shape: rf === 0 ? 'length_normal' : 'lognormal' };
    }
    case 'optimal_length':
      return { count, relativeSd: (cal.optimalFascicleSdMm ?? 0) / cal.optimalFascicleMm, shape: 'lognormal' };
    case 'architecture_prior':
      return { count, relativeSd: (cal.priorFibreSdMm ?? 0) / cal.priorFibreMm, shape: 'lognormal' };
  }
}

export type CalibrationCheck =
  | { readonly ok: true; readonly slMinUm: number; readonly slMaxUm: number }
  | { readonly ok: false; readonly slMinUm: number; readonly slMaxUm: number; readonly message: string };

/**
 * Does a sarcomere count fit a trial? Flags a count whose implied sarcomere lengths, for the trial's
 * shortest and longest fascicle lengths, leave the plausible range (by default PLAUSIBLE_SARCOMERE_UM): the count (or the trial's muscle) is likely wrong.
 */
export function checkCalibrationAgainstTrial(
  muscle: string,
  sarcomeresInSeriesCount: number,
  fascicleMinMm: number,
  fascicleMaxMm: number,
  offsetMm = 0,
  plausible: SarcomereRange = PLAUSIBLE_SARCOMERE_UM,
): CalibrationCheck {
  const slMinUm = sarcomereUmFromFascicle(fascicleMinMm, sarcomeresInSeriesCount, offsetMm);
  const slMaxUm = sarcomereUmFromFascicle(fascicleMaxMm, sarcomeresInSeriesCount, offsetMm);
  if (!(Number.isFinite(slMinUm) && Number.isFinite(slMaxUm) && sarcomeresInSeriesCount > 0)) {
    return {
      ok: false,
      slMinUm,
      slMaxUm,
      message: `${muscle}: sarcomeres in series ${String(sarcomeresInSeriesCount)} and fascicle lengths ${String(fascicleMinMm)}–${String(fascicleMaxMm)} mm give no sarcomere length; check the calibration`,
    };
  }
  if (slMinUm >= plausible.min && slMaxUm <= plausible.max) return { ok: true, slMinUm, slMaxUm };
  const lo = Math.ceil(((fascicleMaxMm - offsetMm) * 1000) / plausible.max);
  const hi = Math.floor(((fascicleMinMm - offsetMm) * 1000) / plausible.min);
  const fits = lo <= hi ? `a count from ${lo} to ${hi} keeps them within ${plausible.min}–${plausible.max} µm` : `no single count keeps them within ${plausible.min}–${plausible.max} µm (is the fascicle length in mm?)`;
  return {
    ok: false,
    slMinUm,
    slMaxUm,
    message:
      `${muscle}: ${Math.round(sarcomeresInSeriesCount)} sarcomeres in series put this trial's fascicle lengths ` +
      `(${fascicleMinMm.toFixed(1)}–${fascicleMaxMm.toFixed(1)} mm) at ${slMinUm.toFixed(2)}–${slMaxUm.toFixed(2)} µm, ` +
      `outside the plausible ${plausible.min}–${plausible.max} µm; ${fits}. Check the calibration's muscle name and numbers.`,
  };
}
