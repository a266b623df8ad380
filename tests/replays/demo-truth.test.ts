/**
 * End to end: the demo replays through the tool's file reader and whole pipeline, compared with the
 * generator's exact truth (the invented trajectories, foot strikes and sarcomeres in series).
 */
import { join } from 'node:path';
import { lastValueFrom } from 'rxjs';
import { describe, expect, it } from 'vitest';
import { fileSource } from '../../adapters/file-source.ts';
import { pipeline } from '../../src/pipeline/pipeline.ts';
import { demoRunSpec, demoWalkSpec, DEMO_FILES } from '../../src/sim/demo-trials.ts';
import { createTrial, type TrialSpec } from '../../src/sim/gait-generator.ts';
import type { TrialState } from '../../src/trial/state.ts';

const REPLAYS = join(import.meta.dirname, '..', '..', 'replays');

async function play(name: string): Promise<TrialState> {
  return lastValueFrom(fileSource(join(REPLAYS, name)).pipe(pipeline({ source: name })));
}

function reasonCounts(spec: TrialSpec): Record<string, number> {
  const out: Record<string, number> = {};
  for (const b of spec.badLines) out[b.reason] = (out[b.reason] ?? 0) + 1;
  return out;
}

/** Strides of a muscle that overlap none of its dropout windows. */
function overlapsDropout(spec: TrialSpec, muscle: string, startS: number, endS: number): boolean {
  return spec.dropouts.some((d) => d.muscle === muscle && d.fromS < endS && d.toS > startS);
}

// Per-stride extremes of the smoothed estimate within 0.03 µm of the truth: about twice the noise SD
// of a single sample (0.25 mm / 17 500 ≈ 0.014 µm), a tolerance of our own for the invented scenario.
const TOLERANCE_UM = 0.03;

describe.each([
  { name: DEMO_FILES.walkNdjson, spec: demoWalkSpec() },
  { name: DEMO_FILES.runNdjson, spec: demoRunSpec() },
])('$name through the whole pipeline', ({ name, spec }) => {
  it('accepts every valid sample and rejects exactly the intended bad lines', async () => {
    const state = await play(name);
    const missing = spec.dropouts.filter((d) => d.mode === 'missing').reduce((n, d) => n + Math.round((d.toS - d.fromS) * spec.rateHz), 0);
    expect(state.frames.accepted).toBe(spec.durationS * spec.rateHz * spec.muscles.length - missing);
    expect(state.frames.rejectedByReason).toEqual(reasonCounts(spec));
    expect(state.calibrated).toBe(true);
  });

  it('finds the true strides and their sarcomere-length extremes', async () => {
    const state = await play(name);
    const truth = createTrial(spec).truth;
    for (const m of spec.muscles) {
      const muscle = state.muscles.get(m.name);
      expect(muscle?.sarcomeresInSeries).toBe(m.sarcomeresInSeries);
      expect(muscle?.side).toBe(m.side);
      const trueStrides = truth.strides(m.name);
      const strides = muscle?.strides.slice() ?? [];
      expect(strides.map((s) => s.startS)).toEqual(trueStrides.map((s) => s.startS));
      strides.forEach((s, i) => {
        const t = trueStrides[i];
        if (t === undefined || overlapsDropout(spec, m.name, s.startS, s.endS)) return;
        expect(Math.abs(s.slMinUm - t.slMinUm), `${m.name} stride ${i} min`).toBeLessThan(TOLERANCE_UM);
        expect(Math.abs(s.slMaxUm - t.slMaxUm), `${m.name} stride ${i} max`).toBeLessThan(TOLERANCE_UM);
      });
    }
  });
});
