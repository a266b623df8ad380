/**
 * What the dashboard shows beyond TrialState: facts owned by the command that runs the trial (where the
 * data comes from, the connection, the session log, replay progress) and by later model stages.
 * Fed as an Observable; each emission is merged field by field into the previous one, so several
 * producers can each send only their own fields. Send a field as `undefined` to clear it.
 */
import type { SarcomereRange } from '../model/plausible-sarcomere.ts';

/** 'connecting': not connected yet (first attempt, or retrying before any connection); 'reconnecting': connected once, then lost. */
export type ConnectionState = 'connecting' | 'connected' | 'reconnecting' | 'ended' | 'listening';

export interface ConnectionStatus {
  readonly state: ConnectionState;
  /** Seconds until the next attempt (connecting after a failed attempt, reconnecting). */
  readonly retryInS?: number | undefined;
  /** A short free text, e.g. the peer address or the last error. */
  readonly detail?: string | undefined;
}

export interface ReplayStatus {
  /** Fraction of the trial played, 0–1. */
  readonly progress: number;
  /** Playback speed as a multiple of real time; 'max' plays as fast as the pipeline allows. */
  readonly speed: number | 'max';
}

export interface RunStatus {
  /** The file path or URL the trial comes from; defaults to TrialState.source. */
  readonly sourceLabel?: string | undefined;
  readonly connection?: ConnectionStatus | undefined;
  /** Where the session log is being written. */
  readonly logPath?: string | undefined;
  readonly replay?: ReplayStatus | undefined;
  /** A short message for the person at the screen (e.g. "calibration applied to calf"). */
  readonly message?: string | undefined;
  /** The settings' plausible sarcomere lengths (µm): outside them a length is raised, and a typed calibration length refused. @default PLAUSIBLE_SARCOMERE_UM */
  readonly plausibleUm?: SarcomereRange | undefined;
}


/** Merges one emission into the status so far: fields present in `next` replace the previous ones. */
export function mergeStatus(previous: RunStatus, next: RunStatus): RunStatus {
  return { ...previous, ...next };
}
