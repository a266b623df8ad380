import { map, type OperatorFunction } from 'rxjs';
import type { Batch } from '../trial/records.ts';
import { OutBatch } from './out-batch.ts';

/**
 * After each Disconnection, the `disconnected` Gaps it stands for (one per muscle it carried, or one for
 * every muscle), so filters restart there; the same after a ClockReset, which is also said once as a
 * Notice. It runs early in every pipeline, so a live session and every replay of its session log restart
 * at the same places.
 */
export function restoreGaps(): OperatorFunction<Batch, Batch> {
  return map((batch) => {
    const out = new OutBatch(batch);
    for (const f of batch) {
      out.pass(f);
      if (f.kind !== 'disconnection' && f.kind !== 'clock_reset') continue;
      const fromS = f.kind === 'disconnection' ? f.tS : Number.NaN;
      const toS = f.kind === 'clock_reset' ? f.tS : Number.NaN;
      if (f.muscles === null) out.insert({ kind: 'gap', cause: 'disconnected', muscle: null, fromS, toS });
      else for (const muscle of f.muscles) out.insert({ kind: 'gap', cause: 'disconnected', muscle, fromS, toS });
      if (f.kind === 'clock_reset') {
        out.insert({
          kind: 'notice',
          muscle: null,
          text:
            `a device's clock restarted (${f.detail}): its times from t=${f.tS} s go on the session's timeline shifted by ` +
            `${f.offsetS} s, after a gap; the session log keeps the shifted times`,
        });
      }
    }
    return out.done();
  });
}
