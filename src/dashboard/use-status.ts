/** Subscribes to the optional status stream, merging each emission into the status so far; unsubscribes on cleanup. */
import { useEffect, useState } from 'react';
import { asyncScheduler, auditTime, scan, type Observable, type SchedulerLike } from 'rxjs';
import { mergeStatus, type DashboardStatus } from './status.ts';

export function useStatus(
  status$: Observable<DashboardStatus> | undefined,
  scheduler: SchedulerLike = asyncScheduler,
  frameMs = 80,
): DashboardStatus {
  const [status, setStatus] = useState<DashboardStatus>({});
  useEffect(() => {
    if (status$ === undefined) return undefined;
    const subscription = status$
      .pipe(scan(mergeStatus, {} as DashboardStatus), auditTime(frameMs, scheduler))
      .subscribe({ next: setStatus, error: () => undefined });
    return () => subscription.unsubscribe();
  }, [status$, scheduler, frameMs]);
  return status;
}
