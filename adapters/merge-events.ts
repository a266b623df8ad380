/**
 * Puts the events of an events file (sorted by time, see EventList) into a trial's batches in time order:
 * each event goes in before the first frame of the trial at or after its time, and those left when the
 * trial ends come in a last batch. Frames without a time (headers, rejections) pass where they are.
 * withEventsFile reads the events file first (its rejections go first), then plays the trial with them.
 */
import { concat, defer, Observable, type OperatorFunction } from 'rxjs';
import type { Batch, Frame } from '../src/trial/records.ts';
import type { DeviceMapping } from './device-mapping.ts';
import { EventList, readEventsFile } from './events-file.ts';
import type { FileSourceOptions } from './file-source.ts';

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

/** The events file's rejections, then the trial's frames with its events merged in (see readEventsFile). */
export function withEventsFile(
  eventsPath: string,
  mapping: DeviceMapping | null,
  trial: () => Observable<Batch>,
  options: Pick<FileSourceOptions, 'maxLineBytes' | 'chunkBytes'> = {},
): Observable<Batch> {
  return defer(() => {
    const list = new EventList();
    return concat(
      readEventsFile(eventsPath, mapping, list, options),
      defer(() => trial().pipe(mergeEvents(list))),
    );
  });
}
