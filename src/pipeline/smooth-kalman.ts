import KalmanFilter from 'kalmanjs';
import type { OperatorFunction } from 'rxjs';
import type { Batch } from '../trial/records.ts';
import { DEFAULT_SETTINGS } from '../trial/settings.ts';
import { DEFAULT_SKIP_BELOW } from './gate-quality.ts';
import { forgetAcrossGap } from './forget-across-gap.ts';
import { statefulStage } from './stateful-stage.ts';

export interface SmoothKalmanOptions {
  /**
   * Measurement noise of a full-quality sample, mm² (variance). A sample of quality q counts with
   * variance measurementNoiseMm2 / q. @default 0.25 (0.5 mm SD)
   */
  readonly measurementNoiseMm2?: number;
  /**
   * Process noise density of the random-walk model, mm²/s; the per-sample process noise is this × dt.
   * The default gives a Kalman gain near 0.5 at 100 Hz, so a 1 Hz stride lags by about one sample
   * (10 ms) while white tracking noise is halved. @default 12.5
   */
  readonly processNoiseMm2PerS?: number;
  /** Quality below which a sample is skipped (no update, no estimate). @default 0.2 */
  readonly skipBelow?: number;
}

export const DEFAULT_MEASUREMENT_NOISE_MM2 = DEFAULT_SETTINGS.smoothing_measurement_noise_mm2;
export const DEFAULT_PROCESS_NOISE_MM2_PER_S = DEFAULT_SETTINGS.smoothing_process_noise_mm2_per_s;

interface Track {
  readonly filter: KalmanFilter;
  lastTS: number;
}

/**
 * Smooths each muscle's fascicle length with a 1-D Kalman filter (random walk). Measurement noise is
 * scaled by the sample's quality; skipped samples get NaN; a Gap restarts the filter.
 */
export function smoothKalman(options: SmoothKalmanOptions = {}): OperatorFunction<Batch, Batch> {
  const measurementNoiseMm2 = options.measurementNoiseMm2 ?? DEFAULT_MEASUREMENT_NOISE_MM2;
  const processNoiseMm2PerS = options.processNoiseMm2PerS ?? DEFAULT_PROCESS_NOISE_MM2_PER_S;
  const skipBelow = options.skipBelow ?? DEFAULT_SKIP_BELOW;
  return statefulStage(() => {
    const tracks = new Map<string, Track>();
    return (batch) => {
      for (const f of batch) {
        if (f.kind === 'gap') {
          forgetAcrossGap(tracks, f);
          continue;
        }
        if (f.kind !== 'sample') continue;
        if (f.quality < skipBelow) continue;
        let track = tracks.get(f.muscle);
        if (track === undefined) {
          track = { filter: new KalmanFilter({ R: 0, Q: measurementNoiseMm2 }), lastTS: f.tS };
          tracks.set(f.muscle, track);
        }
        const dtS = f.tS - track.lastTS;
        track.lastTS = f.tS;
        track.filter.R = processNoiseMm2PerS * dtS;
        track.filter.Q = measurementNoiseMm2 / f.quality;
        f.smoothMm = track.filter.filter(f.fascicleMm);
      }
      return batch;
    };
  });
}
