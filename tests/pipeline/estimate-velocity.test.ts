import { describe, expect, it } from 'vitest';
import { estimateVelocity } from '../../src/pipeline/estimate-velocity.ts';
import { runFrames, sample } from '../helpers/frames.ts';
import { stageChecklist } from '../helpers/stage-checklist.ts';
import type { Sample } from '../../src/trial/records.ts';

stageChecklist('estimateVelocity', estimateVelocity);

function smoothed(tS: number, mm: number): Sample {
  const s = sample(tS, 'calf', mm);
  s.smoothMm = mm;
  return s;
}

describe('estimateVelocity', () => {
  it('has no velocity for the first sample', async () => {
    const [s] = (await runFrames(estimateVelocity(), [[smoothed(0, 50)]])) as Sample[];
    expect(s?.velocityMmS).toBeNaN();
  });

  it('is the slope of the smoothed length, lengthening positive (mm/s)', async () => {
    const out = (await runFrames(estimateVelocity(), [[smoothed(0, 50), smoothed(0.01, 50.1), smoothed(0.02, 50.05)]])) as Sample[];
    expect(out[1]?.velocityMmS).toBeCloseTo(10, 9);
    expect(out[2]?.velocityMmS).toBeCloseTo(-5, 9);
  });

  it('restarts after a sample with no estimate', async () => {
    const gap = sample(0.01, 'calf', 1);
    const out = (await runFrames(estimateVelocity(), [[smoothed(0, 50), gap, smoothed(0.02, 60)]])) as Sample[];
    expect(out[2]?.velocityMmS).toBeNaN();
  });
});
