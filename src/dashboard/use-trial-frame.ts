/**
 * The frame on screen: subscribes to a stream of frames (see trial-frames.ts) and shows the newest one,
 * except while frozen, when the shown frame stays as it is and the newest is kept for the release.
 * Unsubscribes on cleanup. `useTrialFrame` builds the frames from the pipeline's state on this thread.
 */
import { useEffect, useMemo, useRef, useState } from 'react';
import { asyncScheduler, type Observable } from 'rxjs';
import type { TrialState } from '../state.ts';
import type { DashboardStatus } from './status.ts';
import { firstFrame, trialFrames, type TrialFrame, type TrialFramesOptions } from './trial-frames.ts';

export type { TrialFrame } from './trial-frames.ts';

export interface TrialFrameOptions extends TrialFramesOptions {
  /** While true the shown frame stays as it is; the subscriptions, history and rates go on. @default false */
  readonly frozen?: boolean;
}

export function useFrames(frames$: Observable<TrialFrame>, frozen: boolean, initial: () => TrialFrame): TrialFrame {
  const [shown, setShown] = useState<TrialFrame>(initial);
  // Read by the subscription at each frame, so it is set as the screen renders, not an effect later.
  const frozenRef = useRef(frozen);
  frozenRef.current = frozen;
  const newest = useRef<TrialFrame | null>(null);

  useEffect(() => {
    if (!frozen && newest.current !== null) setShown(newest.current);
  }, [frozen]);

  useEffect(() => {
    const subscription = frames$.subscribe((frame) => {
      newest.current = frame;
      if (!frozenRef.current) setShown(frame);
    });
    return () => subscription.unsubscribe();
  }, [frames$]);

  return shown;
}

export function useTrialFrame(
  state$: Observable<TrialState>,
  status$: Observable<DashboardStatus> | undefined,
  options: TrialFrameOptions = {},
): TrialFrame {
  const scheduler = options.scheduler ?? asyncScheduler;
  const { frameMs, tickMs } = options;
  const frames$ = useMemo(
    () =>
      trialFrames(state$, status$, {
        scheduler,
        ...(frameMs === undefined ? {} : { frameMs }),
        ...(tickMs === undefined ? {} : { tickMs }),
      }),
    [state$, status$, scheduler, frameMs, tickMs],
  );
  return useFrames(frames$, options.frozen ?? false, () => firstFrame(scheduler.now()));
}
