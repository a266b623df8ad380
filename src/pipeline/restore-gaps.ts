import { map, type OperatorFunction } from 'rxjs';
import type { Batch, Disconnection, Frame, Gap } from '../trial/records.ts';

/** The `disconnected` Gaps of a lost connection: one per muscle it carried, or one for every muscle. */
function gapsOf(d: Disconnection): Gap[] {
  return d.muscles === null
    ? [{ kind: 'gap', cause: 'disconnected', muscle: null, fromS: d.tS, toS: Number.NaN }]
    : d.muscles.map((muscle) => ({ kind: 'gap', cause: 'disconnected', muscle, fromS: d.tS, toS: Number.NaN }));
}

/**
 * After each Disconnection, the `disconnected` Gaps it stands for, so filters restart there. It runs first
 * in every pipeline, so a live session and every replay of its session log restart at the same places.
 */
export function restoreGaps(): OperatorFunction<Batch, Batch> {
  return map((batch) => {
    let out: Frame[] | null = null;
    for (let i = 0; i < batch.length; i++) {
      const f = batch[i] as Frame;
      if (out !== null) out.push(f);
      if (f.kind !== 'disconnection') continue;
      out ??= batch.slice(0, i + 1);
      out.push(...gapsOf(f));
    }
    return out ?? batch;
  });
}
