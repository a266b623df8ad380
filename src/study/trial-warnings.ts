/**
 * What a person should know about a summarized trial before trusting its figures, read from its summary:
 * muscles on the assumed baseline (uncalibrated), muscles whose side was assumed, muscles whose strides
 * were estimated from the fascicle signal. The study table's flag columns and the progress lines of
 * `summarize` say the same, from here.
 */
import type { MuscleJson, SummaryJson } from '../output/summary-json.ts';

/** True when the muscle ran on the assumed baseline (or has no calibration at all). */
export function muscleUncalibrated(m: MuscleJson): boolean {
  return m.calibration_source === null || m.calibration_source === 'baseline';
}

/** True when the muscle's side was taken from the first foot strike seen, not declared. */
export function muscleSideAssumed(m: MuscleJson): boolean {
  return m.side_source === 'assumed';
}

/** True/false when the summary says how strides were found (summaries written before it was kept do not: null). */
export function muscleStridesEstimated(m: MuscleJson): boolean | null {
  const segmentation: unknown = Object.hasOwn(m, 'segmentation') ? m.segmentation : undefined;
  return typeof segmentation === 'string' ? segmentation !== 'events' : null;
}

/** The trial's warnings, one short text per kind, naming the muscles: e.g. ["UNCALIBRATED: calf", "side assumed: calf, thigh"]. */
export function trialWarnings(summary: SummaryJson): string[] {
  const entries = Object.entries(summary.muscles);
  const named = (test: (m: MuscleJson) => boolean | null): string =>
    entries
      .filter(([, m]) => test(m) === true)
      .map(([name]) => name)
      .join(', ');
  const warnings: string[] = [];
  for (const [label, test] of [
    ['UNCALIBRATED', muscleUncalibrated],
    ['side assumed', muscleSideAssumed],
    ['strides estimated', muscleStridesEstimated],
  ] as const) {
    const names = named(test);
    if (names !== '') warnings.push(`${label}: ${names}`);
  }
  return warnings;
}
