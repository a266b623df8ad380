import { describe, expect, it } from 'vitest';
import { limitMuscles } from '../../src/pipeline/limit-muscles.ts';
import { header, runFrames, sample } from '../helpers/frames.ts';
import { stageChecklist } from '../helpers/stage-checklist.ts';
import type { Frame } from '../../src/trial/records.ts';

stageChecklist('limitMuscles', limitMuscles);

const kinds = (frames: Frame[]): string[] => frames.map((f) => (f.kind === 'rejection' ? f.reason : f.kind));

describe('limitMuscles', () => {
  it('takes the first muscles named, up to the cap, and rejects samples of any further muscle as too_many_muscles', async () => {
    const out = await runFrames(limitMuscles({ maxMuscles: 2 }), [
      [sample(0, 'calf', 50), sample(0, 'shin', 50), sample(0, 'thigh', 50)],
      [sample(0.01, 'calf', 50), sample(0.01, 'thigh', 50), sample(0.01, 'shin', 50)],
    ]);
    expect(kinds(out)).toEqual(['sample', 'sample', 'too_many_muscles', 'sample', 'too_many_muscles', 'sample']);
    const rejection = out[2] as Extract<Frame, { kind: 'rejection' }>;
    expect(rejection.message).toContain('"thigh"');
    expect(rejection.message).toContain('at most 2 muscles');
  });

  it('counts the muscles a header declares, and rejects a header that would go past the cap whole', async () => {
    const out = await runFrames(limitMuscles({ maxMuscles: 3 }), [
      [header({ muscles: { calf: { side: 'left' }, shin: {} } }), sample(0, 'calf', 50), sample(0, 'thigh', 50)],
      [header({ muscles: { calf: {}, hip: {} } }), sample(0.01, 'hip', 50)],
    ]);
    expect(kinds(out)).toEqual(['header', 'sample', 'sample', 'too_many_muscles', 'too_many_muscles']);
  });

  it('shows a long name cut short in its message', async () => {
    const name = 'x'.repeat(100_000);
    const out = await runFrames(limitMuscles({ maxMuscles: 0 }), [[sample(0, name, 50)]]);
    const rejection = out[0] as Extract<Frame, { kind: 'rejection' }>;
    expect(rejection.message.length).toBeLessThan(400);
    expect(rejection.excerpt.length).toBeLessThanOrEqual(200);
  });
});
