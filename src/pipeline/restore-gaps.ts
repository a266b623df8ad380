import { map, type OperatorFunction } from 'rxjs';
import type { Batch } from '../trial/records.ts';
import { OutBatch } from './out-batch.ts';

/**
 * After each Disconnection, the `disconnected` Gaps it stands for (one per muscle it carried, or one for
 * every muscle), so filters restart there. It runs first in every pipeline, so a live session and every
 * replay of its session log restart at the same places.
 */
export function restoreGaps(): OperatorFunction<Batch, Batch> {
  return map((batch) => {
    const out = new OutBatch(batch);
    for (const f of batch) {
      out.pass(f);
      if (f.kind !== 'disconnection') continue;
      if (f.muscles === null) out.insert({ kind: 'gap', cause: 'disconnected', muscle: null, fromS: f.tS, toS: Number.NaN });
      else for (const muscle of f.muscles) out.insert({ kind: 'gap', cause: 'disconnected', muscle, fromS: f.tS, toS: Number.NaN });
    }
    return out.done();
  });
}
