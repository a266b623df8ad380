import { describe, expect, it } from 'vitest';
import { segmentStrides } from '../../src/pipeline/segment-strides.ts';
import { header, runFrames, sample, strike, toeOff } from '../helpers/frames.ts';
import { stageChecklist } from '../helpers/stage-checklist.ts';
import type { Sample, StrideBoundary } from '../../src/trial/records.ts';

stageChecklist('segmentStrides', segmentStrides);

describe('segmentStrides', () => {
  it('numbers strides from one foot strike of the muscle’s side to the next', async () => {
    const out = await runFrames(segmentStrides(), [
      [header({ muscles: { calf: { side: 'left' } } }), sample(0, 'calf', 50), strike(0.1, 'left'), sample(0.2, 'calf', 50), strike(0.6, 'right'), toeOff(0.7, 'left'), sample(0.8, 'calf', 50), strike(1.1, 'left'), sample(1.2, 'calf', 50)],
    ]);
    const samples = out.filter((f): f is Sample => f.kind === 'sample');
    expect(samples.map((s) => s.strideIndex)).toEqual([-1, 0, 0, 1]);
    const strides = out.filter((f): f is StrideBoundary => f.kind === 'stride');
    expect(strides.map((s) => [s.index, s.tS])).toEqual([
      [0, 0.1],
      [1, 1.1],
    ]);
    expect(out.some((f) => f.kind === 'notice')).toBe(false);
  });

  it('gives a muscle with no declared side the side of the first foot strike, with a notice', async () => {
    const out = await runFrames(segmentStrides(), [[sample(0, 'thigh', 80), strike(0.1, 'right'), strike(0.6, 'left'), sample(0.7, 'thigh', 80)]]);
    const notice = out.find((f) => f.kind === 'notice');
    expect(notice).toMatchObject({ kind: 'notice', muscle: 'thigh' });
    expect(out.filter((f) => f.kind === 'stride')).toEqual([{ kind: 'stride', muscle: 'thigh', side: 'right', index: 0, tS: 0.1 }]);
  });

  it('counts strides for a declared muscle from the first foot strike, even before its first sample', async () => {
    const out = await runFrames(segmentStrides(), [[header({ muscles: { calf: { side: 'left' } } }), strike(0, 'left'), sample(0.1, 'calf', 50)]]);
    expect((out.find((f) => f.kind === 'sample') as Sample).strideIndex).toBe(0);
  });

  it('keeps a resent header from restarting the stride count', async () => {
    const h = header({ muscles: { calf: { side: 'left' } } });
    const out = await runFrames(segmentStrides(), [[h, strike(0, 'left'), h, strike(1, 'left'), sample(1.1, 'calf', 50)]]);
    expect((out.find((f) => f.kind === 'sample') as Sample).strideIndex).toBe(1);
  });
});
