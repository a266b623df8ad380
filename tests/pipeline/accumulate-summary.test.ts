import { describe, expect, it } from 'vitest';
import { from, lastValueFrom, toArray } from 'rxjs';
import { accumulateSummary } from '../../src/pipeline/accumulate-summary.ts';
import { header, sample, strike, toeOff } from '../helpers/frames.ts';
import { stageChecklist } from '../helpers/stage-checklist.ts';
import type { Batch, Frame, Sample } from '../../src/trial/records.ts';
import type { RegionKey } from '../../src/model/regions.ts';
import type { TrialState } from '../../src/trial/state.ts';
import { MAX_MARKERS_LISTED } from '../../src/trial/settings.ts';

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
  it('lists markers with their time and text, at most MAX_MARKERS_LISTED, counting them all and saying so once', async () => {
    const many: Frame[] = Array.from({ length: MAX_MARKERS_LISTED + 5 }, (_, i) => ({ kind: 'marker', tS: i / 100, marker: `m${i}`, line: i + 1 }));
    const state = await final([[{ kind: 'marker', tS: 0, marker: 'start', line: 1 }], many]);
    expect(state.frames.markers).toBe(MAX_MARKERS_LISTED + 6);
    expect(state.markers).toHaveLength(MAX_MARKERS_LISTED);
    expect(state.markers?.slice(0, 2)).toEqual([{ tS: 0, text: 'start' }, { tS: 0, text: 'm0' }]);
    expect(state.warnings.filter((w) => w.startsWith(`more than ${MAX_MARKERS_LISTED} markers`))).toHaveLength(1);
  });

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
    expect(m?.strides.at(0)?.slMinUm).toBe(2.7);
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

