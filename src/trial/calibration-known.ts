import type { TrialState } from './state.ts';

/**
 * Whether the trial is calibrated, as far as is known now: false as soon as one muscle runs on the
 * assumed baseline; true once every muscle has a calibration from a file, the header or a capture;
 * null before that (no muscle yet, or a muscle whose calibration has not come: it comes with the
 * muscle's first sample, a baseline at the end of its window). Screens show nothing for null, so a
 * calibrated trial never shows UNCALIBRATED, nor an uncalibrated one "calibrated", while it starts.
 */
export function calibrationKnown(state: TrialState): boolean | null {
  let pending = state.muscles.size === 0;
  for (const m of state.muscles.values()) {
    if (m.calibrationSource === 'baseline') return false;
    if (m.calibrationSource === null) pending = true;
  }
  return pending ? null : true;
}
