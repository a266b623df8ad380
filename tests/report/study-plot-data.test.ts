import { describe, expect, it } from 'vitest';
import { speciesCurve } from '../../src/model/species.ts';
import type { ComparisonRow, CycleRow, GroupRow } from '../../src/output/study-rows.ts';
import {
  conditionsOf,
  cyclePoints,
  differenceRows,
  GroupIndex,
  muscleCurve,
  musclesOf,
  pairsOf,
  rangeRows,
  regionShareRows,
  regionsReached,
} from '../../src/report/study-plot-data.ts';
import { symmetricTicks } from '../../src/report/study-plot-specs.ts';

function group(condition: string, muscle: string, figure: string, mean: number | null, n = 3, half = 0.1): GroupRow {
  return { condition, muscle, figure, n_subjects: n, mean, sd: n > 1 ? 0.05 : null, ci95_low: n > 1 && mean !== null ? mean - half : null, ci95_high: n > 1 && mean !== null ? mean + half : null };
}

function comparison(muscle: string, figure: string, a: string, b: string, diff: number): ComparisonRow {
  return { muscle, figure, condition_a: a, condition_b: b, n_pairs: 3, mean_diff: diff, ci95_low: diff - 0.02, ci95_high: diff + 0.02, t: 4, p: 0.03, dz: 2.3 };
}

