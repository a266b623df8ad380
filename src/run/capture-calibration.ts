/** A reference calibration captured while running: the last seconds at the current posture, at an assumed sarcomere length. */
import type { CalibrationApplied } from '../trial/records.ts';
import type { Species } from '../model/species.ts';
import { medianSorted } from '../model/stats.ts';
import { isPlausibleSarcomereUm, PLAUSIBLE_SARCOMERE_UM, type SarcomereRange } from '../model/plausible-sarcomere.ts';

export type CaptureResult =
  | { readonly ok: true; readonly frame: CalibrationApplied; readonly fascicleMm: number; readonly spreadPercent: number; readonly json: object }
  | { readonly ok: false; readonly message: string };

/** Below this many samples a capture is refused: a median of a handful says little. */
export const MIN_CAPTURE_SAMPLES = 20;

/**
 * N = median fascicle (mm) × 1000 / assumed sarcomere length (µm): the `reference` method of the
 * calibration contract. The result carries both the frame for the running pipeline and the JSON to save.
 */
export function captureCalibration(
  muscle: string,
  species: Species,
  fascicleMm: readonly number[],
  sarcomereUm: number,
  provenance: Readonly<Record<string, unknown>> = {},
  plausible: SarcomereRange = PLAUSIBLE_SARCOMERE_UM,
): CaptureResult {
  if (!isPlausibleSarcomereUm(sarcomereUm, plausible)) {
    return { ok: false, message: `an assumed sarcomere length of ${sarcomereUm} µm is not plausible; give a value between ${plausible.min} and ${plausible.max} µm (e.g. 2.7 for a human muscle near its plateau)` };
  }
  if (fascicleMm.length < MIN_CAPTURE_SAMPLES) {
    return { ok: false, message: `${muscle}: only ${fascicleMm.length} good samples in the last seconds (at least ${MIN_CAPTURE_SAMPLES} needed); hold the posture with the probe tracking, then capture again` };
  }
  const sorted = [...fascicleMm].sort((a, b) => a - b);
  const mid = medianSorted(sorted);
  const spreadPercent = ((sorted[sorted.length - 1] as number) - (sorted[0] as number)) / mid * 100;
  const calibration = { species, method: 'reference' as const, referenceFascicleMm: mid, referenceSarcomereUm: sarcomereUm };
  const n = (mid * 1000) / sarcomereUm;
  return {
    ok: true,
    fascicleMm: mid,
    spreadPercent,
    frame: { kind: 'calibration', muscle, calibration, sarcomeresInSeries: n, source: 'runtime' },
    json: {
      muscles: {
        [muscle]: {
          species,
          method: 'reference',
          reference_fascicle_mm: mid,
          reference_sarcomere_um: sarcomereUm,
          provenance: { method: 'captured on the dashboard from the last seconds', sarcomere_lengths_um: [sarcomereUm], ...provenance },
        },
      },
    },
  };
}
