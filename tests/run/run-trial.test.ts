import { describe, expect, it } from 'vitest';
import { NEVER, Observable, Subject, from } from 'rxjs';
import { runTrial } from '../../src/run/run-trial.ts';
import type { Batch } from '../../src/trial/records.ts';
import { header, sample, strike } from '../helpers/frames.ts';

const calibration = { muscles: { calf: { species: 'human' as const, method: 'sarcomere_count' as const, sarcomeresInSeries: 20000 } } };

describe('runTrial', () => {
  it('resolves done with the final, ended state', async () => {
    const trial = runTrial(from([[header(), sample(0, 'calf', 54), sample(0.01, 'calf', 54)]] as Batch[]), { source: 'mem', calibration });
    const state = await trial.done;
    expect(state.ended).toBe(true);
    expect(state.frames.accepted).toBe(2);
    expect(state.muscles.get('calf')?.latest?.sarcomereUm).toBeCloseTo(2.7, 6);
  });

  it('stops on request and resolves with the state so far, unsubscribing the input', async () => {
    let unsubscribed = false;
    const input = new Observable<Batch>((subscriber) => {
      subscriber.next([sample(0, 'calf', 54)]);
      return () => {
        unsubscribed = true;
      };
    });
    const trial = runTrial(input, { source: 'mem' });
    trial.stop();
    const state = await trial.done;
    expect(unsubscribed).toBe(true);
    // Held in the uncalibrated baseline window when the user quit, and still counted.
    expect(state.frames.accepted).toBe(1);
  });

  it('rejects done with the input error', async () => {
    const input = new Subject<Batch>();
    const trial = runTrial(input, { source: 'mem' });
    input.error(new Error('disk gone'));
    await expect(trial.done).rejects.toThrow('disk gone');
  });

  it('takes injected frames between batches: a marker and a calibration captured while running', async () => {
    const input = new Subject<Batch>();
    const trial = runTrial(input, { source: 'mem', calibration });
    input.next([header({ muscles: { calf: { side: 'left' } } }), strike(0, 'left'), sample(0, 'calf', 54)]);
    trial.inject([{ kind: 'marker', tS: 0, marker: 'probe checked', line: 0 }]);
    trial.inject([
      { kind: 'calibration', muscle: 'calf', calibration: { species: 'human', method: 'sarcomere_count', sarcomeresInSeries: 27000 }, sarcomeresInSeries: 27000, source: 'runtime' },
    ]);
    input.next([sample(0.01, 'calf', 54)]);
    input.complete();
    const state = await trial.done;
    expect(state.frames.markers).toBe(1);
    expect(state.muscles.get('calf')?.latest?.sarcomereUm).toBeCloseTo(2, 6);
    expect(state.muscles.get('calf')?.calibrationSource).toBe('runtime');
  });

  it('keeps the last seconds of raw fascicle lengths per muscle', async () => {
    const input = new Subject<Batch>();
    const trial = runTrial(input, { source: 'mem' });
    const batch: Batch = [];
    for (let i = 0; i < 500; i++) batch.push(sample(i / 100, 'calf', 50 + i / 100));
    input.next(batch);
    const window = trial.recent.window('calf', 3);
    expect(window.length).toBeGreaterThanOrEqual(300);
    expect(window.length).toBeLessThanOrEqual(301);
    expect(Math.abs((window[0] ?? 0) - 52)).toBeLessThan(0.011);
    expect(window.at(-1)).toBeCloseTo(54.99, 9);
    trial.stop();
  });

  it('gives readers a first state at once, before any input', async () => {
    const trial = runTrial(NEVER, { source: 'mem' });
    let seen = 0;
    trial.state$.subscribe(() => seen++);
    expect(seen).toBe(1);
    trial.stop();
  });
});
