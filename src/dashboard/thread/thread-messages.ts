/**
 * What the main thread and the dashboard's own thread say to each other. Ink lays out and writes the
 * whole screen some 12 times a second, which takes milliseconds; on its own thread that time is not
 * taken from the pipeline, so the latency of live samples does not depend on the screen.
 */
import type { TrialFrame } from '../view/trial-frames.ts';

/** Given once, as the worker's workerData. */
export interface DashboardThreadSetup {
  readonly title: string;
  readonly color: boolean;
  /** The terminal's file descriptor, written synchronously by the dashboard's thread. */
  readonly fd: number;
  readonly columns: number;
  readonly rows: number;
  /** Standard input is a terminal, so keys are read (on the main thread) and passed on. */
  readonly keys: boolean;
  readonly can: { readonly marker: boolean; readonly speed: boolean; readonly calibrate: boolean };
}

export type ToDashboard =
  | { readonly type: 'frame'; readonly frame: TrialFrame }
  | { readonly type: 'keys'; readonly data: string }
  | { readonly type: 'resize'; readonly columns: number; readonly rows: number }
  | { readonly type: 'unmount' };

export type FromDashboard =
  /** Ink and React are loaded and the first screen is drawn: from now on frames reach the terminal as they come. */
  | { readonly type: 'shown' }
  /** The frame was taken: the next may be sent (so frames never queue up behind a slow screen). */
  | { readonly type: 'took' }
  | { readonly type: 'quit' }
  | { readonly type: 'marker'; readonly text: string }
  | { readonly type: 'speed'; readonly direction: 1 | -1 }
  | { readonly type: 'calibrate'; readonly muscle: string; readonly sarcomereUm: number }
  /** Ink has unmounted and restored the terminal. */
  | { readonly type: 'exited' };
