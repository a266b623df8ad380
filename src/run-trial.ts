/** Runs one trial through the pipeline once, for any number of readers (dashboard, status lines, summary). */
import { ReplaySubject, type Observable } from 'rxjs';
import type { Batch } from './records.ts';
import type { TrialState } from './state.ts';
import { pipeline, type PipelineOptions } from './pipeline/pipeline.ts';

export interface TrialRun {
  /** The running state (same object, mutated in place), replaying the latest to late subscribers. */
  readonly state$: Observable<TrialState>;
  /** Resolves with the final state when the input ends or `stop()` is called; rejects if the input fails. */
  readonly done: Promise<TrialState>;
  /** Stops reading now (the user quit); `done` resolves with the state so far. */
  stop(): void;
}

export function runTrial(records$: Observable<Batch>, options: PipelineOptions): TrialRun {
  const state$ = new ReplaySubject<TrialState>(1);
  let latest: TrialState | null = null;
  let settle!: { resolve: (s: TrialState) => void; reject: (e: unknown) => void };
  const done = new Promise<TrialState>((resolve, reject) => {
    settle = { resolve, reject };
  });
  const subscription = records$.pipe(pipeline(options)).subscribe({
    next: (state) => {
      latest = state;
      state$.next(state);
    },
    error: (error: unknown) => {
      state$.error(error);
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
    stop: () => {
      if (subscription.closed) return;
      subscription.unsubscribe();
      state$.complete();
      // The pipeline's first state comes on subscription, so there is always one to settle with.
      if (latest !== null) settle.resolve(latest);
    },
  };
}
