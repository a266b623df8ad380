import type { OperatorFunction } from 'rxjs';
import { sampleExcerpt, type Batch } from '../trial/records.ts';
import { statefulStage } from './stateful-stage.ts';

/**
 * Rejects a sample whose time is not after the previous accepted sample of the same muscle:
 * `duplicate` at exactly the same time, `time_not_increasing` when earlier. Other frames pass.
 */
export function orderPerMuscle(): OperatorFunction<Batch, Batch> {
  return statefulStage(() => {
    // One mutable cell per muscle: the common sample costs one lookup and no Map write.
    const lastTS = new Map<string, { tS: number }>();
    return (batch) => {
      for (let i = 0; i < batch.length; i++) {
        const f = batch[i];
        if (f === undefined || f.kind !== 'sample') continue;
        const cell = lastTS.get(f.muscle);
        if (cell === undefined) {
          lastTS.set(f.muscle, { tS: f.tS });
          continue;
        }
        const previous = cell.tS;
        if (f.tS > previous) {
          cell.tS = f.tS;
          continue;
        }
        const same = f.tS === previous;
        batch[i] = {
          kind: 'rejection',
          reason: same ? 'duplicate' : 'time_not_increasing',
          message: same
            ? `muscle "${f.muscle}" already has a sample at t=${f.tS} s; each muscle's samples need distinct, increasing times (a device resending a message after reconnecting does this)`
            : `muscle "${f.muscle}" at t=${f.tS} s is earlier than its previous sample at t=${previous} s; samples of one muscle must go forward in time (check the device clock, or that two devices do not share a muscle name)`,
          line: f.line,
          excerpt: sampleExcerpt(f),
        };
      }
      return batch;
    };
  });
}
