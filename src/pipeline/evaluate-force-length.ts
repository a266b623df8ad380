import type { OperatorFunction } from 'rxjs';
import type { Batch } from '../trial/records.ts';
import { statefulStage } from './stateful-stage.ts';
import { DEFAULT_SPECIES } from '../model/species.ts';
import { muscleModelFor } from '../model/calibration.ts';
import type { MuscleModel } from '../model/muscle-model.ts';

/**
 * Places each sample on its muscle's force–length curve: relative active force and region. The curve
 * follows the muscle's CalibrationApplied frame (species, filaments, shape, dispersion); regions always
 * come from the geometry, whatever shape gives the force.
 */
export function evaluateForceLength(): OperatorFunction<Batch, Batch> {
  return statefulStage(() => {
    const fallback = muscleModelFor({ species: DEFAULT_SPECIES, method: 'sarcomere_count', sarcomeresInSeries: 1 });
    const evaluators = new Map<string, MuscleModel>();
    return (batch) => {
      for (const f of batch) {
        if (f.kind === 'calibration') {
          evaluators.set(f.muscle, muscleModelFor(f.calibration));
          continue;
        }
        if (f.kind !== 'sample' || Number.isNaN(f.sarcomereUm)) continue;
        const evaluator = evaluators.get(f.muscle) ?? fallback;
        f.force = evaluator.forceAt(f.sarcomereUm);
        f.region = evaluator.regionAt(f.sarcomereUm);
      }
      return batch;
    };
  });
}
