import { map, type OperatorFunction } from 'rxjs';
import type { Batch } from '../trial/records.ts';
import { DEFAULT_SETTINGS } from '../trial/settings.ts';

export interface GateQualityOptions {
  /** Below this tracking quality a sample is weighed down by the filter. @default 0.5 */
  readonly weighBelow?: number;
}

/** The settings' defaults (src/trial/settings.ts): low quality below, and the quality gate. */
export const DEFAULT_WEIGH_BELOW = DEFAULT_SETTINGS.low_quality_below;
export const DEFAULT_SKIP_BELOW = DEFAULT_SETTINGS.quality_gate;

/** Flags samples whose tracking quality is low; they stay accepted (and counted) but weigh less or not at all. */
export function gateQuality(options: GateQualityOptions = {}): OperatorFunction<Batch, Batch> {
  const weighBelow = options.weighBelow ?? DEFAULT_WEIGH_BELOW;
  return map((batch) => {
    for (const f of batch) {
      if (f.kind === 'sample' && f.quality < weighBelow) f.lowQuality = true;
    }
    return batch;
  });
}
