/** What the study runner and its worker threads say to each other (structured-clone data only). */
import type { DeviceMapping } from '../../adapters/device-mapping.ts';
import type { CalibrationSpec } from '../model/calibration.ts';
import type { Side } from '../trial/records.ts';
import type { Settings } from '../trial/settings.ts';
import type { TrialOutcome } from './summarize-trial.ts';

export interface WorkerSetup {
  /** Every processing choice, for every trial. */
  readonly settings?: Settings;
  readonly calibration?: CalibrationSpec;
  /** Trials in a device's own names, units and table layout. */
  readonly mapping?: DeviceMapping;
  /** The --events file, for every trial. */
  readonly eventsPath?: string;
  /** Muscles' sides (--side and the mapping's). */
  readonly sides?: Readonly<Record<string, Side>>;
  /** Samples between two progress messages of one trial. */
  readonly progressEverySamples: number;
  /** Draw each trial's report sections too, keyed by the job's place in the study (id + 1). */
  readonly drawReport: boolean;
  /** Read each trial's input files' sizes and SHA-256 for the provenance (outcome.inputs), beside the trial. */
  readonly describeInputs?: boolean;
}

/** A trial's own files and sides (a study manifest's row); each given wins over the study's for that trial. */
export interface TrialSetup {
  readonly calibration?: CalibrationSpec;
  readonly mapping?: DeviceMapping;
  readonly eventsPath?: string;
  readonly sides?: Readonly<Record<string, Side>>;
}

export interface JobMessage {
  readonly type: 'job';
  readonly id: number;
  readonly path: string;
  readonly trial?: TrialSetup;
}

export type WorkerMessage =
  | { readonly type: 'progress'; readonly id: number; readonly bytesRead: number; readonly samples: number }
  | { readonly type: 'done'; readonly id: number; readonly outcome: TrialOutcome };
