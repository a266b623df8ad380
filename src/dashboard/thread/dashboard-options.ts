/** What a command gives the dashboard, and what it gets back, on whichever thread the screen is drawn. */
import type { Observable, SchedulerLike } from 'rxjs';
import type { TrialState } from '../../trial/state.ts';
import type { RunStatus } from '../../trial/run-status.ts';

export interface DashboardOptions {
  readonly state$: Observable<TrialState>;
  readonly status$?: Observable<RunStatus>;
  readonly title: string;
  readonly stdout: NodeJS.WriteStream;
  readonly stdin: NodeJS.ReadStream;
  /** NO_COLOR (present and not empty) turns every colour off. */
  readonly env: NodeJS.ProcessEnv;
  /** q pressed: stop the trial and write its summary. */
  readonly onQuit: () => void;
  /** m pressed: a marker with a timestamped text. */
  readonly onMarker?: (text: string) => void;
  /** + / - in replays. */
  readonly onSpeed?: (direction: 1 | -1) => void;
  /** c pressed and a length confirmed: calibrate `muscle` from its last 3 s at `sarcomereUm`. */
  readonly onCalibrate?: (muscle: string, sarcomereUm: number) => void;
  /** Clock and timers of the display. @default asyncScheduler */
  readonly scheduler?: SchedulerLike;
  /** At most one frame per this many milliseconds. @default 80 */
  readonly frameMs?: number;
  /**
   * 'own' draws on a thread of its own, so the screen takes no time from the pipeline; it needs a real
   * terminal (a file descriptor) and falls back to 'main' without one. @default 'main'
   */
  readonly thread?: 'main' | 'own';
}

export interface DashboardHandle {
  /**
   * Settles once the screen is drawn the first time (on a thread of its own, loading Ink and React takes
   * a while), or once it has failed or ended before that: nothing should wait on a screen that will not come.
   */
  readonly shown: Promise<void>;
  unmount(): void;
  waitUntilExit(): Promise<void>;
}
