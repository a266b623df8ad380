/** Fascicle length → estimated sarcomere length, through the number of sarcomeres in series. */
import type { Species } from './species.ts';
import { plateauMiddleUm, type ForceLengthCurve } from './geometry.ts';

export type MuscleCalibration =
  | { readonly species: Species; readonly method: 'sarcomere_count'; readonly sarcomeresInSeries: number }
  | {
      readonly species: Species;
      readonly method: 'reference';
      readonly referenceFascicleMm: number;
      readonly referenceSarcomereUm: number;
    }
  | { readonly species: Species; readonly method: 'optimal_length'; readonly optimalFascicleMm: number };

/** A whole calibration: per muscle name. Validated from JSON at the edge (adapters/calibration-file.ts). */
export interface CalibrationSpec {
  readonly muscles: Readonly<Record<string, MuscleCalibration>>;
}

/** Sarcomere length (µm) = fascicle length (mm) × 1000 / sarcomeres in series. */
export function sarcomereUmFromFascicle(fascicleMm: number, sarcomeresInSeries: number): number {
  return (fascicleMm * 1000) / sarcomeresInSeries;
}

/** Number of sarcomeres in series that a calibration implies, for the species' curve. */
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
