import { describe, expect, it } from 'vitest';
import { smoothKalman } from '../../src/pipeline/smooth-kalman.ts';
import { runFrames, sample } from '../helpers/frames.ts';
import { stageChecklist } from '../helpers/stage-checklist.ts';
import type { Frame, Sample } from '../../src/trial/records.ts';

stageChecklist('smoothKalman', smoothKalman);

/** A deterministic pseudo-random sequence (Park & Miller 1988 minimal standard generator), for test noise. */
function lcg(seed: number): () => number {
  let x = seed;
  return () => {
    x = (x * 16807) % 2147483647;
    return x / 2147483647;
  };
}

function sine(rateHz: number, seconds: number, noiseMm: number): Sample[] {
  const rnd = lcg(7);
  return Array.from({ length: rateHz * seconds }, (_, i) => {
    const tS = i / rateHz;
    const truth = 50 + 8 * Math.sin(2 * Math.PI * 1 * tS);
    return sample(tS, 'calf', truth + noiseMm * (rnd() - 0.5) * 2 * Math.sqrt(3));
  });
}

describe('smoothKalman', () => {
  it('starts at the first measurement', async () => {
    const [s] = (await runFrames(smoothKalman(), [[sample(0, 'calf', 42)]])) as Sample[];
    expect(s?.smoothMm).toBe(42);
  });

  it('tracks a 1 Hz stride at 100 Hz with little lag and less noise than the raw signal', async () => {
    const input = sine(100, 5, 0.5);
    const out = (await runFrames(smoothKalman(), [input])) as Sample[];
    let rawErr = 0;
    let smoothErr = 0;
    let lagErr = 0;
    for (const s of out.slice(100)) {
      const truth = 50 + 8 * Math.sin(2 * Math.PI * s.tS);
      rawErr += (s.fascicleMm - truth) ** 2;
      smoothErr += (s.smoothMm - truth) ** 2;
      // What a 20 ms lag would cost: the smoothed signal must beat it.
      lagErr += (50 + 8 * Math.sin(2 * Math.PI * (s.tS - 0.02)) - truth) ** 2;
    }
    expect(smoothErr).toBeLessThan(rawErr);
    expect(smoothErr).toBeLessThan(lagErr);
  });

  it('gives skipped (very low quality) samples no estimate and does not let them move the filter', async () => {
    const out = (await runFrames(smoothKalman({ skipBelow: 0.2 }), [
      [sample(0, 'calf', 50), sample(0.01, 'calf', 90, { quality: 0.05 }), sample(0.02, 'calf', 50)],
    ])) as Sample[];
    expect(out[1]?.smoothMm).toBeNaN();
    expect(out[2]?.smoothMm).toBeCloseTo(50, 6);
  });

  it('weighs a low-quality outlier less than a full-quality one', async () => {
    const run = async (quality: number) =>
      ((await runFrames(smoothKalman(), [[sample(0, 'calf', 50), sample(0.01, 'calf', 60, { quality })]])) as Sample[])[1]?.smoothMm ?? NaN;
    expect(await run(0.3)).toBeLessThan(await run(1));
  });

  it('restarts after a gap instead of carrying the old value across', async () => {
    const frames: Frame[] = [sample(0, 'calf', 50), { kind: 'gap', cause: 'time_jump', muscle: 'calf', fromS: 0, toS: 5 }, sample(5, 'calf', 70)];
    const out = (await runFrames(smoothKalman(), [frames])).filter((f): f is Sample => f.kind === 'sample');
    expect(out[1]?.smoothMm).toBe(70);
  });

  it('keeps muscles apart', async () => {
    const out = (await runFrames(smoothKalman(), [[sample(0, 'calf', 50), sample(0, 'thigh', 90)]])) as Sample[];
    expect(out.map((s) => s.smoothMm)).toEqual([50, 90]);
  });
});
