/** The whole pipeline, in the data's order. Live and replay both run exactly this. */
import type { OperatorFunction } from 'rxjs';
import type { Batch, Side } from '../trial/records.ts';
import type { CalibrationSpec } from '../model/calibration.ts';
import type { TrialState } from '../trial/state.ts';
import { limitMuscles } from './limit-muscles.ts';
import { restoreGaps } from './restore-gaps.ts';
import { orderPerMuscle } from './order-per-muscle.ts';
import { markGaps } from './mark-gaps.ts';
import { gateQuality } from './gate-quality.ts';
import { smoothKalman, type SmoothKalmanOptions } from './smooth-kalman.ts';
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
  readonly gapS?: number;
  readonly baselineS?: number;
  readonly smoothing?: SmoothKalmanOptions;
  /** Seconds without a foot strike of a muscle's side before its strides are estimated from its signal. @default 10 */
  readonly estimateWindowS?: number;
  /** Share of a stride that may be gap time before it is flagged and left out of the trial figures. @default 0.1 */
  readonly maxGapFraction?: number;
  /** Muscles' sides given outside the stream (a mapping's muscles, --side): they win over the stream header's. */
  readonly sides?: Readonly<Record<string, Side>>;
}

/** Validated records in, the trial's running state out (the same object, once per batch). */
export function pipeline(options: PipelineOptions): OperatorFunction<Batch, TrialState> {
  const gap = options.gapS !== undefined ? { gapS: options.gapS } : {};
  // rxjs types at most nine operators per pipe(), so the path is written as three consecutive pipes.
  return (records$) =>
    records$
      .pipe(
        // Cleaning.
        limitMuscles(),
        restoreGaps(),
        orderPerMuscle(),
        markGaps(gap),
        gateQuality(),
        smoothKalman(options.smoothing ?? {}),
      )
      .pipe(
        estimateVelocity(),
        // The muscle model.
        convertSarcomere({
          ...(options.calibration !== undefined ? { calibration: options.calibration } : {}),
          ...(options.baselineS !== undefined ? { baselineS: options.baselineS } : {}),
        }),
        checkPlausibleLength(),
        evaluateForceLength(),
        evaluateCapacity(),
      )
      .pipe(
        // Strides and the summary.
        segmentStrides(options.sides !== undefined ? { sides: options.sides } : {}),
        estimateStrides(options.estimateWindowS !== undefined ? { windowS: options.estimateWindowS } : {}),
        accumulateSummary({
          source: options.source,
          ...gap,
          ...(options.maxGapFraction !== undefined ? { maxGapFraction: options.maxGapFraction } : {}),
          ...(options.sides !== undefined ? { sides: options.sides } : {}),
        }),
      );
}