describe('the study figures read the tables', () => {
  it('keeps the conditions and muscles in the order the tables first give them', () => {
    const groups = [group('slow', 'calf', 'sl_mean_um', 2.6), group('fast', 'calf', 'sl_mean_um', 2.5), group('slow', 'thigh', 'sl_mean_um', 2.9)];
    const cycles: CycleRow[] = [{ subject: 'mean', condition: 'uphill', trial: '', muscle: 'shin', percent: 0, sl_um: 2.4 }];
    const comparisons = [comparison('calf', 'sl_mean_um', 'slow', 'barefoot', 0.1)];
    expect(conditionsOf(groups, cycles, comparisons)).toEqual(['slow', 'fast', 'uphill', 'barefoot']);
    expect(musclesOf(groups, cycles, comparisons)).toEqual(['calf', 'thigh', 'shin']);
    expect(pairsOf([comparison('calf', 'x', 'slow', 'fast', 1), comparison('thigh', 'x', 'slow', 'fast', 1), comparison('calf', 'x', 'fast', 'uphill', 1)])).toEqual([
      'fast − slow',
      'uphill − fast',
    ]);
  });

  it("draws each condition's operating range from its group means and their intervals, leaving out conditions with none", () => {
    const index = new GroupIndex([
      group('slow', 'calf', 'sl_p5_um', 2.3),
      group('slow', 'calf', 'sl_mean_um', 2.6, 4),
      group('slow', 'calf', 'sl_p95_um', 2.9),
      group('fast', 'calf', 'sl_p5_um', 2.2, 1),
    ]);
    const rows = rangeRows(index, 'calf', ['slow', 'fast', 'uphill']);
    expect(rows.map((r) => r.condition)).toEqual(['slow', 'fast']);
    expect(rows[0]).toMatchObject({ order: 0, nSubjects: 4, p5: { mean: 2.3, low: expect.closeTo(2.2, 12), high: expect.closeTo(2.4, 12) }, mean: { mean: 2.6 }, p95: { mean: 2.9 }, min: null, max: null });
    // One subject: a mean without an interval.
    expect(rows[1]).toMatchObject({ order: 1, nSubjects: 1, p5: { mean: 2.2, low: null, high: null } });
  });

  it('gives the time in each region in percent, and the regions any condition reached', () => {
    const index = new GroupIndex([group('slow', 'calf', 'plateau_fraction', 0.25), group('slow', 'calf', 'descending_fraction', 0.75), group('slow', 'calf', 'too_short_fraction', 0)]);
    expect(regionShareRows(index, 'calf', ['slow'])).toEqual([
      { condition: 'slow', order: 0, region: 'too_short', percent: 0 },
      { condition: 'slow', order: 0, region: 'plateau', percent: 25 },
      { condition: 'slow', order: 0, region: 'descending', percent: 75 },
    ]);
    expect(regionsReached(index, 'calf', ['slow'])).toEqual(['plateau', 'descending']);
  });

  it("draws the gait-cycle curves from the tables' mean and SD rows only, mean ± SD", () => {
    const cycles: CycleRow[] = [
      { subject: 'S1', condition: 'slow', trial: 't1', muscle: 'calf', percent: 0, sl_um: 9 },
      { subject: 'mean', condition: 'slow', trial: '', muscle: 'calf', percent: 1, sl_um: 2.6 },
      { subject: 'mean', condition: 'slow', trial: '', muscle: 'calf', percent: 0, sl_um: 2.5 },
      { subject: 'sd', condition: 'slow', trial: '', muscle: 'calf', percent: 0, sl_um: 0.1 },
      { subject: 'sd', condition: 'slow', trial: '', muscle: 'calf', percent: 1, sl_um: null },
      { subject: 'mean', condition: 'slow', trial: '', muscle: 'thigh', percent: 0, sl_um: 3 },
    ];
    const points = cyclePoints(cycles, 'calf', ['slow']);
    expect(points).toHaveLength(2);
    expect(points[0]).toMatchObject({ condition: 'slow', percent: 0, meanUm: 2.5 });
    expect(points[0]?.lowUm).toBeCloseTo(2.4, 12);
    expect(points[0]?.highUm).toBeCloseTo(2.6, 12);
    // No SD (one subject): the line without a band.
    expect(points[1]).toEqual({ condition: 'slow', order: 0, percent: 1, meanUm: 2.6, lowUm: null, highUm: null });
  });

  it('draws paired differences in the unit asked for (fractions in percentage points), figures in their order, then the pairs', () => {
    const comparisons = [
      comparison('calf', 'plateau_fraction', 'slow', 'fast', 0.05),
      comparison('calf', 'sl_mean_um', 'fast', 'uphill', -0.1),
      comparison('calf', 'sl_mean_um', 'slow', 'fast', 0.1),
      comparison('thigh', 'sl_mean_um', 'slow', 'fast', 0.3),
    ];
    const pairs = ['fast − slow', 'uphill − fast'];
    const lengths = differenceRows(comparisons, 'calf', ['sl_mean_um'], pairs);
    expect(lengths.map((r) => [r.figure, r.pair, r.diff])).toEqual([
      ['sl_mean_um', 'fast − slow', 0.1],
      ['sl_mean_um', 'uphill − fast', -0.1],
    ]);
    const shares = differenceRows(comparisons, 'calf', ['plateau_fraction'], pairs, 100);
    expect(shares).toHaveLength(1);
    expect(shares[0]?.diff).toBeCloseTo(5, 12);
    expect(shares[0]?.low).toBeCloseTo(3, 12);
    expect(shares[0]?.high).toBeCloseTo(7, 12);
  });

  it("shades the regions of the muscle's one species, and none when its trials name several or an unknown one", () => {
    expect(muscleCurve([{ muscle: 'calf', species: 'frog' }], 'calf')).toEqual({ curve: speciesCurve('frog'), species: 'frog' });
    expect(muscleCurve([{ muscle: 'calf', species: 'human' }, { muscle: 'calf', species: 'frog' }], 'calf')).toBeNull();
    expect(muscleCurve([{ muscle: 'calf', species: 'axolotl' }], 'calf')).toBeNull();
  });
});

describe('symmetricTicks', () => {
  it('centres the axis on zero, holds every value, and steps by 1, 2 or 5 × 10^k', () => {
    expect(symmetricTicks([0.26, -0.12, null], 3)).toEqual({ values: [-0.3, -0.2, -0.1, 0, 0.1, 0.2, 0.3], decimals: 1 });
    expect(symmetricTicks([-22, 18], 3)).toEqual({ values: [-30, -20, -10, 0, 10, 20, 30], decimals: 0 });
    expect(symmetricTicks([0.013], 2)).toEqual({ values: [-0.02, -0.01, 0, 0.01, 0.02], decimals: 2 });
    expect(symmetricTicks([], 3)).toEqual({ values: [-1, 0, 1], decimals: 0 });
  });
});
