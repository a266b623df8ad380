import { describe, expect, it } from 'vitest';
import { gateQuality } from '../../src/pipeline/gate-quality.ts';
import { runFrames, sample } from '../helpers/frames.ts';
import { stageChecklist } from '../helpers/stage-checklist.ts';
import type { Sample } from '../../src/trial/records.ts';

stageChecklist('gateQuality', gateQuality);

describe('gateQuality', () => {
  it('flags samples below the weigh threshold as low quality and leaves good ones alone', async () => {
    const out = (await runFrames(gateQuality({ weighBelow: 0.5 }), [
      [sample(0, 'calf', 50, { quality: 0.9 }), sample(0.01, 'calf', 50, { quality: 0.3 }), sample(0.02, 'calf', 50, { quality: 0.05 })],
    ])) as Sample[];
    expect(out.map((s) => s.lowQuality)).toEqual([false, true, true]);
  });

  it('treats a sample with no quality (1) as good', async () => {
    const [s] = (await runFrames(gateQuality(), [[sample(0, 'calf', 50)]])) as Sample[];
    expect(s?.lowQuality).toBe(false);
  });
});
