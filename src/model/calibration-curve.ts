/**
 * The one place a calibration becomes a curve inside the pipeline, so the conversion, the force–length
 * stage and the summary always agree on a muscle's geometry.
 */
import type { MuscleCalibration } from './calibration.ts';
import { curveFromGeometry, withFilaments, type ForceLengthCurve } from './geometry.ts';
import { SPECIES_GEOMETRY } from './species.ts';

/** The geometric curve of a calibrated muscle (species preset with the muscle's own filament lengths). */
export function curveForCalibration(calibration: MuscleCalibration): ForceLengthCurve {
  return curveFromGeometry(withFilaments(SPECIES_GEOMETRY[calibration.species], calibration.filaments));
}
