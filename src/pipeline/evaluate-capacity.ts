import type { OperatorFunction } from 'rxjs';
import type { Batch } from '../trial/records.ts';
import { statefulStage } from './stateful-stage.ts';
import { plateauMiddleUm } from '../model/geometry.ts';
import {
  DEFAULT_VMAX_L0_PER_S,
  alongTendonFactor,
  forceVelocityFactor,
  normalizedVelocity,
  type ForceVelocityOptions,
} from '../model/force-velocity.ts';
import { curveForCalibration } from '../model/calibration-curve.ts';

export interface EvaluateCapacityOptions {
  /** Maximum shortening velocity, optimal fascicle lengths per second. @default 10 */
  readonly vmaxL0PerS?: number;
  /** Shape of the force–velocity relation (Hill's k, the lengthening plateau and slope). */
  readonly forceVelocity?: ForceVelocityOptions;
}

/**
 * Force capacity per sample, after the force–length stage: `forceLv` = length force × force–velocity factor
 * of the fascicle velocity normalized by the optimal fascicle length (sarcomeres in series × plateau middle
 * / 1000, from the muscle's CalibrationApplied frame) and Vmax; `forceTendon` = forceLv × cos(pennation).
 * A muscle with no calibration yet, a NaN velocity (the first sample after a restart) or no pennation
 * gives NaN, never a guess.
 */
export function evaluateCapacity(options: EvaluateCapacityOptions = {}): OperatorFunction<Batch, Batch> {
  const vmax = options.vmaxL0PerS ?? DEFAULT_VMAX_L0_PER_S;
  const fvOptions = options.forceVelocity ?? {};
  return statefulStage(() => {
    /** Optimal fascicle length (mm) of each calibrated muscle. */
    const optimalMm = new Map<string, number>();
    return (batch) => {
      for (const f of batch) {
        if (f.kind === 'calibration') {
          optimalMm.set(f.muscle, (f.sarcomeresInSeries * plateauMiddleUm(curveForCalibration(f.calibration))) / 1000);
          continue;
        }
        if (f.kind !== 'sample' || Number.isNaN(f.force)) continue;
        const l0 = optimalMm.get(f.muscle);
        if (l0 === undefined || !(l0 > 0)) continue;
        const lv = f.force * forceVelocityFactor(normalizedVelocity(f.velocityMmS, l0, vmax), fvOptions);
        f.forceLv = lv;
        f.forceTendon = lv * alongTendonFactor(f.pennationDeg);
      }
      return batch;
    };
  });
}
