/**
 * The rejections of one file among several that feed a trial say which file they came from: they carry
 * a line already, and `file` names the file (a trial file alone leaves it out, so its messages stay as
 * they were).
 */
import { map, type OperatorFunction } from 'rxjs';
import type { Batch } from '../src/trial/records.ts';

export function nameRejections(file: string): OperatorFunction<Batch, Batch> {
  return map((batch) => {
    for (let i = 0; i < batch.length; i++) {
      const f = batch[i];
      if (f?.kind === 'rejection' && f.file === undefined) batch[i] = { ...f, file };
    }
    return batch;
  });
}
