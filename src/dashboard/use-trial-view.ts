/**
 * Subscribes to the pipeline's TrialState (one object, mutated in place, emitted after each batch),
 * samples it at a bounded frame rate and copies the numbers shown into React state. Unsubscribes on
 * cleanup. It only reads the state: the pipeline's pace never waits on the screen.
 */
import { useEffect, useRef, useState } from 'react';
import { asyncScheduler, auditTime, interval, Subscription, tap, type Observable, type SchedulerLike } from 'rxjs';
import type { TrialState } from '../state.ts';
import { createTracker, observeTrial, type TrialView } from './view-model.ts';

export interface TrialViewOptions {
  /** Clock and timers; a virtual-time scheduler in tests. @default asyncScheduler */
  readonly scheduler?: SchedulerLike;
  /** At most one frame per this many milliseconds (about 12 frames/s). @default 80 */
  readonly frameMs?: number;
  /** Time-based alerts and the rate are re-evaluated this often even when no state arrives. @default 250 */
  readonly tickMs?: number;
  /** While true the shown view stays as it is; the subscription, history and rates go on. @default false */
  readonly frozen?: boolean;
}

function messageOf(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}

export function useTrialView(state$: Observable<TrialState>, options: TrialViewOptions = {}): TrialView {
  const scheduler = options.scheduler ?? asyncScheduler;
  const frameMs = options.frameMs ?? 80;
  const tickMs = options.tickMs ?? 250;
  const [view, setView] = useState<TrialView>(() => observeTrial(createTracker(), null, scheduler.now()));
  const frozenNow = options.frozen ?? false;
  // Read by the subscription at each frame, so it is set as the screen renders, not an effect later.
  const frozen = useRef(frozenNow);
  frozen.current = frozenNow;
  const publishNow = useRef<() => void>(() => undefined);

  useEffect(() => {
    if (!frozenNow) publishNow.current();
  }, [frozenNow]);

  useEffect(() => {
    const tracker = createTracker();
    let latest: TrialState | null = null;
    let error: string | null = null;
    const publish = (): void => {
      const next = observeTrial(tracker, latest, scheduler.now(), error);
      if (!frozen.current) setView(next);
    };
    publishNow.current = publish;
    const subscription = new Subscription();
    subscription.add(
      state$
        .pipe(
          tap((state) => {
            latest = state;
          }),
          auditTime(frameMs, scheduler),
        )
        .subscribe({
          next: publish,
          error: (e: unknown) => {
            error = messageOf(e);
            publish();
          },
          complete: publish,
        }),
    );
    subscription.add(interval(tickMs, scheduler).subscribe(publish));
    return () => {
      publishNow.current = () => undefined;
      subscription.unsubscribe();
    };
  }, [state$, scheduler, frameMs, tickMs]);

  return view;
}
