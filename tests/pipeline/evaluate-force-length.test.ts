import { describe, expect, it } from 'vitest';
import { evaluateForceLength } from '../../src/pipeline/evaluate-force-length.ts';
import { runFrames, sample } from '../helpers/frames.ts';
import { stageChecklist } from '../helpers/stage-checklist.ts';
import type { Frame, Sample } from '../../src/trial/records.ts';

stageChecklist('evaluateForceLength', evaluateForceLength);

function at(sarcomereUm: number, muscle = 'calf'): Sample {
  const s = sample(0, muscle, 50);
  s.sarcomereUm = sarcomereUm;
  return s;
}

describe('evaluateForceLength', () => {
  it('puts a human sarcomere at 2.7 µm on the plateau at full force (Walker & Schrodt 1974; Rassier, MacIntosh & Herzog 1999: plateau 2.64–2.81 µm)', async () => {
    const [s] = (await runFrames(evaluateForceLength(), [[at(2.7)]])) as Sample[];
    expect(s?.region).toBe('plateau');
    expect(s?.force).toBe(1);
  });

  it('puts a human sarcomere beyond 4.24 µm at no overlap (Rassier, MacIntosh & Herzog 1999)', async () => {
    const [s] = (await runFrames(evaluateForceLength(), [[at(4.3)]])) as Sample[];
    expect(s?.region).toBe('no_overlap');
    expect(s?.force).toBe(0);
  });

  it("follows a muscle's calibration frame to a frog curve (Gordon, Huxley & Julian 1966: zero force at 3.65 µm)", async () => {
    const frames: Frame[] = [
      { kind: 'calibration', muscle: 'calf', calibration: { species: 'frog', method: 'sarcomere_count', sarcomeresInSeries: 1 }, sarcomeresInSeries: 1, source: 'file' },
      at(3.7),
      at(3.7, 'thigh'),
    ];
    const out = (await runFrames(evaluateForceLength(), [frames])).filter((f): f is Sample => f.kind === 'sample');
    expect(out[0]?.region).toBe('no_overlap');
    expect(out[1]?.region).toBe('descending');
  });

  it('leaves samples with no sarcomere estimate without force or region', async () => {
    const [s] = (await runFrames(evaluateForceLength(), [[at(Number.NaN)]])) as Sample[];
    expect(s?.force).toBeNaN();
    expect(s?.region).toBeNull();
  });
});
