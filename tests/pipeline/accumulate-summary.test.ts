import { describe, expect, it } from 'vitest';
import { from, lastValueFrom, toArray } from 'rxjs';
import { accumulateSummary } from '../../src/pipeline/accumulate-summary.ts';
import { header, sample, strike } from '../helpers/frames.ts';
import { stageChecklist } from '../helpers/stage-checklist.ts';
import type { Batch, Frame, Sample } from '../../src/records.ts';
import type { RegionKey } from '../../src/model/regions.ts';
import type { TrialState } from '../../src/state.ts';

stageChecklist('accumulateSummary', () => accumulateSummary({ source: 'test' }));

function enriched(tS: number, sarcomereUm: number, region: RegionKey, strideIndex: number, force = 1): Sample {
  const s = sample(tS, 'calf', 50);
  s.smoothMm = 50;
  s.sarcomereUm = sarcomereUm;
  s.region = region;
  s.force = force;
  s.strideIndex = strideIndex;
  return s;
}

function boundary(index: number, tS: number): Frame {
  return { kind: 'stride', muscle: 'calf', side: 'left', index, tS };
}

async function final(batches: Batch[]): Promise<TrialState> {
  const states = await lastValueFrom(from(batches).pipe(accumulateSummary({ source: 'test' }), toArray()));
  const last = states.at(-1);
  if (last === undefined) throw new Error('no state');
  return last;
}

describe('accumulateSummary', () => {
  it('emits a state at once, before any input, and marks the last one ended', async () => {
    const states = await lastValueFrom(from([] as Batch[]).pipe(accumulateSummary({ source: 'x' }), toArray()));
    expect(states).toHaveLength(2);
    expect(states[1]?.ended).toBe(true);
    expect(states[1]?.frames.received).toBe(0);
  });

  it('counts lines by kind: received, accepted, low quality, rejected by reason', async () => {
    const low = sample(0.01, 'calf', 50, { quality: 0.1 });
    low.lowQuality = true;
    const state = await final([
      [
        header(),
        sample(0, 'calf', 50),
        low,
        strike(0.02, 'left'),
        { kind: 'marker', tS: 0.03, marker: 'start', line: 9 },
        { kind: 'rejection', reason: 'not_json', message: 'x', line: 10, excerpt: '{' },
        { kind: 'rejection', reason: 'not_json', message: 'x', line: 11, excerpt: '{' },
        { kind: 'rejection', reason: 'schema', message: 'x', line: 12, excerpt: '{}' },
        { kind: 'gap', cause: 'time_jump', muscle: 'calf', fromS: 0, toS: 1 },
      ],
    ]);
    expect(state.frames).toEqual({
      received: 8,
      accepted: 2,
      lowQuality: 1,
      rejected: 3,
      rejectedByReason: { not_json: 2, schema: 1 },
      gaitEvents: 1,
      markers: 1,
      headers: 1,
    });
  });

  it('weighs regions by time, holding each sample until the next, so fractions sum to 1', async () => {
    // 0.0–0.3 s plateau, 0.3–1.0 s descending, sampled at 10 Hz; stride 0 from 0 to 1 s.
    const frames: Frame[] = [boundary(0, 0)];
    for (let i = 0; i < 10; i++) frames.push(enriched(i / 10, i < 3 ? 2.7 : 3.0, i < 3 ? 'plateau' : 'descending', 0, i < 3 ? 1 : 0.5));
    frames.push(boundary(1, 1));
    const state = await final([frames]);
    const [stride] = state.muscles.get('calf')?.strides ?? [];
    expect(stride?.regionFraction.plateau).toBeCloseTo(0.3, 12);
    expect(stride?.regionFraction.descending).toBeCloseTo(0.7, 12);
    expect(Object.values(stride?.regionFraction ?? {}).reduce((a, b) => a + b, 0)).toBeCloseTo(1, 12);
    expect(stride?.slMinUm).toBe(2.7);
    expect(stride?.slMaxUm).toBe(3.0);
    expect(stride?.slMeanUm).toBeCloseTo(0.3 * 2.7 + 0.7 * 3.0, 12);
    expect(stride?.forceMean).toBeCloseTo(0.3 * 1 + 0.7 * 0.5, 12);
    expect(stride?.gapS).toBeCloseTo(0, 12);
  });

  it('counts a hole longer than the gap threshold as gap time, not as the held value', async () => {
    const frames: Frame[] = [boundary(0, 0), enriched(0, 2.7, 'plateau', 0), enriched(0.1, 2.7, 'plateau', 0), enriched(0.9, 3.0, 'descending', 0), boundary(1, 1)];
    const state = await final([frames]);
    const [stride] = state.muscles.get('calf')?.strides ?? [];
    expect(stride?.gapS).toBeCloseTo(0.8, 12);
    expect(stride?.regionFraction.plateau).toBeCloseTo(0.5, 12);
    expect(stride?.regionFraction.descending).toBeCloseTo(0.5, 12);
  });

  it('counts the time of samples with no estimate (skipped for low quality) as gap time', async () => {
    const nothing = sample(0.1, 'calf', 50);
    nothing.strideIndex = 0;
    const frames: Frame[] = [boundary(0, 0), enriched(0, 2.7, 'plateau', 0), nothing, enriched(0.2, 2.7, 'plateau', 0), boundary(1, 0.3)];
    const [stride] = (await final([frames])).muscles.get('calf')?.strides ?? [];
    expect(stride?.gapS).toBeCloseTo(0.1, 12);
  });

  it('leaves samples before the first foot strike and the unfinished last stride out of the strides', async () => {
    const frames: Frame[] = [enriched(0, 2.0, 'shallow_ascending', -1), boundary(0, 0.5), enriched(0.5, 2.7, 'plateau', 0), boundary(1, 1), enriched(1, 3.5, 'descending', 1)];
    const m = (await final([frames])).muscles.get('calf');
    expect(m?.strides).toHaveLength(1);
    expect(m?.strides[0]?.slMinUm).toBe(2.7);
    expect(m?.current).toMatchObject({ index: 1, startS: 1, slMinUm: 3.5, slMaxUm: 3.5 });
  });

  it('is calibrated only while no muscle runs on an assumed baseline', async () => {
    const calibration = { species: 'human' as const, method: 'sarcomere_count' as const, sarcomeresInSeries: 20000 };
    const state = await final([
      [
        { kind: 'calibration', muscle: 'calf', calibration, sarcomeresInSeries: 20000, source: 'file' },
        { kind: 'calibration', muscle: 'thigh', calibration, sarcomeresInSeries: 30000, source: 'baseline' },
        { kind: 'notice', muscle: 'thigh', text: 'thigh: UNCALIBRATED' },
        { kind: 'notice', muscle: 'thigh', text: 'thigh: UNCALIBRATED' },
      ],
    ]);
    expect(state.calibrated).toBe(false);
    expect(state.muscles.get('calf')?.calibrationSource).toBe('file');
    expect(state.warnings).toEqual(['thigh: UNCALIBRATED']);
  });

  it('takes subject, trial and declared sides from the header', async () => {
    const state = await final([[header({ subject: 'demo-subject', trial: 'walk-1', muscles: { calf: { side: 'right' } } })]]);
    expect(state.subject).toBe('demo-subject');
    expect(state.muscles.get('calf')).toMatchObject({ side: 'right', sideSource: 'declared' });
  });
});
