import { describe, expect, it } from 'vitest';
import { speciesCurve } from '../../src/model/species.ts';
import type { CycleJson, MuscleJson } from '../../src/output/summary-json.ts';
import { zeroRegionRecord } from '../../src/model/regions.ts';
import {
  curveOf,
  curvePoints,
  cycleRows,
  lengthDomain,
  regionBands,
  strideRows,
  timeAtLength,
  timeAtLengthFromCycle,
  timeAtLengthFromRegions,
  toeOffPercent,
} from '../../src/report/plot-data.ts';

const human = speciesCurve('human');
const frog = speciesCurve('frog');

function flatCycle(meanUm: number, sdUm: number | null, points = 101): CycleJson {
  return {
    percent: Array.from({ length: points }, (_, i) => i),
    sl_mean_um: Array.from({ length: points }, () => meanUm),
    sl_sd_um: Array.from({ length: points }, () => sdUm),
    stride_count: 10,
  };
}

function total(bins: readonly { percent: number }[]): number {
  return bins.reduce((n, b) => n + b.percent, 0);
}

describe('regionBands', () => {
  it('puts the human plateau at 2.64–2.81 µm (Rassier, MacIntosh & Herzog 1999, J Appl Physiol 86:1445–1457, Fig. 3)', () => {
    const plateau = regionBands(human, 0, 5).find((b) => b.region === 'plateau')!;
    expect(plateau.fromUm).toBeCloseTo(2.64, 2);
    expect(plateau.toUm).toBeCloseTo(2.81, 2);
  });

  it('puts the frog plateau at 2.05–2.2 µm (Gordon, Huxley & Julian 1966, J Physiol 184:170–192, abstract)', () => {
    const plateau = regionBands(frog, 0, 5).find((b) => b.region === 'plateau')!;
    expect(plateau.fromUm).toBeCloseTo(2.05, 6);
    expect(plateau.toUm).toBeCloseTo(2.2, 6);
  });

  it('clips to the range asked for, in order, leaving out regions outside it', () => {
    const bands = regionBands(human, 2.5, 3.0);
    expect(bands.map((b) => b.region)).toEqual(['shallow_ascending', 'plateau', 'descending']);
    expect(bands[0]!.fromUm).toBe(2.5);
    expect(bands.at(-1)!.toUm).toBe(3.0);
    for (let i = 1; i < bands.length; i++) expect(bands[i]!.fromUm).toBe(bands[i - 1]!.toUm);
    expect(regionBands(human, 3, 3)).toEqual([]);
  });
});

describe('curvePoints', () => {
  it('runs through the breakpoints with zero force outside the curve and full force on the plateau', () => {
    const points = curvePoints(human);
    expect(points[0]!.force).toBe(0);
    expect(points.at(-1)!.force).toBe(0);
    expect(points.filter((p) => p.force === 1).map((p) => p.slUm)).toEqual([human.plateauStartUm, human.plateauEndUm]);
    // Zero force where thin filaments leave the thick ones: 1.6 + 2 × 1.27 + 0.1 ≈ 4.24 µm (Rassier et al. 1999, Fig. 3).
    expect(points.at(-2)!.slUm).toBeCloseTo(4.24, 2);
  });
});

describe('curveOf', () => {
  it('uses the species preset, and the human curve with a note for a species it does not know', () => {
    expect(curveOf({ species: 'frog' })).toEqual({ curve: frog, note: null, ownFilaments: false });
    const unknown = curveOf({ species: 'newt' });
    expect(unknown.curve).toEqual(human);
    expect(unknown.note).toContain('"newt"');
  });

  it("draws a muscle's own filament lengths when the summary carries them: plateau from 2 × thin + Z-disc to that + bare zone (Gordon, Huxley & Julian 1966, J Physiol 184:170–192, Fig. 13)", () => {
    const own = curveOf({ species: 'frog', filaments: { thin_um: 0.95 } } as Pick<MuscleJson, 'species'>);
    expect(own.ownFilaments).toBe(true);
    expect(own.curve.plateauStartUm).toBeCloseTo(2 * 0.95 + 0.05, 10);
    expect(own.curve.plateauEndUm).toBeCloseTo(2 * 0.95 + 0.05 + 0.15, 10);
  });

  it('falls back to the preset, saying why, when the filament lengths make no curve', () => {
    const bad = curveOf({ species: 'human', filaments: { thick_um: 2.9, thin_um: 0.4 } } as Pick<MuscleJson, 'species'>);
    expect(bad.curve).toEqual(human);
    expect(bad.ownFilaments).toBe(false);
    expect(bad.note).toMatch(/make no curve/);
  });
});

