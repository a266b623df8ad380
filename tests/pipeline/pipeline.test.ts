/**
 * The replay path end to end on generated trials (src/sim): a trial file written to a temporary folder,
 * read by fileSource, run by runTrial through the whole pipeline, written by summaryJson; then compared
 * with the generator's ground truth. The trials are invented (the generator's own scenarios).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileSource } from '../../adapters/file-source.ts';
import { runTrial } from '../../src/run/run-trial.ts';
import { summaryJson, type SummaryJson } from '../../src/output/summary-json.ts';
import { createTrial, type GaitTrial } from '../../src/sim/gait-generator.ts';
import { scenarioSpec } from '../../src/sim/scenarios.ts';
import { writeNdjson } from '../../src/sim/writers.ts';
import { speciesCurve } from '../../src/model/species.ts';
import { regionAt } from '../../src/model/geometry.ts';
import { REGION_KEYS, zeroRegionRecord } from '../../src/model/regions.ts';

let dir = '';
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lengthwise-pipeline-'));
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

async function replay(trial: GaitTrial, name: string): Promise<SummaryJson> {
  const path = join(dir, name);
  const written = await writeNdjson(trial.records({ badLines: 'none' }), path);
  if (!written.ok) throw new Error(written.problem);
  return summaryJson(await runTrial(fileSource(path), { source: path }).done);
}

/** The truth's own time-weighted region fractions over [a, b), on a 1 ms grid. */
function trueFractions(trial: GaitTrial, muscle: string, a: number, b: number): Record<string, number> {
  const curve = speciesCurve('human');
  const out = zeroRegionRecord();
  const steps = Math.round((b - a) * 1000);
  for (let i = 0; i < steps; i++) out[regionAt(curve, trial.truth.trueSarcomereUm(muscle, a + (i + 0.5) / 1000))] += 1 / steps;
  return out;
}

describe('pipeline on a generated walking trial (replay path: file → runTrial → summaryJson)', () => {
  const trial = createTrial(scenarioSpec('walk', { seed: 11, durationS: 30 }));
  let summary: SummaryJson;
  beforeAll(async () => {
    summary = await replay(trial, 'walk.ndjson');
  });

  it('finds every complete stride of each muscle, from foot strike to foot strike of its side', () => {
    for (const muscle of ['calf', 'thigh']) {
      const truth = trial.truth.strides(muscle);
      const m = summary.muscles[muscle];
      expect(m?.segmentation).toBe('events');
      expect(m?.strides).toHaveLength(truth.length);
      m?.strides.forEach((s, i) => {
        expect(s.start_s).toBeCloseTo(truth[i]?.startS ?? Number.NaN, 9);
        expect(s.end_s).toBeCloseTo(truth[i]?.endS ?? Number.NaN, 9);
      });
      expect(m?.trial).toMatchObject({ stride_count: truth.length, flagged_count: 0 });
    }
  });

  it('gives each stride’s min and max sarcomere length within 0.03 µm of the truth after smoothing', () => {
    for (const muscle of ['calf', 'thigh']) {
      const truth = trial.truth.strides(muscle);
      summary.muscles[muscle]?.strides.forEach((s, i) => {
        expect(Math.abs((s.sl_min_um ?? Number.NaN) - (truth[i]?.slMinUm ?? Number.NaN))).toBeLessThan(0.03);
        expect(Math.abs((s.sl_max_um ?? Number.NaN) - (truth[i]?.slMaxUm ?? Number.NaN))).toBeLessThan(0.03);
        // Each length is written to 4 decimals (src/output/output-precision.ts): the three roundings add up to 1.5e-4 at most.
        expect(Math.abs((s.excursion_um ?? Number.NaN) - ((s.sl_max_um ?? 0) - (s.sl_min_um ?? 0)))).toBeLessThanOrEqual(1.5e-4 + 1e-12);
        expect(s.sl_p5_um ?? 0).toBeGreaterThanOrEqual(s.sl_min_um ?? Number.NaN);
        expect(s.sl_p95_um ?? 9).toBeLessThanOrEqual(s.sl_max_um ?? Number.NaN);
      });
    }
  });

  it('gives region fractions within 0.06 of the truth’s own time-weighted fractions (0.01 on average), summing to 1', () => {
    let worst = 0;
    let sumError = 0;
    let count = 0;
    for (const muscle of ['calf', 'thigh']) {
      for (const s of summary.muscles[muscle]?.strides ?? []) {
        const truth = trueFractions(trial, muscle, s.start_s, s.end_s);
        const sum = REGION_KEYS.reduce((a, k) => a + s.region_fraction[k], 0);
        // Six fractions, each written to 6 decimals: their sum is 1 within 3e-6.
        expect(Math.abs(sum - 1)).toBeLessThanOrEqual(3e-6 + 1e-12);
        for (const k of REGION_KEYS) {
          const error = Math.abs(s.region_fraction[k] - (truth[k] ?? 0));
          worst = Math.max(worst, error);
          sumError += error;
          count++;
        }
      }
    }
    expect(worst).toBeLessThan(0.06);
    expect(sumError / count).toBeLessThan(0.01);
  });

  it('splits each stride at the true toe-off, with stance and swing figures of the truth', () => {
    const toeOffs = trial.truth.toeOffs('left');
    for (const s of summary.muscles['calf']?.strides ?? []) {
      const toeOff = toeOffs.find((t) => t > s.start_s && t < s.end_s);
      expect(s.stance?.end_s).toBeCloseTo(toeOff ?? Number.NaN, 9);
      expect(s.swing?.start_s).toBeCloseTo(toeOff ?? Number.NaN, 9);
      const stanceTruth = trueFractions(trial, 'calf', s.start_s, toeOff ?? s.end_s);
      for (const k of REGION_KEYS) expect(Math.abs((s.stance?.region_fraction[k] ?? 0) - (stanceTruth[k] ?? 0))).toBeLessThan(0.06);
    }
    expect(summary.muscles['calf']?.trial.stance?.sl_mean_um).not.toBeNull();
  });

  it('means the length × velocity and along-tendon capacities per stride, below the length force along the tendon', () => {
    for (const s of summary.muscles['calf']?.strides ?? []) {
      expect(s.force_lv_mean).not.toBeNull();
      expect(s.force_tendon_mean ?? 2).toBeLessThan(s.force_lv_mean ?? Number.NaN);
      expect(s.velocity_min_mm_s ?? 0).toBeLessThan(0);
      expect(s.velocity_max_mm_s ?? 0).toBeGreaterThan(0);
    }
    expect(summary.muscles['calf']?.trial.force_lv_mean).not.toBeNull();
  });

  it('gives a gait-cycle curve of 101 points per muscle', () => {
    const cycle = summary.muscles['calf']?.cycle;
    expect(cycle?.percent).toHaveLength(101);
    expect(cycle?.sl_mean_um).toHaveLength(101);
    expect(cycle?.sl_sd_um).toHaveLength(101);
    expect(cycle?.stride_count).toBe(summary.muscles['calf']?.trial.strides_used);
  });
});

