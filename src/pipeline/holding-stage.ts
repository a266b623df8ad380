import { Observable, type OperatorFunction } from 'rxjs';
import type { Batch } from '../trial/records.ts';

/** The two moments a stage that holds frames back acts at: each batch, and the end of the input. */
export interface Holder {
  /** Frames that can go now (may be fewer or more than came in; an empty batch is not passed on). */
  process(batch: Batch): Batch;
  /** The input ended: everything still held, in order. */
  finish(): Batch;
}

/**
 * A stage that may hold frames back (a baseline window, a stride-period window) and must release them
 * all when the input ends. `create` runs once per subscription, so two subscriptions never share state.
 */
export function holdingStage(create: () => Holder): OperatorFunction<Batch, Batch> {
  return (source) =>
    new Observable<Batch>((subscriber) => {
      const holder = create();
      return source.subscribe({
        next: (batch) => {
          const out = holder.process(batch);
          if (out.length > 0) subscriber.next(out);
        },
        error: (error: unknown) => subscriber.error(error),
        complete: () => {
          const out = holder.finish();
          if (out.length > 0) subscriber.next(out);
          subscriber.complete();
        },
      });
    });
}
