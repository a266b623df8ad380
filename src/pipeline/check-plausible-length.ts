import type { OperatorFunction } from 'rxjs';
import type { Batch } from '../trial/records.ts';
import { isPlausibleSarcomereUm, PLAUSIBLE_SARCOMERE_UM } from '../model/plausible-sarcomere.ts';
import { OutBatch } from './out-batch.ts';
import { statefulStage } from './stateful-stage.ts';

/**
 * Says once per muscle, as a Notice, when its estimated sarcomere length leaves the range skeletal muscle
 * can have (the settings' plausible range, by default PLAUSIBLE_SARCOMERE_UM): the calibration (or the device's units) is then almost surely wrong. Samples pass
 * untouched; they are still placed on the curve, and the summary carries the notice.
 */
export interface CheckPlausibleLengthOptions {
  /** Shortest plausible sarcomere length, µm. @default PLAUSIBLE_SARCOMERE_UM.min */
  readonly minUm?: number;
  /** Longest plausible sarcomere length, µm. @default PLAUSIBLE_SARCOMERE_UM.max */
  readonly maxUm?: number;
}

export function checkPlausibleLength(options: CheckPlausibleLengthOptions = {}): OperatorFunction<Batch, Batch> {
  const minUm = options.minUm ?? PLAUSIBLE_SARCOMERE_UM.min;
  const maxUm = options.maxUm ?? PLAUSIBLE_SARCOMERE_UM.max;
  const plausible = { min: minUm, max: maxUm };
  return statefulStage(() => {
    const told = new Set<string>();
    return (batch) => {
      const out = new OutBatch(batch);
      for (const f of batch) {
        out.pass(f);
        if (f.kind !== 'sample' || Number.isNaN(f.sarcomereUm)) continue;
        if (isPlausibleSarcomereUm(f.sarcomereUm, plausible)) continue;
        if (told.has(f.muscle)) continue;
        told.add(f.muscle);
        out.insert({
          kind: 'notice',
          muscle: f.muscle,
          text:
            `${f.muscle}: estimated sarcomere length ${f.sarcomereUm.toFixed(2)} µm at t=${f.tS} s (fascicle ${f.fascicleMm} mm) is outside ` +
            `${minUm}–${maxUm} µm, which skeletal muscle cannot reach; check the calibration's sarcomere count ` +
            `and that the device sends millimetres (a device mapping converts other units)`,
        });
      }
      return out.done();
    };
  });
}
