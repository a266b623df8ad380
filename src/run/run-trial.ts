/** Runs one trial through the pipeline once, for any number of readers (dashboard, status lines, summary). */
import { Observable, ReplaySubject, Subject, takeUntil } from 'rxjs';
import type { Batch } from '../trial/records.ts';
import type { TrialState } from '../trial/state.ts';
import { pipeline, type PipelineOptions } from '../pipeline/pipeline.ts';
import { RecentFascicles } from './recent-fascicles.ts';
import type { SarcomereRange } from '../model/plausible-sarcomere.ts';
import { DEFAULT_SETTINGS, plausibleSarcomereRange } from '../trial/settings.ts';

export interface TrialRun {
  /** The running state (same object, mutated in place), replaying the latest to late subscribers; it never errors. */
  readonly state$: Observable<TrialState>;
  /** Resolves with the final state when the input ends or `stop()` is called; rejects if the input fails. */
  readonly done: Promise<TrialState>;
  /**
   * Stops reading now (the user quit): the input is closed as if it had ended, so frames held inside the
   * pipeline (a baseline window) are still counted, and `done` resolves with the state so far.
   */
  stop(): void;
  /** Puts frames into the pipeline's input between two batches: markers, calibrations captured while running. */
  inject(batch: Batch): void;
  /** The state as of now (the pipeline gives a first one at once). */
  latest(): TrialState;
  /** The last seconds of each muscle's raw fascicle lengths (for capturing a calibration). */
  readonly recent: RecentFascicles;
  /** The settings' plausible sarcomere lengths (µm), for what the screen raises and a captured calibration accepts. */
  readonly plausibleUm: SarcomereRange;
}

export function runTrial(records$: Observable<Batch>, options: PipelineOptions): TrialRun {
  const state$ = new ReplaySubject<TrialState>(1);
  let latest: TrialState | null = null;
  let settle!: { resolve: (s: TrialState) => void; reject: (e: unknown) => void };
  const done = new Promise<TrialState>((resolve, reject) => {
    settle = { resolve, reject };
  });
  // A failure may come before anyone awaits `done` (e.g. a missing file while the dashboard loads).
  done.catch(() => undefined);
  const injected = new Subject<Batch>();
  const stopped = new Subject<void>();
  const recent = new RecentFascicles();
  // The input is the records plus whatever is injected; it ends when the records end.
  const input$ = new Observable<Batch>((subscriber) => {
    const fromUser = injected.subscribe((batch) => subscriber.next(batch));
    const fromSource = records$.subscribe({
      next: (batch) => {
        recent.record(batch);
        subscriber.next(batch);
      },
      error: (error: unknown) => subscriber.error(error),
      complete: () => subscriber.complete(),
    });
    return () => {
      fromUser.unsubscribe();
      fromSource.unsubscribe();
    };
  });
  const subscription = input$.pipe(takeUntil(stopped), pipeline(options)).subscribe({
    next: (state) => {
      latest = state;
      state$.next(state);
    },
    error: (error: unknown) => {
      // Readers of the state (the dashboard) just see it end; the failure is told once, through `done`.
      state$.complete();
      settle.reject(error);
    },
    complete: () => {
      state$.complete();
      if (latest !== null) settle.resolve(latest);
      else settle.reject(new Error('the pipeline ended without a state'));
    },
  });
  return {
    state$: state$.asObservable(),
    done,
    recent,
    plausibleUm: plausibleSarcomereRange(options.settings ?? DEFAULT_SETTINGS),
    latest: () => latest as TrialState,
    inject: (batch) => {
      if (!subscription.closed) injected.next(batch);
    },
    stop: () => {
      stopped.next();
    },
  };
}
