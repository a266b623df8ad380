import { describe, expect, it } from 'vitest';
import { markGaps } from '../../src/pipeline/mark-gaps.ts';
import { runFrames, sample } from '../helpers/frames.ts';
import { stageChecklist } from '../helpers/stage-checklist.ts';

stageChecklist('markGaps', markGaps);

describe('markGaps', () => {
  it('adds nothing to a steady 100 Hz stream', async () => {
    const batch = Array.from({ length: 100 }, (_, i) => sample(i / 100, 'calf', 50));
    const out = await runFrames(markGaps(), [batch]);
    expect(out).toHaveLength(100);
  });

  it('puts a time_jump gap before the first sample after a jump longer than the threshold', async () => {
    const out = await runFrames(markGaps({ gapS: 0.25 }), [[sample(0, 'calf', 50), sample(0.01, 'calf', 50)], [sample(1.5, 'calf', 50)]]);
    expect(out.map((f) => f.kind)).toEqual(['sample', 'sample', 'gap', 'sample']);
    expect(out[2]).toEqual({ kind: 'gap', cause: 'time_jump', muscle: 'calf', fromS: 0.01, toS: 1.5 });
  });

  it('watches each muscle on its own', async () => {
    const out = await runFrames(markGaps({ gapS: 0.25 }), [[sample(0, 'calf', 50), sample(0.2, 'thigh', 80), sample(0.2, 'calf', 50), sample(0.6, 'thigh', 80)]]);
    expect(out.filter((f) => f.kind === 'gap')).toEqual([{ kind: 'gap', cause: 'time_jump', muscle: 'thigh', fromS: 0.2, toS: 0.6 }]);
  });
});
