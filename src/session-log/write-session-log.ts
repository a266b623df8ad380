import { asyncScheduler, map, type MonoTypeOperatorFunction, type SchedulerLike } from 'rxjs';
import type { Batch, Frame, Rejection } from '../trial/records.ts';
import { EXCERPT_CHARS } from '../../adapters/limits.ts';
import { logLine, MAX_LOG_LINE_BYTES, rejectionLine } from './log-line.ts';
import type { SessionLog } from './session-log.ts';

/** The rejection of a record whose line would be longer than a line of the log may be. */
function tooLongForTheLog(f: Frame, line: string, bytes: number): Rejection {
  return {
    kind: 'rejection',
    reason: 'line_too_long',
    message:
      `${f.kind} is ${bytes} bytes long as a line of the session log: a line may be at most ${MAX_LOG_LINE_BYTES} bytes, ` +
      'so neither the log nor a replay of it could hold it; send shorter muscle names and texts (bytes a device sends that are not UTF-8 take 3 bytes each)',
    line: 'line' in f ? f.line : 0,
    excerpt: line.slice(0, EXCERPT_CHARS),
  };
}

/**
 * Appends every frame of each batch to the session log as it passes (receive time from the
 * scheduler's clock), before any later stage sees or changes it: valid records one line each, rejected
 * ones summed up by reason (SessionLog.tally). What passes on is what the log says: a record whose line
 * would be longer than the log's cap becomes the line_too_long rejection a replay of the log would find,
 * so a replay of the log gives what the session gave, for every input. Otherwise batches pass unchanged.
 */
export function writeSessionLog(log: SessionLog, scheduler: SchedulerLike = asyncScheduler): MonoTypeOperatorFunction<Batch> {
  return map((batch) => {
    const rxMs = scheduler.now();
    let out: Batch | null = null;
    for (let i = 0; i < batch.length; i++) {
      let f = batch[i] as Frame;
      if (f.kind !== 'rejection') {
        const line = logLine(f, rxMs);
        if (line === null) continue;
        // A UTF-16 unit takes at most 3 UTF-8 bytes: only a long line needs counting.
        const bytes = line.length * 3 > MAX_LOG_LINE_BYTES ? Buffer.byteLength(line) : 0;
        if (bytes <= MAX_LOG_LINE_BYTES) {
          log.append(line);
          continue;
        }
        f = tooLongForTheLog(f, line, bytes);
        (out ??= batch.slice())[i] = f;
      }
      const first = f;
      log.tally(f.reason, f.count ?? 1, (total) => rejectionLine(first, total, rxMs));
    }
    return out ?? batch;
  });
}
