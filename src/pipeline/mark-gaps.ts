import type { OperatorFunction } from 'rxjs';
import type { Batch } from '../trial/records.ts';
import { DEFAULT_SETTINGS } from '../trial/settings.ts';
import { OutBatch } from './out-batch.ts';
import { statefulStage } from './stateful-stage.ts';

export interface MarkGapsOptions {
  /** A forward jump between two samples of one muscle longer than this starts a gap. @default 0.25 */
  readonly gapS?: number;
}

export const DEFAULT_GAP_S = DEFAULT_SETTINGS.gap_s;

/**
 * Inserts a `time_jump` Gap before a sample that comes more than `gapS` after the previous sample of
 * its muscle, so filters restart and nothing is interpolated across the hole.
 */
export function markGaps(options: MarkGapsOptions = {}): OperatorFunction<Batch, Batch> {
  const gapS = options.gapS ?? DEFAULT_GAP_S;
  return statefulStage(() => {
    // One mutable cell per muscle: the common sample costs one lookup and no Map write.
    const lastTS = new Map<string, { tS: number }>();
    return (batch) => {
      const out = new OutBatch(batch);
      for (const f of batch) {
        if (f.kind === 'sample') {
          const cell = lastTS.get(f.muscle);
          let previous: number | undefined;
          if (cell === undefined) lastTS.set(f.muscle, { tS: f.tS });
          else {
            previous = cell.tS;
            cell.tS = f.tS;
          }
          if (previous !== undefined && f.tS - previous > gapS) {
            out.insert({ kind: 'gap', cause: 'time_jump', muscle: f.muscle, fromS: previous, toS: f.tS });
          }
        }
        out.pass(f);
      }
      return out.done();
    };
  });
}
