import { asyncScheduler, tap, type MonoTypeOperatorFunction, type SchedulerLike } from 'rxjs';
import type { Batch } from '../trial/records.ts';
import { logLine } from './log-line.ts';
import type { SessionLog } from './session-log.ts';

/**
 * Appends every frame of each batch to the session log as it passes (receive time from the
 * scheduler's clock), before any later stage sees or changes it. The batches pass through unchanged.
 */
export function writeSessionLog(log: SessionLog, scheduler: SchedulerLike = asyncScheduler): MonoTypeOperatorFunction<Batch> {
  return tap((batch) => {
    const rxMs = scheduler.now();
    for (const f of batch) {
      const line = logLine(f, rxMs);
      if (line !== null) log.append(line);
    }
  });
}
