import type { OperatorFunction } from 'rxjs';
import type { Batch } from '../trial/records.ts';
import { forgetAcrossGap } from './forget-across-gap.ts';
import { statefulStage } from './stateful-stage.ts';

interface Last {
  tS: number;
  smoothMm: number;
}

/**
 * Fascicle velocity (mm/s, lengthening positive) as the backward difference of the smoothed length.
 * Needs no future samples, so live and replay agree; restarts after a Gap or a skipped sample.
 */
export function estimateVelocity(): OperatorFunction<Batch, Batch> {
  return statefulStage(() => {
    const last = new Map<string, Last>();
    return (batch) => {
      for (const f of batch) {
        if (f.kind === 'gap') {
          forgetAcrossGap(last, f);
          continue;
        }
        if (f.kind !== 'sample') continue;
        if (Number.isNaN(f.smoothMm)) {
          last.delete(f.muscle);
          continue;
        }
        const previous = last.get(f.muscle);
        if (previous === undefined) {
          last.set(f.muscle, { tS: f.tS, smoothMm: f.smoothMm });
          continue;
        }
        f.velocityMmS = (f.smoothMm - previous.smoothMm) / (f.tS - previous.tS);
        previous.tS = f.tS;
        previous.smoothMm = f.smoothMm;
      }
      return batch;
    };
  });
}
