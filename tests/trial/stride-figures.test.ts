import { describe, expect, it } from 'vitest';
import {
  CycleBuffer,
  LengthHistogram,
  cycleSd,
  emptyCycleCurve,
  foldCycle,
  histogramQuantile,
  histogramRegionProbability,
  resampleCycle,
} from '../../src/trial/stride-figures.ts';
import { strideRegionFractions } from '../../src/model/region-probability.ts';
import type { CountSpread } from '../../src/model/count-spread.ts';
import { speciesCurve } from '../../src/model/species.ts';
import { REGION_KEYS } from '../../src/model/regions.ts';
import { CYCLE_POINTS, HISTOGRAM_BIN_UM } from '../../src/trial/state.ts';

const human = speciesCurve('human');

describe('LengthHistogram and histogramQuantile', () => {
  it('is empty at first and NaN for a quantile of nothing', () => {
    const h = new LengthHistogram();
    expect(h.total).toBe(0);
    expect(histogramQuantile(h.weights, 0.5, h.lo, h.hi)).toBeNaN();
  });

  it('gives one length back, to within a bin, for a single value', () => {
    const h = new LengthHistogram();
    h.add(2.7, 1);
    expect(Math.abs(histogramQuantile(h.weights, 0.05, h.lo, h.hi) - 2.7)).toBeLessThanOrEqual(HISTOGRAM_BIN_UM);
    expect(Math.abs(histogramQuantile(h.weights, 0.95, h.lo, h.hi) - 2.7)).toBeLessThanOrEqual(HISTOGRAM_BIN_UM);
  });

  it('agrees within one bin with the time-weighted quantile of a sorted array, for many values', () => {
    // Invented lengths and weights; the reference sorts them and takes the first whose cumulative weight reaches q.
    const values = Array.from({ length: 500 }, (_, i) => 2.2 + 0.8 * ((Math.sin(i * 12.9898) * 43758.5453) % 1 + 1) / 2);
    const weights = values.map((_, i) => 0.005 + ((i * 7) % 11) / 1000);
    const h = new LengthHistogram();
    values.forEach((v, i) => h.add(v, weights[i] as number));
    const pairs = values.map((v, i) => ({ v, w: weights[i] as number })).sort((a, b) => a.v - b.v);
    const total = pairs.reduce((a, p) => a + p.w, 0);
    for (const q of [0.05, 0.25, 0.5, 0.95]) {
      let cum = 0;
      let ref = Number.NaN;
      for (const p of pairs) {
        cum += p.w;
        if (cum >= q * total) {
          ref = p.v;
          break;
        }
      }
      expect(Math.abs(histogramQuantile(h.weights, q, h.lo, h.hi) - ref)).toBeLessThanOrEqual(HISTOGRAM_BIN_UM + 1e-12);
    }
  });

  it('clears only what it touched, and puts lengths outside 0–8 µm in the end bins', () => {
    const h = new LengthHistogram();
    h.add(-1, 1);
    h.add(99, 1);
    expect([h.lo, h.hi]).toEqual([0, h.weights.length - 1]);
    h.clear();
    expect(h.weights.every((w) => w === 0)).toBe(true);
  });
});

function lognormal(relativeSd: number): CountSpread {
  return { relativeSd, shape: 'lognormal' };
}

