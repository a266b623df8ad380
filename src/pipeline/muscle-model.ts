/**
 * The per-muscle model the pipeline evaluates: the one place a calibration becomes a curve, so the
 * conversion and the force–length stages always agree.
 */
import type { MuscleCalibration } from '../model/calibration.ts';
import type { ForceLengthCurve } from '../model/geometry.ts';
import { geometricForce, regionAt } from '../model/geometry.ts';
import { speciesCurve } from '../model/species.ts';
import type { RegionKey } from '../model/regions.ts';

export function curveForCalibration(calibration: MuscleCalibration): ForceLengthCurve {
  return speciesCurve(calibration.species);
}

export interface MuscleEvaluator {
  readonly curve: ForceLengthCurve;
  forceAt(sarcomereUm: number): number;
  regionAt(sarcomereUm: number): RegionKey;
}

export function evaluatorForCalibration(calibration: MuscleCalibration): MuscleEvaluator {
  const curve = curveForCalibration(calibration);
  return {
    curve,
    forceAt: (sarcomereUm) => geometricForce(curve, sarcomereUm),
    regionAt: (sarcomereUm) => regionAt(curve, sarcomereUm),
  };
}