describe('accumulateSummary: phases, percentiles, capacity, flags', () => {
  function full(tS: number, sarcomereUm: number, strideIndex: number, extra: { velocityMmS?: number; forceLv?: number; forceTendon?: number } = {}): Sample {
    const region: RegionKey = sarcomereUm < 2.64 ? 'shallow_ascending' : sarcomereUm <= 2.81 ? 'plateau' : 'descending';
    const s = enriched(tS, sarcomereUm, region, strideIndex, 1);
    s.velocityMmS = extra.velocityMmS ?? 0;
    s.forceLv = extra.forceLv ?? Number.NaN;
    s.forceTendon = extra.forceTendon ?? Number.NaN;
    return s;
  }

  it('splits a stride at the toe-off of its side into stance and swing, each time-weighted', async () => {
    // Stride 0 from 0 to 1 s at 10 Hz; toe-off at 0.6 s. Stance holds 2.7 µm, swing 3.0 µm.
    const frames: Frame[] = [header({ muscles: { calf: { side: 'left' } } }), boundary(0, 0)];
    for (let i = 0; i < 10; i++) {
      if (i === 6) frames.push(toeOff(0.6, 'left'), toeOff(0.6, 'right'));
      frames.push(full(i / 10, i < 6 ? 2.7 : 3.0, 0, { velocityMmS: i - 4 }));
    }
    frames.push(boundary(1, 1));
    const [stride] = (await final([frames])).muscles.get('calf')?.strides ?? [];
    expect(stride?.stance).toMatchObject({ startS: 0, endS: 0.6, slMinUm: 2.7, slMaxUm: 2.7, sampleCount: 6, velocityMinMmS: -4, velocityMaxMmS: 1 });
    expect(stride?.swing).toMatchObject({ startS: 0.6, endS: 1, slMinUm: 3.0, slMaxUm: 3.0, sampleCount: 4, velocityMinMmS: 2, velocityMaxMmS: 5 });
    expect(stride?.stance?.regionFraction.plateau).toBeCloseTo(1, 12);
    expect(stride?.swing?.regionFraction.descending).toBeCloseTo(1, 12);
    expect(stride?.stance?.gapS).toBeCloseTo(0, 12);
    expect(stride?.swing?.gapS).toBeCloseTo(0, 12);
    expect(stride?.slMeanUm).toBeCloseTo(0.6 * 2.7 + 0.4 * 3.0, 12);
    expect(stride).toMatchObject({ velocityMinMmS: -4, velocityMaxMmS: 5, segmentation: 'events', flagged: false });
    expect(stride?.excursionUm).toBeCloseTo(0.3, 12);
  });

  it('gives no phases to a stride with no toe-off of its side', async () => {
    const frames: Frame[] = [header({ muscles: { calf: { side: 'left' } } }), boundary(0, 0), full(0, 2.7, 0), toeOff(0.5, 'right'), full(0.5, 2.8, 0), boundary(1, 1)];
    const [stride] = (await final([frames])).muscles.get('calf')?.strides ?? [];
    expect(stride?.stance).toBeNull();
    expect(stride?.swing).toBeNull();
  });

  it('gives time-weighted 5th and 95th percentiles within one histogram bin (0.001 µm) of a sorted-array reference', async () => {
    // Invented lengths at uneven intervals inside one stride.
    const times = [0, 0.013, 0.04, 0.05, 0.09, 0.1, 0.17, 0.2, 0.23, 0.31, 0.33, 0.4, 0.52, 0.55, 0.6, 0.71, 0.8, 0.83, 0.9, 0.97];
    const lengths = [2.51, 2.903, 2.644, 2.7771, 2.59, 3.012, 2.688, 2.7, 2.5555, 2.81, 2.95, 2.62, 2.74, 2.8, 2.66, 3.1, 2.58, 2.72, 2.69, 2.87];
    const endS = 1;
    const frames: Frame[] = [boundary(0, 0), ...times.map((t, i) => full(t, lengths[i] as number, 0)), boundary(1, endS)];
    const [stride] = (await final([frames])).muscles.get('calf')?.strides ?? [];
    // Reference: each length holds until the next sample (the last until the stride's end), sorted by length;
    // the q-quantile is the first length whose cumulative time reaches q × total (common practice, no source).
    const pairs = times.map((t, i) => ({ sl: lengths[i] as number, w: (times[i + 1] ?? endS) - t })).sort((a, b) => a.sl - b.sl);
    const total = pairs.reduce((a, p) => a + p.w, 0);
    const quantile = (q: number): number => {
      let cum = 0;
      for (const p of pairs) {
        cum += p.w;
        if (cum >= q * total - 1e-12) return p.sl;
      }
      return Number.NaN;
    };
    expect(Math.abs((stride?.slP5Um ?? Number.NaN) - quantile(0.05))).toBeLessThanOrEqual(0.001 + 1e-9);
    expect(Math.abs((stride?.slP95Um ?? Number.NaN) - quantile(0.95))).toBeLessThanOrEqual(0.001 + 1e-9);
  });

  it('means the length × velocity and along-tendon capacities over the time they are known', async () => {
    const frames: Frame[] = [
      boundary(0, 0),
      full(0, 2.7, 0, { forceLv: Number.NaN, forceTendon: Number.NaN }),
      full(0.5, 2.7, 0, { forceLv: 0.8, forceTendon: 0.72 }),
      full(0.75, 2.7, 0, { forceLv: 0.4, forceTendon: 0.36 }),
      boundary(1, 1),
    ];
    const [stride] = (await final([frames])).muscles.get('calf')?.strides ?? [];
    expect(stride?.forceLvMean).toBeCloseTo((0.8 * 0.25 + 0.4 * 0.25) / 0.5, 12);
    expect(stride?.forceTendonMean).toBeCloseTo((0.72 * 0.25 + 0.36 * 0.25) / 0.5, 12);
  });

  it('flags a stride whose gap time exceeds 10% of its duration, and keeps it out of the cycle curve', async () => {
    const frames: Frame[] = [boundary(0, 0)];
    for (let i = 0; i < 10; i++) frames.push(full(i / 10, 2.7, 0));
    frames.push(boundary(1, 1));
    // Stride 1: samples to 1.5 s, then nothing until 2 s (0.4 s uncovered, 40% of the stride).
    for (let i = 0; i <= 5; i++) frames.push(full(1 + i / 10, 2.9, 1));
    frames.push(boundary(2, 2));
    const m = (await final([frames])).muscles.get('calf');
    expect(m?.strides.slice().map((s) => s.flagged)).toEqual([false, true]);
    expect(m?.cycle?.strideCount).toBe(1);
    expect(m?.cycle?.slMeanUm[50]).toBeCloseTo(2.7, 12);
  });

  it('resamples each stride to 101 points of the gait cycle and keeps the mean and SD across strides', async () => {
    // Three strides of 1 s, each a straight ramp from a to a + 0.2 µm sampled at 100 Hz.
    const starts = [2.5, 2.6, 2.8];
    const frames: Frame[] = [];
    starts.forEach((a, k) => {
      frames.push(boundary(k, k));
      for (let i = 0; i < 100; i++) frames.push(full(k + i / 100, a + (0.2 * i) / 100, k));
    });
    frames.push(boundary(3, 3));
    const m = (await final([frames])).muscles.get('calf');
    const cycle = m?.cycle;
    expect(cycle?.slMeanUm).toHaveLength(101);
    // Direct computation at 40% (a sample sits there): mean and sample SD of a + 0.08 over the three strides.
    const at40 = starts.map((a) => a + 0.08);
    const mean = at40.reduce((x, y) => x + y, 0) / 3;
    const sd = Math.sqrt(at40.reduce((x, y) => x + (y - mean) ** 2, 0) / 2);
    expect(cycle?.slMeanUm[40]).toBeCloseTo(mean, 12);
    expect(Math.sqrt((cycle?.slM2Um2[40] ?? Number.NaN) / 2)).toBeCloseTo(sd, 12);
  });
});

