/**
 * The dashboard's frames from the pipeline's TrialState (one object, mutated in place, emitted after each
 * batch) and the optional status stream: at most one frame per frameMs however many batches and status
 * emissions arrive, so the screen is drawn once per frame. When nothing arrives for tickMs, a frame is
 * made anyway, so time-based alerts and the rate keep moving. A frame that would draw the same screen as
 * the last one given is not given (see same-screen.ts): an ended trial, or a stream that has stopped
 * with no alert counting the seconds, costs the screen nothing once what it shows has settled. Each
 * frame is plain data (numbers copied out of the state), so it can be drawn on another thread. It only
 * reads the state: the pipeline's pace never waits on the screen. Never completes by itself: an ended
 * trial's screen stays up.
 */
import { asyncScheduler, interval, Observable, Subscription, type SchedulerLike } from 'rxjs';
import type { TrialState } from '../../trial/state.ts';
import { mergeStatus, type RunStatus } from '../../trial/run-status.ts';
import { sameScreen } from './same-screen.ts';
import { createTracker, observeTrial, type TrialView } from './view-model.ts';

export interface TrialFrame {
  readonly view: TrialView;
  readonly status: RunStatus;
}

export interface TrialFramesOptions {
  /** Clock and timers; a virtual-time scheduler in tests. @default asyncScheduler */
  readonly scheduler?: SchedulerLike;
  /** At most one frame per this many milliseconds (about 12 frames/s). @default 80 */
  readonly frameMs?: number;
  /** With nothing new for this long, a frame is made anyway (time-based alerts, the rate), and given if it changes the screen. @default 250 */
  readonly tickMs?: number;
}

export const NO_STATUS: RunStatus = {};

/** The frame shown before anything has arrived. */
export function firstFrame(nowMs: number): TrialFrame {
  return { view: observeTrial(createTracker(), null, nowMs), status: NO_STATUS };
}

function messageOf(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}

export function trialFrames(
  state$: Observable<TrialState>,
  status$: Observable<RunStatus> | undefined,
  options: TrialFramesOptions = {},
): Observable<TrialFrame> {
  const scheduler = options.scheduler ?? asyncScheduler;
  const frameMs = options.frameMs ?? 80;
  const tickMs = options.tickMs ?? 250;
  return new Observable<TrialFrame>((subscriber) => {
    const tracker = createTracker();
    let latest: TrialState | null = null;
    let error: string | null = null;
    let status = NO_STATUS;
    let lastPublishMs = Number.NEGATIVE_INFINITY;
    /** The last frame given: the next is given only when it changes the screen. */
    let given: TrialFrame | null = null;
    const subscription = new Subscription();
    let pending: Subscription | null = null;
    let lastNewsMs = Number.NEGATIVE_INFINITY;
    /** The frame interval has passed while news was still arriving: the next news is drawn at once. */
    let due = false;
    const publish = (): void => {
      pending?.unsubscribe();
      pending = null;
      due = false;
      lastPublishMs = scheduler.now();
      const frame: TrialFrame = { view: observeTrial(tracker, latest, lastPublishMs, error), status };
      if (given !== null && sameScreen(given, frame)) return;
      given = frame;
      subscriber.next(frame);
    };
    // The first news after a frame waits frameMs, and everything arriving meanwhile joins it. While news
    // keeps coming, the frame is drawn just after the next one, in the quiet before the one after (a
    // frame drawn at a random moment would make the news arriving during it wait); without news for
    // quietMs it is drawn anyway.
    const quietMs = frameMs / 4;
    const deadline = (): void => {
      pending = null;
      if (scheduler.now() - lastNewsMs >= quietMs) {
        publish();
        return;
      }
      due = true;
      pending = scheduler.schedule(deadline, quietMs);
    };
    const soon = (): void => {
      lastNewsMs = scheduler.now();
      if (due) {
        pending?.unsubscribe();
        due = false;
        pending = scheduler.schedule(publish, 0);
      } else if (pending === null) {
        pending = scheduler.schedule(deadline, frameMs);
      }
    };
    subscription.add(
      state$.subscribe({
        next: (state) => {
          latest = state;
          soon();
        },
        error: (e: unknown) => {
          error = messageOf(e);
          publish();
        },
        complete: publish,
      }),
    );
    if (status$ !== undefined) {
      subscription.add(
        status$.subscribe({
          next: (next) => {
            status = mergeStatus(status, next);
            soon();
          },
          // A failing status stream leaves the status as it was; the trial goes on.
          error: () => undefined,
        }),
      );
    }
    subscription.add(
      interval(tickMs, scheduler).subscribe(() => {
        if (pending === null && scheduler.now() - lastPublishMs >= tickMs) publish();
      }),
    );
    return () => {
      pending?.unsubscribe();
      subscription.unsubscribe();
    };
  });
}
