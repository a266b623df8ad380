/**
 * A trial as the commands read it: the trial file (fileSource), and, when an events file is given, its
 * rejections first and then the trial's frames with its events merged in time order.
 */
import { concat, defer, type Observable } from 'rxjs';
import type { Batch } from '../src/trial/records.ts';
import { EventList, readEventsFile } from './events-file.ts';
import { fileSource, type FileSourceOptions } from './file-source.ts';
import { mergeEvents } from './merge-events.ts';

export interface TrialSourceOptions extends FileSourceOptions {
  /** The file given with --events (gait events from another system), read through the mapping's "events". */
  readonly eventsPath?: string | undefined;
}

export function trialSource(path: string, options: TrialSourceOptions = {}): Observable<Batch> {
  const { eventsPath, ...fileOptions } = options;
  if (eventsPath === undefined) return fileSource(path, fileOptions);
  return defer(() => {
    const list = new EventList();
    return concat(
      readEventsFile(eventsPath, options.mapping ?? null, list, {
        ...(options.maxLineBytes !== undefined ? { maxLineBytes: options.maxLineBytes } : {}),
        ...(options.chunkBytes !== undefined ? { chunkBytes: options.chunkBytes } : {}),
      }),
      defer(() => fileSource(path, fileOptions).pipe(mergeEvents(list))),
    );
  });
}
