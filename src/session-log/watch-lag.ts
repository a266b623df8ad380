import { asyncScheduler, interval, type SchedulerLike, type Subscription } from 'rxjs';

export interface WatchLagOptions {
  /** How often the clock is looked at, ms. @default 250 */
  readonly periodMs?: number;
  /** Lateness that counts as falling behind, ms. @default 1000 */
  readonly thresholdMs?: number;
  /** @default asyncScheduler */
  readonly scheduler?: SchedulerLike;
  /** Behind by `lagMs` (once per episode), then caught up again (lagMs 0). */
  readonly onLag: (lagMs: number) => void;
}

/**
 * Watches whether processing falls behind: ingestion, the pipeline and the log run on one thread, so a
 * tick that comes late by more than the threshold means messages waited that long in the socket's
 * buffer (none is dropped; they are processed late).
 */
export function watchLag(options: WatchLagOptions): Subscription {
  const periodMs = options.periodMs ?? 250;
  const thresholdMs = options.thresholdMs ?? 1000;
  const scheduler = options.scheduler ?? asyncScheduler;
  let last = scheduler.now();
  let behind = false;
  return interval(periodMs, scheduler).subscribe(() => {
    const now = scheduler.now();
    const lateMs = now - last - periodMs;
    last = now;
    if (lateMs > thresholdMs && !behind) {
      behind = true;
      options.onLag(lateMs);
    } else if (behind && lateMs < thresholdMs / 2) {
      behind = false;
      options.onLag(0);
    }
  });
}
