/** The whole pipeline, in the data's order. Live and replay both run exactly this. */
import type { OperatorFunction } from 'rxjs';
import type { Batch, Side } from '../trial/records.ts';
import type { CalibrationSpec } from '../model/calibration.ts';
import type { TrialState } from '../trial/state.ts';
import { DEFAULT_SETTINGS, type Settings } from '../trial/settings.ts';
import { limitMuscles } from './limit-muscles.ts';
import { restoreGaps } from './restore-gaps.ts';
import { orderPerMuscle } from './order-per-muscle.ts';
import { markGaps } from './mark-gaps.ts';
import { gateQuality } from './gate-quality.ts';
import { smoothKalman } from './smooth-kalman.ts';
import { estimateVelocity } from './estimate-velocity.ts';
import { convertSarcomere } from './convert-sarcomere.ts';
import { checkPlausibleLength } from './check-plausible-length.ts';
import { evaluateForceLength } from './evaluate-force-length.ts';
import { evaluateCapacity } from './evaluate-capacity.ts';
import { segmentStrides } from './segment-strides.ts';
import { estimateStrides } from './estimate-strides.ts';
import { accumulateSummary } from './accumulate-summary.ts';

export interface PipelineOptions {
  /** File path or URL, for the summary. */
  readonly source: string;
  /** A user's calibration; wins over the stream header's. */
  readonly calibration?: CalibrationSpec;
  /** Every processing choice (a settings file's, or the defaults). @default DEFAULT_SETTINGS */
  readonly settings?: Settings;
  /** Muscles' sides given outside the stream (a mapping's muscles, --side): they win over the stream header's. */
  readonly sides?: Readonly<Record<string, Side>>;
}

/** Validated records in, the trial's running state out (the same object, once per batch). */
export function pipeline(options: PipelineOptions): OperatorFunction<Batch, TrialState> {
  const s = options.settings ?? DEFAULT_SETTINGS;
  const sides = options.sides !== undefined ? { sides: options.sides } : {};
  // rxjs types at most nine operators per pipe(), so the path is written as three consecutive pipes.
  return (records$) =>
    records$
      .pipe(
        // Cleaning.
        limitMuscles({ maxMuscles: s.max_muscles_per_trial }),
        restoreGaps(),
        orderPerMuscle(),
        markGaps({ gapS: s.gap_s }),
        gateQuality({ weighBelow: s.low_quality_below }),
        smoothKalman({
          measurementNoiseMm2: s.smoothing_measurement_noise_mm2,
          processNoiseMm2PerS: s.smoothing_process_noise_mm2_per_s,
          skipBelow: s.quality_gate,
        }),
      )
      .pipe(
        estimateVelocity(),
        // The muscle model.
        convertSarcomere({
          ...(options.calibration !== undefined ? { calibration: options.calibration } : {}),
          baselineS: s.baseline_s,
          skipBelow: s.quality_gate,
          maxHeldFrames: s.max_held_frames,
        }),
        checkPlausibleLength({ minUm: s.plausible_sarcomere_min_um, maxUm: s.plausible_sarcomere_max_um }),
        evaluateForceLength({ betweenFibreSdUm: s.between_fibre_sd_um }),
        evaluateCapacity(),
      )
      .pipe(
        // Strides and the summary.
        segmentStrides(sides),
        estimateStrides({
          windowS: s.stride_estimate_window_s,
          minPeriodS: s.stride_period_min_s,
          maxPeriodS: s.stride_period_max_s,
          maxHeldFrames: s.max_held_frames,
        }),
        accumulateSummary({ source: options.source, gapS: s.gap_s, maxGapFraction: s.stride_flag_gap_fraction, ...sides }),
      );
}
