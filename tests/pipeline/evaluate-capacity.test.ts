import { describe, expect, it } from 'vitest';
import { evaluateCapacity } from '../../src/pipeline/evaluate-capacity.ts';
import { runFrames, sample } from '../helpers/frames.ts';
import { stageChecklist } from '../helpers/stage-checklist.ts';
import type { CalibrationApplied, Frame, Sample } from '../../src/trial/records.ts';
import { plateauMiddleUm } from '../../src/model/geometry.ts';
import { speciesCurve } from '../../src/model/species.ts';

stageChecklist('evaluateCapacity', evaluateCapacity);

const calibration: CalibrationApplied = {
  kind: 'calibration',
  muscle: 'calf',
  calibration: { species: 'human', method: 'sarcomere_count', sarcomeresInSeries: 20000 },
  sarcomeresInSeries: 20000,
  source: 'file',
};

/** A sample as the force–length stage leaves it (invented values). */
function onCurve(tS: number, force: number, velocityMmS: number, pennationDeg: number, muscle = 'calf'): Sample {
  const s = sample(tS, muscle, 54.5, { pennationDeg });
  s.smoothMm = 54.5;
  s.velocityMmS = velocityMmS;
  s.sarcomereUm = 2.725;
  s.force = force;
  s.region = 'plateau';
  return s;
}

describe('evaluateCapacity', () => {
  // Optimal fascicle length: 20000 sarcomeres × the human plateau middle (2.725 µm) / 1000 = 54.5 mm.
  const l0Mm = (20000 * plateauMiddleUm(speciesCurve('human'))) / 1000;

  it('normalizes velocity by the optimal fascicle length and Vmax, then applies Hill’s hyperbola', async () => {
    // −0.5 Vmax at 10 L0/s is −5 × 54.5 mm/s; F/F0 = (1 − 0.5)/(1 + 0.5/0.25) = 1/6 (Hill 1938, Proc R Soc Lond B 126:136–195).
    const s = onCurve(0, 1, -5 * l0Mm, 60);
    await runFrames(evaluateCapacity(), [[calibration, s]]);
    expect(s.forceLv).toBeCloseTo(1 / 6, 12);
    // cos 60° = 1/2 (common practice, no source): along the tendon, half of it.
    expect(s.forceTendon).toBeCloseTo(1 / 12, 12);
  });

  it('keeps the length force when isometric and scales it by the length force', async () => {
    const still = onCurve(0, 0.8, 0, 0);
    await runFrames(evaluateCapacity(), [[calibration, still]]);
    expect(still.forceLv).toBeCloseTo(0.8, 12);
    expect(still.forceTendon).toBeCloseTo(0.8, 12);
  });

  it('leaves NaN for an unknown velocity, pennation or calibration, and passes every frame on', async () => {
    const noVelocity = onCurve(0, 1, Number.NaN, 20);
    const noPennation = onCurve(0.01, 1, 0, Number.NaN);
    const uncalibrated = onCurve(0.02, 1, 0, 20, 'thigh');
    const frames: Frame[] = [calibration, noVelocity, noPennation, uncalibrated];
    const out = await runFrames(evaluateCapacity(), [frames]);
    expect(out).toEqual(frames);
    expect(noVelocity.forceLv).toBeNaN();
    expect(noPennation.forceLv).toBe(1);
    expect(noPennation.forceTendon).toBeNaN();
    expect(uncalibrated.forceLv).toBeNaN();
  });
});