describe('timeAtLengthFromCycle', () => {
  it('gives no bins for a cycle with no known point', () => {
    expect(timeAtLengthFromCycle(flatCycle(Number.NaN, null), human)).toEqual([]);
    expect(timeAtLengthFromCycle({ percent: [], sl_mean_um: [], sl_sd_um: [], stride_count: 0 }, human)).toEqual([]);
  });

  it('puts all the time of a cycle with no spread in the bin of its length', () => {
    const bins = timeAtLengthFromCycle(flatCycle(2.705, null), human, 0.02);
    const full = bins.filter((b) => b.percent > 0);
    expect(full).toHaveLength(1);
    expect(full[0]!.percent).toBeCloseTo(100, 10);
    expect(full[0]!.fromUm).toBeLessThanOrEqual(2.705);
    expect(full[0]!.toUm).toBeGreaterThan(2.705);
    expect(full[0]!.region).toBe('plateau');
  });

  it('spreads a point as a normal distribution: 68.27% within ±1 SD (Abramowitz & Stegun 1964, Handbook of Mathematical Functions, Table 26.1, P(1) = 0.8413; from memory)', () => {
    // Mean on a bin edge and SD a whole number of bins, so ±1 SD falls on bin edges.
    const bins = timeAtLengthFromCycle(flatCycle(2.7, 0.1), human, 0.02);
    // Only the tails beyond ±4 SD are left out: 2 × (1 − 0.99997) ≈ 0.006% (same table, from memory).
    expect(100 - total(bins)).toBeGreaterThan(0);
    expect(100 - total(bins)).toBeLessThan(0.01);
    const within = bins.filter((b) => b.fromUm >= 2.6 - 1e-9 && b.toUm <= 2.8 + 1e-9);
    expect(total(within)).toBeCloseTo(68.27, 1);
    // Symmetric about the mean.
    const below = total(bins.filter((b) => b.toUm <= 2.7 + 1e-9));
    expect(below).toBeCloseTo(50, 1);
  });

  it('weighs the two ends of the cycle (0% and 100%, the same instant) half each', () => {
    const cycle = flatCycle(2.5, null, 3);
    cycle.sl_mean_um[1] = 3.0;
    const bins = timeAtLengthFromCycle(cycle, human, 0.02).filter((b) => b.percent > 0);
    expect(bins.map((b) => Math.round(b.percent))).toEqual([50, 50]);
  });

  it('colours each bin by the region at its middle', () => {
    const bins = timeAtLengthFromCycle(flatCycle(2.7, 0.2), human, 0.02);
    for (const b of bins) {
      const mid = (b.fromUm + b.toUm) / 2;
      if (mid > human.plateauStartUm && mid < human.plateauEndUm) expect(b.region).toBe('plateau');
      if (mid > human.plateauEndUm && mid < human.descendingZeroUm) expect(b.region).toBe('descending');
    }
  });
});

