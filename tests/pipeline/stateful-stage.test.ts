import { describe, expect, it } from 'vitest';
import { statefulStage } from '../../src/pipeline/stateful-stage.ts';
import type { Batch } from '../../src/trial/records.ts';
import { runBatches, sample } from '../helpers/frames.ts';
import { stageChecklist } from '../helpers/stage-checklist.ts';

/** Stamps each sample with how many samples this subscription has seen before it. */
const countSamples = () =>
  statefulStage(() => {
    let seen = 0;
    return (batch: Batch) => {
      for (const f of batch) if (f.kind === 'sample') f.strideIndex = seen++;
      return batch;
    };
  });

stageChecklist('statefulStage', countSamples);

describe('statefulStage', () => {
  it('carries its state from batch to batch and passes each batch on at once', async () => {
    const batches = [[sample(0, 'calf', 50)], [sample(0.01, 'calf', 51), sample(0.02, 'calf', 52)]];
    const out = await runBatches(countSamples(), batches);
    expect(out).toEqual(batches);
    expect(out.flat().map((f) => (f.kind === 'sample' ? f.strideIndex : null))).toEqual([0, 1, 2]);
  });

  it('gives each subscription its own state', async () => {
    const stage = countSamples();
    const first = await runBatches(stage, [[sample(0, 'calf', 50)]]);
    const second = await runBatches(stage, [[sample(0, 'calf', 50)]]);
    expect([first, second].map((b) => (b[0]?.[0]?.kind === 'sample' ? b[0][0].strideIndex : null))).toEqual([0, 0]);
  });
});
