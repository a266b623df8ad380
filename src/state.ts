/**
 * The running state of one trial: what the dashboard reads and what the summary is written from.
 * Built by the accumulateSummary stage, mutated in place once per batch, never copied per sample.
 */
import type { RegionKey } from './model/regions.ts';
import type { ForceLengthCurve } from './model/geometry.ts';
import type { Species } from './model/species.ts';
import type { RejectReason } from './reasons.ts';
import type { Sample, Side } from './records.ts';

export interface FrameCounts {
  /** Every line or message seen, valid or not. */
  received: number;
  /** Samples that passed validation, low-quality ones included. */
  accepted: number;
  /** Accepted samples the quality gate weighed down or skipped. */
  lowQuality: number;
  /** Lines or messages rejected, with a reason. */
  rejected: number;
  rejectedByReason: Partial<Record<RejectReason, number>>;
  gaitEvents: number;
  markers: number;
  headers: number;
}

/** Figures of one completed stride of one muscle (time-weighted; zero-order hold between samples). */
export interface StrideSummary {
  readonly index: number;
  readonly startS: number;
  readonly endS: number;
  readonly slMinUm: number;
  readonly slMaxUm: number;
  readonly slMeanUm: number;
  /** Time-weighted fraction of the stride in each region; sums to 1 over the covered time. */
  readonly regionFraction: Readonly<Record<RegionKey, number>>;
  readonly forceMean: number;
  /** Seconds of the stride not covered by samples (dropouts, gaps). */
  readonly gapS: number;
  readonly sampleCount: number;
}

/** Where the muscle's sarcomeres-in-series came from. */
export type CalibrationSource = 'file' | 'header' | 'baseline' | 'runtime';

export interface MuscleState {
  readonly name: string;
  side: Side | null;
  /** How the side was found; 'assumed' when taken from the first foot strike seen. */
  sideSource: 'declared' | 'assumed' | null;
  species: Species;
  curve: ForceLengthCurve;
  /** NaN until known (an uncalibrated muscle learns it from its baseline window). */
  sarcomeresInSeries: number;
  calibrationSource: CalibrationSource | null;
  /** The newest fully enriched sample; the dashboard reads its fields. */
  latest: Sample | null;
  /** Running figures of the stride in progress (null before the first foot strike). */
  current: { readonly index: number; readonly startS: number; slMinUm: number; slMaxUm: number } | null;
  /** Completed strides, in order. */
  readonly strides: StrideSummary[];
}

export interface TrialState {
  readonly source: string;
  subject: string | null;
  trial: string | null;
  /** True when every muscle seen has a calibration from a file or the header. */
  calibrated: boolean;
  readonly frames: FrameCounts;
  readonly muscles: Map<string, MuscleState>;
  /** Things a person should know, said once each (side assumed, uncalibrated baseline used, …). */
  readonly warnings: string[];
  /** Device time of the newest record. */
  lastTS: number;
  /** Device time of the first record. */
  firstTS: number;
  ended: boolean;
}

export function emptyFrameCounts(): FrameCounts {
  return { received: 0, accepted: 0, lowQuality: 0, rejected: 0, rejectedByReason: {}, gaitEvents: 0, markers: 0, headers: 0 };
}
