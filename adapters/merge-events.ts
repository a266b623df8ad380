/**
 * Puts the events of an events file (sorted by time, see EventList) into a trial's batches in time order:
 * each event goes in before the first frame of the trial at or after its time, and those left when the
 * trial ends come in a last batch. Frames without a time (headers, rejections) pass where they are.
 */
import { Observable, type OperatorFunction } from 'rxjs';
import type { Batch, Frame } from '../src/trial/records.ts';
import type { EventList } from './events-file.ts';

function timeOf(f: Frame): number {
  return f.kind === 'sample' || f.kind === 'event' || f.kind === 'marker' || f.kind === 'disconnection' ? f.tS : Number.NaN;
}

export function mergeEvents(list: EventList): OperatorFunction<Batch, Batch> {
  return (source) =>
    new Observable<Batch>((subscriber) => {
      let next = 0;
      return source.subscribe({
        next: (batch) => {
          if (next >= list.count) {
            subscriber.next(batch);
            return;
          }
          const out: Frame[] = [];
          for (const f of batch) {
            const tS = timeOf(f);
            // A NaN time compares false: the frame goes on where it is.
            while (next < list.count && list.timeAt(next) <= tS) out.push(list.frameAt(next++));
            out.push(f);
          }
          subscriber.next(out);
        },
        error: (error: unknown) => subscriber.error(error),
        complete: () => {
          if (next < list.count) {
            const out: Frame[] = [];
            while (next < list.count) out.push(list.frameAt(next++));
            subscriber.next(out);
          }
          subscriber.complete();
        },
      });
    });
}