describe('accumulateSummary: region probabilities under calibration uncertainty', () => {
  const withSd = { species: 'human' as const, method: 'sarcomere_count' as const, sarcomeresInSeries: 20000, sarcomeresInSeriesSd: 1000 };
  const calibration = (c: typeof withSd | Omit<typeof withSd, 'sarcomeresInSeriesSd'>): Frame => ({ kind: 'calibration', muscle: 'calf', calibration: c, sarcomeresInSeries: 20000, source: 'file' });

  it('gives the latest sample’s region probabilities and per-stride expected fractions with an interval', async () => {
    const frames: Frame[] = [calibration(withSd), boundary(0, 0)];
    for (let i = 0; i < 10; i++) frames.push(enriched(i / 10, 2.95, 'descending', 0));
    frames.push(boundary(1, 1), enriched(1, 2.95, 'descending', 1));
    const m = (await final([frames])).muscles.get('calf');
    expect(m?.relativeSd).toBeCloseTo(0.05, 12);
    // 2.95 µm with a lognormal count of 5% SD (log-SD √ln 1.0025 = 0.04997): P(true SL ≥ 2.81 µm) =
    // Φ(ln(2.95/2.81)/0.04997) = Φ(0.973) ≈ 0.835 (Abramowitz & Stegun 1964, Handbook of Mathematical Functions,
    // Table 26.1: Φ(0.97) = 0.8340, Φ(0.98) = 0.8365 — from memory).
    expect(m?.spreadShape).toBe('lognormal');
    const descending = (m?.regionProbability?.descending ?? 0) + (m?.regionProbability?.no_overlap ?? 0);
    expect(descending).toBeCloseTo(0.835, 2);
    const p = m?.strides.at(0)?.regionProbability;
    expect((p?.expected.descending ?? 0) + (p?.expected.no_overlap ?? 0)).toBeCloseTo(0.835, 2);
    expect(p?.low.descending).toBe(0);
    expect(p?.high.descending).toBe(1);
  });

  it('gives none when the calibration states no uncertainty', async () => {
    const { sarcomeresInSeriesSd: _, ...noSd } = withSd;
    const m = (await final([[calibration(noSd), boundary(0, 0), enriched(0, 2.7, 'plateau', 0), boundary(1, 1)]])).muscles.get('calf');
    expect(m?.regionProbability).toBeNull();
    expect(m?.strides.at(0)?.regionProbability).toBeNull();
  });
});

describe('accumulateSummary: estimated strides', () => {
  it('takes no side from estimated boundaries and gives their strides no phases, whatever toe-offs come', async () => {
    const estimated = (index: number, tS: number): Frame => ({ kind: 'stride', muscle: 'calf', side: 'left', index, tS, segmentation: 'estimated' });
    const frames: Frame[] = [estimated(0, 0), enriched(0, 2.7, 'plateau', 0), toeOff(0.5, 'left'), enriched(0.5, 2.8, 'plateau', 0), estimated(1, 1)];
    const m = (await final([frames])).muscles.get('calf');
    expect(m?.side).toBeNull();
    expect(m?.segmentation).toBe('estimated');
    expect(m?.strides.at(0)).toMatchObject({ segmentation: 'estimated', stance: null, swing: null });
  });
});