describe('timeAtLengthFromRegions', () => {
  const muscle = (min: number | null, max: number | null, fractions: Partial<Record<string, number>>): Pick<MuscleJson, 'trial'> =>
    ({ trial: { sl_min_um: min, sl_max_um: max, region_fraction: { ...zeroRegionRecord(), ...fractions } } }) as unknown as Pick<MuscleJson, 'trial'>;

  it('gives each region its exact share of time, spread over the lengths it covered', () => {
    const bins = timeAtLengthFromRegions(muscle(2.5, 3.0, { shallow_ascending: 0.25, plateau: 0.5, descending: 0.25 }), human, 0.02);
    expect(bins.map((b) => b.region)).toEqual(['shallow_ascending', 'plateau', 'descending']);
    // Heights are % per 0.02 µm: height × width / 0.02 is the region's share.
    const shares = bins.map((b) => (b.percent * (b.toUm - b.fromUm)) / 0.02);
    expect(shares[0]).toBeCloseTo(25, 10);
    expect(shares[1]).toBeCloseTo(50, 10);
    expect(shares[2]).toBeCloseTo(25, 10);
  });

  it('gives nothing without a range', () => {
    expect(timeAtLengthFromRegions(muscle(null, null, { plateau: 1 }), human)).toEqual([]);
    expect(timeAtLengthFromRegions(muscle(2.7, 2.7, { plateau: 1 }), human)).toEqual([]);
  });

  it('is what timeAtLength falls back to when there is no gait-cycle curve', () => {
    const m = { ...muscle(2.5, 3.0, { plateau: 1 }), cycle: null } as Pick<MuscleJson, 'trial' | 'cycle'>;
    expect(timeAtLength(m, human).method).toBe('regions');
    expect(timeAtLength({ ...m, cycle: flatCycle(2.7, 0.05) }, human).method).toBe('cycle');
    expect(timeAtLength({ ...muscle(null, null, {}), cycle: null } as Pick<MuscleJson, 'trial' | 'cycle'>, human)).toEqual({ bins: [], method: 'none' });
  });
});

describe('cycleRows, toeOffPercent, strideRows, lengthDomain', () => {
  it('turns the cycle into mean ± SD rows, leaving out unknown points and taking an unknown SD as none', () => {
    const cycle = flatCycle(2.7, 0.1, 3);
    cycle.sl_mean_um[1] = null;
    cycle.sl_sd_um[2] = null;
    expect(cycleRows(cycle)).toEqual([
      { percent: 0, meanUm: 2.7, lowUm: 2.7 - 0.1, highUm: 2.7 + 0.1 },
      { percent: 2, meanUm: 2.7, lowUm: 2.7, highUm: 2.7 },
    ]);
    expect(cycleRows(null)).toEqual([]);
  });

  it('puts toe-off at the stance share of stride time', () => {
    const phase = (durationS: number) => ({ duration_s: durationS });
    expect(toeOffPercent({ trial: { stance: phase(6.2), swing: phase(3.8) } } as unknown as Pick<MuscleJson, 'trial'>)).toBeCloseTo(62, 10);
    expect(toeOffPercent({ trial: { stance: null, swing: null } } as unknown as Pick<MuscleJson, 'trial'>)).toBeNull();
  });

  it('keeps strides with a known range, with their flag', () => {
    const strides = [
      { index: 0, sl_min_um: 2.4, sl_max_um: 2.9, sl_mean_um: 2.6, sl_p5_um: 2.45, sl_p95_um: 2.85, flagged: false },
      { index: 1, sl_min_um: null, sl_max_um: null, sl_mean_um: null, sl_p5_um: null, sl_p95_um: null, flagged: false },
      { index: 2, sl_min_um: 2.3, sl_max_um: 2.8, sl_mean_um: null, sl_p5_um: null, sl_p95_um: null, flagged: true },
    ];
    const rows = strideRows({ strides } as unknown as Pick<MuscleJson, 'strides'>);
    expect(rows.map((r) => [r.index, r.flagged])).toEqual([
      [0, false],
      [2, true],
    ]);
  });

  it('holds everything drawn with some room, and the whole curve when nothing is known', () => {
    const [lo, hi] = lengthDomain([2.31, 2.93, null], human);
    expect(lo).toBeLessThan(2.31);
    expect(hi).toBeGreaterThan(2.93);
    expect(lengthDomain([], human)).toEqual([1.2, 4.3]);
  });
});
