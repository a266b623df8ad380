import { defer, map, type OperatorFunction } from 'rxjs';
import type { Batch } from '../trial/records.ts';

/**
 * A stage that keeps state across batches (per muscle, mostly) and passes each batch on at once:
 * `create` runs once per subscription and gives the function that turns one batch into the next, so two
 * subscriptions never share state. (A stage that must hold frames back is a holdingStage.)
 */
export function statefulStage(create: () => (batch: Batch) => Batch): OperatorFunction<Batch, Batch> {
  return (source) => defer(() => source.pipe(map(create())));
}