describe('pipeline with a calibration that states its uncertainty', () => {
  it('puts region probabilities with a 90% interval next to the region fractions of strides, phases and trial', async () => {
    const trial = createTrial(scenarioSpec('walk', { seed: 12, durationS: 12, header: { calibrate: [] } }));
    const path = join(dir, 'walk-uncertain.ndjson');
    const written = await writeNdjson(trial.records({ badLines: 'none' }), path);
    expect(written.ok).toBe(true);
    const calibration = {
      muscles: {
        calf: { species: 'human' as const, method: 'sarcomere_count' as const, sarcomeresInSeries: 17_500, sarcomeresInSeriesSd: 875 },
        thigh: { species: 'human' as const, method: 'sarcomere_count' as const, sarcomeresInSeries: 30_000 },
      },
    };
    const summary = summaryJson(await runTrial(fileSource(path), { source: path, calibration }).done);
    const calf = summary.muscles['calf'];
    expect(calf?.sarcomeres_in_series_relative_sd).toBeCloseTo(0.05, 12);
    for (const s of calf?.strides ?? []) {
      const sum = REGION_KEYS.reduce((a, k) => a + (s.region_probability?.[k] ?? 0), 0);
      // Six probabilities, each written to 6 decimals: their sum is 1 within 3e-6.
      expect(Math.abs(sum - 1)).toBeLessThanOrEqual(3e-6 + 1e-12);
      for (const k of REGION_KEYS) {
        const [low, high] = s.region_probability_90?.[k] ?? [null, null];
        expect(low ?? 2).toBeLessThanOrEqual(high ?? -1);
      }
      expect(s.stance?.region_probability).toBeDefined();
    }
    expect(calf?.trial.region_probability).toBeDefined();
    expect(calf?.trial.region_probability_90).toBeDefined();
    expect(summary.muscles['thigh']?.strides[0]).not.toHaveProperty('region_probability');
  });
});
