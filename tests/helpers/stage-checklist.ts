/**
 * The checklist every pipeline stage passes: empty source, error upstream, early unsubscribe (the source
 * is unsubscribed), and no throw on odd frames. Stage-specific behaviour is tested beside each stage.
 */
import { describe, expect, it } from 'vitest';
import { EMPTY, Observable, Subject, throwError, type OperatorFunction } from 'rxjs';
import type { Batch } from '../../src/trial/records.ts';
import { sample } from './frames.ts';

export function stageChecklist<R>(name: string, makeStage: () => OperatorFunction<Batch, R>): void {
  describe(`${name} (stage checklist)`, () => {
    it('completes on an empty source', () => {
      let completed = false;
      const values: R[] = [];
      EMPTY.pipe(makeStage()).subscribe({ next: (v) => values.push(v), complete: () => (completed = true) });
      expect(completed).toBe(true);
    });

    it('passes an upstream error on', () => {
      const boom = new Error('upstream failed');
      let seen: unknown = null;
      throwError(() => boom)
        .pipe(makeStage())
        .subscribe({ error: (e: unknown) => (seen = e) });
      expect(seen).toBe(boom);
    });

    it('unsubscribes from its source when unsubscribed early', () => {
      let unsubscribed = false;
      const source = new Observable<Batch>((subscriber) => {
        subscriber.next([sample(0, 'calf', 50)]);
        return () => {
          unsubscribed = true;
        };
      });
      const sub = source.pipe(makeStage()).subscribe();
      sub.unsubscribe();
      expect(unsubscribed).toBe(true);
    });

    it('does not throw on samples with NaN, infinite or zero values', () => {
      const input = new Subject<Batch>();
      const errors: unknown[] = [];
      input.pipe(makeStage()).subscribe({ error: (e: unknown) => errors.push(e) });
      input.next([
        sample(0, 'calf', Number.NaN),
        sample(0.01, 'calf', Number.POSITIVE_INFINITY),
        sample(0.02, 'calf', 0, { quality: 0 }),
        sample(0.03, '', 50, { quality: Number.NaN }),
      ]);
      input.next([]);
      input.complete();
      expect(errors).toEqual([]);
    });
  });
}
