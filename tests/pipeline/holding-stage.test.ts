import { describe, expect, it } from 'vitest';
import { holdingStage } from '../../src/pipeline/holding-stage.ts';
import { runBatches, sample } from '../helpers/frames.ts';
import { stageChecklist } from '../helpers/stage-checklist.ts';
import type { Batch, Frame } from '../../src/trial/records.ts';

/** Holds everything until the input ends. */
const holdAll = () =>
  holdingStage(() => {
    const held: Frame[] = [];
    return {
      process: (batch: Batch) => {
        held.push(...batch);
        return [];
      },
      finish: () => held.splice(0),
    };
  });

stageChecklist('holdingStage', holdAll);

describe('holdingStage', () => {
  it('passes on nothing for an empty result, and everything held when the input ends, in order', async () => {
    const a = sample(0, 'calf', 50);
    const b = sample(0.01, 'calf', 50);
    expect(await runBatches(holdAll(), [[a], [b]])).toEqual([[a, b]]);
  });

  it('gives each subscription its own state', async () => {
    const stage = holdAll();
    const a = sample(0, 'calf', 50);
    expect(await runBatches(stage, [[a]])).toEqual([[a]]);
    expect(await runBatches(stage, [[a]])).toEqual([[a]]);
  });
});
