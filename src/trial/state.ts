/**
 * The running state of one trial: what the dashboard reads and what the summary is written from.
 * Built by the accumulateSummary stage, mutated in place once per batch, never copied per sample.
 */
import type { StrideListView } from './stride-list.ts';
import type { Segmentation } from './stride-summary.ts';
import type { RegionKey } from '../model/regions.ts';
import type { ForceLengthCurve } from '../model/geometry.ts';
import type { Species } from '../model/species.ts';
import type { CountSpread, SpreadShape } from '../model/count-spread.ts';
import type { CalibrationProvenance, MuscleCalibration } from '../model/calibration.ts';
import type { CurveShape } from '../model/muscle-model.ts';
import type { RejectReason } from './reasons.ts';
import type { Sample, Side } from './records.ts';

export type { RegionProbabilityFigures, SegmentFigures, Segmentation, StrideSummary } from './stride-summary.ts';

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

/** Points of the gait-cycle curve: 0, 1, …, 100% of the stride (a convention of gait analysis). */
export const CYCLE_POINTS = 101;

/**
 * Sarcomere length over the gait cycle across the unflagged strides, as running sums (Welford): each
 * stride resampled to CYCLE_POINTS points, folded in when it closes.
 */
export interface CycleCurve {
  /** Strides folded in. */
  strideCount: number;
  readonly slMeanUm: Float64Array;
  /** Sum of squared deviations from the running mean, per point; SD = sqrt(m2 / (count − 1)). */
  readonly slM2Um2: Float64Array;
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
  /** The calibration's method (null until known). */
  calibrationMethod?: MuscleCalibration['method'] | null;
  /** Where the calibration came from, when it says. */
  provenance?: CalibrationProvenance | null;
  /** Which curve gives the force (absent: geometric). */
  shape?: CurveShape;
  /** λ of the activation-dependent optimal length; 0 (or absent) when off. */
  activationShift?: number;
  /** The calibration's activation for samples that carry none; NaN (or absent) when it gives none. */
  activation?: number;
  /** Samples of the muscle that carried their own activation. */
  activationSamples?: number;
  /** The newest fully enriched sample; the dashboard reads its fields. */
  latest: Sample | null;
  /** Running figures of the stride in progress (null before the first foot strike). */
  current: { readonly index: number; readonly startS: number; slMinUm: number; slMaxUm: number } | null;
  /** Completed strides, in order. */
  /** Completed strides, in order: compact columns (see src/trial/stride-list.ts); a plain array in hand-made states. */
  readonly strides: StrideListView;
  /** How the strides were found; null (or absent) while none has started. */
  segmentation?: Segmentation | null;
  /** SD of the sarcomere count relative to the count, from the calibration; 0 when it states none. */
  relativeSd?: number;
  /** How that uncertainty is distributed (src/model/count-spread.ts); lognormal when absent. */
  spreadShape?: SpreadShape;
  /** The latest sample's probability of each region (calibration uncertainty); null when there is none. */
  regionProbability?: Record<RegionKey, number> | null;
  /** Sarcomere length over the gait cycle (mean and spread across unflagged strides). */
  cycle?: CycleCurve;
  /** Trial-wide bounded accumulations for the summary's percentiles and probabilities. */
  trialHistograms?: TrialHistograms;
}

/**
 * Time-weighted sarcomere-length histograms of the unflagged strides (whole stride, stance, swing), merged
 * as each stride closes: the trial's percentiles and region probabilities come from them. Bins of
 * HISTOGRAM_BIN_UM from 0 to HISTOGRAM_MAX_UM; lengths outside go to the end bins.
 */
export interface TrialHistograms {
  readonly stride: Float64Array;
  readonly stance: Float64Array;
  readonly swing: Float64Array;
}

export const HISTOGRAM_BIN_UM = 0.001;
export const HISTOGRAM_MAX_UM = 8;
export const HISTOGRAM_BINS = Math.round(HISTOGRAM_MAX_UM / HISTOGRAM_BIN_UM);

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
  /** The trial's markers, in order, at most MAX_MARKERS_LISTED (absent in states made by hand: none). */
  readonly markers?: TrialMarker[];
  /** Device time of the newest record. */
  lastTS: number;
  /** Device time of the first record. */
  firstTS: number;
  ended: boolean;
}

/** A marker placed in the trial: its device time and its text. */
export interface TrialMarker {
  readonly tS: number;
  readonly text: string;
}

export function emptyFrameCounts(): FrameCounts {
  return { received: 0, accepted: 0, lowQuality: 0, rejected: 0, rejectedByReason: {}, gaitEvents: 0, markers: 0, headers: 0 };
}

/** A muscle's calibration spread, as its state keeps it. */
export function spreadOf(m: Pick<MuscleState, 'relativeSd' | 'spreadShape'>): CountSpread {
  return { relativeSd: m.relativeSd ?? 0, shape: m.spreadShape ?? 'lognormal' };
}
