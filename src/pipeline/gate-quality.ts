import { map, type OperatorFunction } from 'rxjs';
import type { Batch } from '../trial/records.ts';

export interface GateQualityOptions {
  /** Below this tracking quality a sample is weighed down by the filter. @default 0.5 */
  readonly weighBelow?: number;
}

export const DEFAULT_WEIGH_BELOW = 0.5;
export const DEFAULT_SKIP_BELOW = 0.2;

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
