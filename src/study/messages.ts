/** What the study runner and its worker threads say to each other (structured-clone data only). */
import type { Settings } from '../trial/settings.ts';
import type { TrialInputs, TrialOutcome } from './summarize-trial.ts';

export interface WorkerSetup extends TrialInputs {
  /** Every processing choice, for every trial. */
  readonly settings?: Settings;
  /** Samples between two progress messages of one trial. */
  readonly progressEverySamples: number;
  /** Draw each trial's report sections too, keyed by the job's place in the study (id + 1). */
  readonly drawReport: boolean;
  /** Read each trial's input files' sizes and SHA-256 for the provenance (outcome.inputs), beside the trial. */
  readonly describeInputs?: boolean;
}

/** A trial's own files and sides (a study manifest's row); each given wins over the study's for that trial. */
export type TrialSetup = TrialInputs;

export interface JobMessage {
  readonly type: 'job';
  readonly id: number;
  readonly path: string;
  readonly trial?: TrialSetup;
}

export type WorkerMessage =
  | { readonly type: 'progress'; readonly id: number; readonly bytesRead: number; readonly samples: number }
  | { readonly type: 'done'; readonly id: number; readonly outcome: TrialOutcome };
