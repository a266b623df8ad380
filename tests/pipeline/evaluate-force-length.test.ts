import { describe, expect, it } from 'vitest';
import { evaluateForceLength } from '../../src/pipeline/evaluate-force-length.ts';
import { runFrames } from '../helpers/frames.ts';
import { makeSample } from '../../src/trial/records.ts';
import type { MuscleCalibration } from '../../src/model/calibration.ts';
import { stageChecklist } from '../helpers/stage-checklist.ts';
import type { Frame, Sample } from '../../src/trial/records.ts';

stageChecklist('evaluateForceLength', evaluateForceLength);

function at(sarcomereUm: number, muscle = 'calf', activation = Number.NaN): Sample {
  const s = makeSample(0, muscle, 50, Number.NaN, 1, 1, activation);
  s.sarcomereUm = sarcomereUm;
  return s;
}

function calibrated(calibration: Partial<MuscleCalibration>, muscle = 'calf'): Frame {
  const cal = { species: 'human', method: 'sarcomere_count', sarcomeresInSeries: 20_000, ...calibration } as MuscleCalibration;
  return { kind: 'calibration', muscle, calibration: cal, sarcomeresInSeries: 20_000, source: 'file' };
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

  it('moves the optimum with each sample’s activation, else the calibration’s: full force at 3.033 µm at activation 0.25 (Lloyd & Besier 2003 — from memory)', async () => {
    const frames: Frame[] = [calibrated({ activationShift: 0.15, activation: 0.25 }), at(3.033), at(3.033, 'calf', 1), at(2.726, 'calf', 0.25)];
    const out = await runFrames(evaluateForceLength(), [frames]);
    const samples = out.filter((f): f is Sample => f.kind === 'sample');
    // The calibration's 0.25 where the sample has none; the sample's own 1 (no shift) where it has one.
    expect(samples[0]?.force).toBe(1);
    expect(samples[0]?.region).toBe('descending');
    expect(samples[1]?.force).toBeCloseTo((4.241 - 3.033) / (4.241 - 2.811), 3);
    // At activation 0.25 the old optimum 2.726 µm sits where full activation puts 2.726/1.1125 = 2.450 µm: the shallow limb.
    expect(samples[2]?.force).toBeLessThan(1);
    expect(samples[2]?.region).toBe('plateau');
    const notices = out.filter((f) => f.kind === 'notice').map((f) => (f.kind === 'notice' ? f.text : ''));
    expect(notices).toEqual([expect.stringMatching(/^calf: optimal length shifts with activation \(L0\(a\) = L0·\(0.15\(1 − a\) \+ 1\), Lloyd & Besier 2003; activation 0.25 where samples carry none\)/)]);
  });

  it('ignores a sample’s activation when the shift is off', async () => {
    const [s] = (await runFrames(evaluateForceLength(), [[at(3.033, 'calf', 0.25)]])) as Sample[];
    expect(s?.force).toBeCloseTo((4.241 - 3.033) / (4.241 - 2.811), 3);
  });

  it('says, once per calibration, that a whole-muscle shape gives force where the geometry gives none', async () => {
    const out = await runFrames(evaluateForceLength(), [[calibrated({ shape: 'gaussian' }), at(4.3)]]);
    const s = out.find((f): f is Sample => f.kind === 'sample');
    expect(s?.region).toBe('no_overlap');
    expect(s?.force).toBeGreaterThan(0.4);
    expect(out.filter((f) => f.kind === 'notice')).toEqual([
      { kind: 'notice', muscle: 'calf', text: expect.stringMatching(/^calf: force from the gaussian shape, a whole-muscle curve: it gives force where the filament geometry gives none/) },
    ]);
  });

  it('leaves samples with no sarcomere estimate without force or region', async () => {
    const [s] = (await runFrames(evaluateForceLength(), [[at(Number.NaN)]])) as Sample[];
    expect(s?.force).toBeNaN();
    expect(s?.region).toBeNull();
  });
});
