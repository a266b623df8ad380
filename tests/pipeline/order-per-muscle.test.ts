import { describe, expect, it } from 'vitest';
import { orderPerMuscle } from '../../src/pipeline/order-per-muscle.ts';
import { runFrames, sample, strike } from '../helpers/frames.ts';
import { stageChecklist } from '../helpers/stage-checklist.ts';

stageChecklist('orderPerMuscle', orderPerMuscle);

describe('orderPerMuscle', () => {
  it('passes one sample untouched', async () => {
    const s = sample(1, 'calf', 50);
    expect(await runFrames(orderPerMuscle(), [[s]])).toEqual([s]);
  });

  it('rejects a sample at the same time as the previous of its muscle as duplicate', async () => {
    const out = await runFrames(orderPerMuscle(), [[sample(1, 'calf', 50)], [sample(1, 'calf', 51)]]);
    expect(out.map((f) => (f.kind === 'rejection' ? f.reason : f.kind))).toEqual(['sample', 'duplicate']);
  });

  it('rejects a sample earlier than the previous of its muscle as time_not_increasing, saying both times', async () => {
    const out = await runFrames(orderPerMuscle(), [[sample(2, 'calf', 50), sample(1.5, 'calf', 50)]]);
    const rejection = out[1];
    expect(rejection?.kind).toBe('rejection');
    if (rejection?.kind !== 'rejection') return;
    expect(rejection.reason).toBe('time_not_increasing');
    expect(rejection.message).toContain('t=1.5');
    expect(rejection.message).toContain('t=2');
  });

  it('orders each muscle on its own, and lets events through whatever their time', async () => {
    const out = await runFrames(orderPerMuscle(), [
      [sample(1, 'calf', 50), sample(0.5, 'thigh', 80), strike(0.2, 'left'), sample(1.01, 'calf', 50), sample(0.51, 'thigh', 80)],
    ]);
    expect(out.every((f) => f.kind !== 'rejection')).toBe(true);
  });

  it('keeps accepting after a rejection, measured from the last accepted sample', async () => {
    const out = await runFrames(orderPerMuscle(), [[sample(2, 'calf', 50), sample(1, 'calf', 50), sample(1.5, 'calf', 50), sample(2.5, 'calf', 50)]]);
    expect(out.map((f) => f.kind)).toEqual(['sample', 'rejection', 'rejection', 'sample']);
  });
});
