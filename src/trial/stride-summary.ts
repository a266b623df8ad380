/** The figures of a completed stride and of its phases: what the stride list keeps and the outputs write. */
import type { RegionKey } from '../model/regions.ts';

/** Expected time fraction of each region under the calibration's uncertainty, with its 90% interval. */
export interface RegionProbabilityFigures {
  readonly expected: Readonly<Record<RegionKey, number>>;
  /** 5th percentile of each region's fraction over the distribution of the sarcomere count. */
  readonly low: Readonly<Record<RegionKey, number>>;
  /** 95th percentile. */
  readonly high: Readonly<Record<RegionKey, number>>;
}

/**
 * Figures of one stretch of a muscle's samples (a stride, or its stance or swing phase). Time-weighted
 * with a zero-order hold between samples; min/max/velocity from the samples inside the stretch.
 */
export interface SegmentFigures {
  readonly startS: number;
  readonly endS: number;
  readonly slMinUm: number;
  readonly slMaxUm: number;
  readonly slMeanUm: number;
  /** Time-weighted 5th and 95th percentiles (from a histogram of 0.001 µm bins over 0–8 µm). */
  readonly slP5Um: number;
  readonly slP95Um: number;
  /** slMaxUm − slMinUm. */
  readonly excursionUm: number;
  /** Time-weighted fraction in each region; sums to 1 over the covered time. */
  readonly regionFraction: Readonly<Record<RegionKey, number>>;
  /** null when the calibration states no uncertainty. */
  readonly regionProbability: RegionProbabilityFigures | null;
  /** Mean relative force from length alone. */
  readonly forceMean: number;
  /** Mean force capacity from length × velocity. */
  readonly forceLvMean: number;
  /** Mean length × velocity capacity along the tendon (× cos pennation). */
  readonly forceTendonMean: number;
  /** Fascicle velocity range (mm/s, lengthening positive). */
  readonly velocityMinMmS: number;
  readonly velocityMaxMmS: number;
  /** Seconds not covered by samples (dropouts, gaps). */
  readonly gapS: number;
  readonly sampleCount: number;
}

/** How a muscle's strides were found: from foot strikes, or estimated from its fascicle signal. */
export type Segmentation = 'events' | 'estimated';

/**
 * Figures of one completed stride of one muscle (time-weighted; zero-order hold between samples). The
 * fields after `sampleCount` are filled by accumulateSummary; they are optional only so that states made
 * by hand (screen tests) need not give them.
 */
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
  readonly slP5Um?: number;
  readonly slP95Um?: number;
  readonly excursionUm?: number;
  readonly regionProbability?: RegionProbabilityFigures | null;
  readonly forceLvMean?: number;
  readonly forceTendonMean?: number;
  readonly velocityMinMmS?: number;
  readonly velocityMaxMmS?: number;
  /** Gap time above the allowed share of the stride: left out of the trial figures and the cycle curve. */
  readonly flagged?: boolean;
  readonly segmentation?: Segmentation;
  /** Foot strike to toe-off of the muscle's side; null when the stride had no toe-off (or was estimated). */
  readonly stance?: SegmentFigures | null;
  /** Toe-off to the next foot strike. */
  readonly swing?: SegmentFigures | null;
}