describe('histogramRegionProbability', () => {
  it('is null when the calibration states no uncertainty or nothing was seen', () => {
    const h = new LengthHistogram();
    expect(histogramRegionProbability(human, h.weights, lognormal(0.05), h.lo, h.hi)).toBeNull();
    h.add(2.7, 1);
    expect(histogramRegionProbability(human, h.weights, lognormal(0), h.lo, h.hi)).toBeNull();
  });

  it('gives Φ(1) for the region a length lies 1 SD inside (Abramowitz & Stegun 1964, Handbook of Mathematical Functions, Table 26.1: Φ(1) = 0.8413447 — from memory)', () => {
    // An estimate above the human plateau end (2.81 µm) by a factor e^s, with s = √ln(1 + 0.05²) the log-SD of a
    // lognormal count of relative SD 5%: P(true SL ≥ 2.81) = Φ(ln(SL/2.81)/s) = Φ(1).
    const sl = human.plateauEndUm * Math.exp(Math.sqrt(Math.log(1 + 0.05 ** 2)));
    const h = new LengthHistogram();
    h.add(sl, 1);
    const p = histogramRegionProbability(human, h.weights, lognormal(0.05), h.lo, h.hi);
    const binCentre = (Math.floor(sl / HISTOGRAM_BIN_UM) + 0.5) * HISTOGRAM_BIN_UM;
    // The bin centre is at most half a bin from the length: about 0.004 in Φ at this slope.
    expect(Math.abs(binCentre - sl)).toBeLessThanOrEqual(HISTOGRAM_BIN_UM / 2);
    expect((p?.expected.descending ?? 0) + (p?.expected.no_overlap ?? 0)).toBeCloseTo(0.8413447, 2);
    expect(REGION_KEYS.reduce((a, k) => a + (p?.expected[k] ?? 0), 0)).toBeCloseTo(1, 12);
    // One length, one N: the region is all or nothing at each N, so the interval spans 0–1.
    expect([p?.low.descending, p?.high.descending]).toEqual([0, 1]);
  });

  it('agrees with the model’s strideRegionFractions on the raw samples of a stride', () => {
    // An invented stride crossing the plateau and the descending limb, 110 samples of 10 ms.
    const sl = Float64Array.from({ length: 110 }, (_, i) => 2.75 + 0.25 * Math.sin((2 * Math.PI * i) / 110) + 0.05 * Math.cos((4 * Math.PI * i) / 110));
    const durations = new Float64Array(110).fill(0.01);
    const h = new LengthHistogram();
    sl.forEach((v) => h.add(v, 0.01));
    for (const spread of [lognormal(0.02), lognormal(0.05), { relativeSd: 0.05, shape: 'length_normal' } as const]) {
      const ours = histogramRegionProbability(human, h.weights, spread, h.lo, h.hi);
      const model = strideRegionFractions(human, sl, durations, spread);
      for (const k of REGION_KEYS) {
        expect(Math.abs((ours?.expected[k] ?? 0) - model.expected[k])).toBeLessThan(2e-3);
        expect(Math.abs((ours?.low[k] ?? 0) - model.low[k])).toBeLessThan(0.02);
        expect(Math.abs((ours?.high[k] ?? 0) - model.high[k])).toBeLessThan(0.02);
      }
    }
  });
});

describe('histogramRegionProbability against the model’s interval', () => {
  it('takes the 5th and 95th percentiles at the same positions as the model, so it too holds 90 % of N', () => {
    // A fine invented stride spread evenly in log length across the plateau end: its descending-limb time moves
    // smoothly with N, so a percentile taken at other positions (type 7: about 0.0523 and 0.9478) shows.
    const n = 2000;
    const sl = Float64Array.from({ length: n }, (_, i) => human.plateauEndUm * Math.exp(-0.18 + (0.36 * (i + 0.5)) / n));
    const durations = new Float64Array(n).fill(0.0005);
    const h = new LengthHistogram();
    sl.forEach((v) => h.add(v, 0.0005));
    for (const spread of [lognormal(0.05), { relativeSd: 0.05, shape: 'length_normal' } as const]) {
      const ours = histogramRegionProbability(human, h.weights, spread, h.lo, h.hi);
      const model = strideRegionFractions(human, sl, durations, spread);
      expect(Math.abs((ours?.low.descending ?? 0) - model.low.descending)).toBeLessThan(0.002);
      expect(Math.abs((ours?.high.descending ?? 0) - model.high.descending)).toBeLessThan(0.002);
    }
  });
});

describe('gait-cycle curve', () => {
  it('resamples to 101 points by linear interpolation, holding the ends', () => {
    const out = new Float64Array(CYCLE_POINTS);
    expect(resampleCycle([], [], 0, 0, 1, out)).toBe(false);
    expect(resampleCycle([0.1, 0.6], [2, 3], 2, 0, 1, out)).toBe(true);
    expect(out[0]).toBe(2);
    expect(out[10]).toBeCloseTo(2, 12);
    expect(out[35]).toBeCloseTo(2.5, 12);
    expect(out[100]).toBe(3);
  });

  it('keeps the mean and the sample SD of many strides per point (direct computation)', () => {
    const curve = emptyCycleCurve();
    const strides = [2.5, 2.62, 2.71, 2.58, 2.9];
    for (const a of strides) foldCycle(curve, new Float64Array(CYCLE_POINTS).fill(a));
    const mean = strides.reduce((x, y) => x + y, 0) / strides.length;
    const sd = Math.sqrt(strides.reduce((x, y) => x + (y - mean) ** 2, 0) / (strides.length - 1));
    expect(curve.slMeanUm[77]).toBeCloseTo(mean, 12);
    expect(cycleSd(curve)[77]).toBeCloseTo(sd, 12);
    expect(cycleSd(emptyCycleCurve())[0]).toBeNaN();
  });

  it('stops keeping a stride’s points past its bound and says so', () => {
    const b = new CycleBuffer();
    for (let i = 0; i <= CycleBuffer.MAX; i++) b.push(i, 2.7);
    expect(b.length).toBe(CycleBuffer.MAX);
    expect(b.overflow).toBe(true);
    b.clear();
    expect([b.length, b.overflow]).toEqual([0, false]);
  });
});
