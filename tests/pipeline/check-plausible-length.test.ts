import { describe, expect, it } from 'vitest';
import { checkPlausibleLength } from '../../src/pipeline/check-plausible-length.ts';
import { runFrames, sample } from '../helpers/frames.ts';
import { stageChecklist } from '../helpers/stage-checklist.ts';
import type { Sample } from '../../src/trial/records.ts';

stageChecklist('checkPlausibleLength', checkPlausibleLength);

function at(tS: number, sarcomereUm: number, muscle = 'calf'): Sample {
  const s = sample(tS, muscle, 50);
  s.sarcomereUm = sarcomereUm;
  return s;
}

describe('checkPlausibleLength', () => {
  it('passes plausible lengths without a word (1–5 µm: common practice, no source)', async () => {
    const out = await runFrames(checkPlausibleLength(), [[at(0, 2.7), at(0.01, 1), at(0.02, 5)]]);
    expect(out.map((f) => f.kind)).toEqual(['sample', 'sample', 'sample']);
  });

  it('says once per muscle when an estimate leaves the plausible range, right after that sample', async () => {
    const out = await runFrames(checkPlausibleLength(), [[at(0, 2.7), at(0.01, 0.05), at(0.02, 0.05)], [at(0.03, 7.2, 'thigh')]]);
    expect(out.map((f) => f.kind)).toEqual(['sample', 'sample', 'notice', 'sample', 'sample', 'notice']);
    const notice = out[2];
    expect(notice?.kind === 'notice' ? notice.text : '').toContain('millimetres');
  });
});
