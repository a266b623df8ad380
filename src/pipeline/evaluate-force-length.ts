import type { OperatorFunction } from 'rxjs';
import type { Batch } from '../trial/records.ts';
import { statefulStage } from './stateful-stage.ts';
import { OutBatch } from './out-batch.ts';
import { DEFAULT_SPECIES } from '../model/species.ts';
import { muscleModelFor } from '../model/calibration.ts';
import { activationShiftNote, wholeMuscleShapeNote, type MuscleModel } from '../model/muscle-model.ts';

interface Evaluator {
  readonly model: MuscleModel;
  /** Activation for samples that carry none (NaN: full activation). */
  readonly activation: number;
}

/**
 * Places each sample on its muscle's force–length curve: relative active force and region. The curve
 * follows the muscle's CalibrationApplied frame (species, filaments, shape, between-fibre spread, the
 * activation-dependent optimal length); regions always come from the geometry, whatever shape gives the
 * force; a muscle whose calibration states no between-fibre spread takes the settings' one. With the optimal length shifting with activation, a sample's own activation is used, else the
 * calibration's. A Notice says, once per calibration, when the activation shift is on and when a
 * whole-muscle shape gives the force.
 */
export interface EvaluateForceLengthOptions {
  /** Between-fibre SD of sarcomere length (µm) for a muscle whose calibration states none; 0 is off. @default 0 */
  readonly betweenFibreSdUm?: number;
}

export function evaluateForceLength(options: EvaluateForceLengthOptions = {}): OperatorFunction<Batch, Batch> {
  const defaultSdUm = options.betweenFibreSdUm ?? 0;
  return statefulStage(() => {
    const fallback: Evaluator = {
      model: muscleModelFor({ species: DEFAULT_SPECIES, method: 'sarcomere_count', sarcomeresInSeries: 1 }),
      activation: Number.NaN,
    };
    const evaluators = new Map<string, Evaluator>();
    return (batch) => {
      const out = new OutBatch(batch);
      for (const f of batch) {
        out.pass(f);
        if (f.kind === 'calibration') {
          const cal = f.calibration.dispersionSdUm === undefined && defaultSdUm > 0 ? { ...f.calibration, dispersionSdUm: defaultSdUm } : f.calibration;
          const model = muscleModelFor(cal);
          evaluators.set(f.muscle, { model, activation: cal.activation ?? Number.NaN });
          const shapeNote = wholeMuscleShapeNote(model.shape);
          if (shapeNote !== null) out.insert({ kind: 'notice', muscle: f.muscle, text: `${f.muscle}: ${shapeNote}` });
          if (model.activationShift > 0) {
            out.insert({ kind: 'notice', muscle: f.muscle, text: `${f.muscle}: ${activationShiftNote(model.activationShift, cal.activation)}` });
          }
          continue;
        }
        if (f.kind !== 'sample' || Number.isNaN(f.sarcomereUm)) continue;
        const evaluator = evaluators.get(f.muscle) ?? fallback;
        const model = evaluator.model;
        f.force =
          model.activationShift > 0
            ? model.forceAtActivation(f.sarcomereUm, Number.isNaN(f.activation) ? evaluator.activation : f.activation)
            : model.forceAt(f.sarcomereUm);
        f.region = model.regionAt(f.sarcomereUm);
      }
      return out.done();
    };
  });
}
