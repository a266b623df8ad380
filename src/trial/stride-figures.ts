/**
 * The bounded, allocation-light arithmetic behind accumulateSummary: a segment accumulator (a stride or
 * one of its phases), a time-weighted length histogram for percentiles, and the gait-cycle resampling.
 * No RxJS here; every function is pure or mutates only what it is given.
 */
import { REGION_KEYS, zeroRegionRecord, type RegionKey } from '../model/regions.ts';
import type { ForceLengthCurve } from '../model/geometry.ts';
import { DEFAULT_QUANTILE_POINTS, INTERVAL_HIGH, INTERVAL_LOW, quantilePoints, regionProbabilities } from '../model/region-probability.ts';
import { regionLowerBoundsUm } from '../model/geometry.ts';
import { binnedQuantile, quantileOfMidpointsBySelection } from '../model/stats.ts';
import { lengthRatioAt, type CountSpread } from '../model/count-spread.ts';
import {
  CYCLE_POINTS,
  HISTOGRAM_BIN_UM,
  HISTOGRAM_BINS,
  type CycleCurve,
  type RegionProbabilityFigures,
  type SegmentFigures,
} from './state.ts';

const REGIONS = REGION_KEYS.length;

/** The held sample's values, credited for the time until the next sample (zero-order hold). */
export interface Held {
  slUm: number;
  force: number;
  forceLv: number;
  forceTendon: number;
  region: number;
}

/** Bin of a sarcomere length; lengths outside 0–8 µm go to the end bins. */
export function histogramBin(slUm: number): number {
  const b = Math.floor(slUm / HISTOGRAM_BIN_UM);
  return b < 0 ? 0 : b >= HISTOGRAM_BINS ? HISTOGRAM_BINS - 1 : b;
}

/** A time-weighted histogram that remembers which bins it touched, so clearing and merging stay cheap. */
export class LengthHistogram {
  readonly weights = new Float64Array(HISTOGRAM_BINS);
  lo = HISTOGRAM_BINS;
  hi = -1;
  total = 0;

  add(slUm: number, weight: number): void {
    const b = histogramBin(slUm);
    this.weights[b] = (this.weights[b] as number) + weight;
    if (b < this.lo) this.lo = b;
    if (b > this.hi) this.hi = b;
    this.total += weight;
  }

  clear(): void {
    if (this.hi >= this.lo) this.weights.fill(0, this.lo, this.hi + 1);
    this.lo = HISTOGRAM_BINS;
    this.hi = -1;
    this.total = 0;
  }

  /** Adds this histogram's touched bins into a plain bin array (a trial-wide histogram). */
  mergeInto(target: Float64Array): void {
    for (let b = this.lo; b <= this.hi; b++) target[b] = (target[b] as number) + (this.weights[b] as number);
  }
}

/**
 * Time-weighted quantile (q in 0–1) of a histogram: the length below which a fraction q of the time lies,
 * interpolated linearly inside the bin where the cumulative time crosses q (so within one bin, 0.001 µm,
 * of the exact time-weighted quantile). NaN for an empty histogram.
 */
export function histogramQuantile(weights: Float64Array, q: number, lo = 0, hi = weights.length - 1): number {
  return binnedQuantile(weights, q, HISTOGRAM_BIN_UM, lo, hi);
}

const scratch = {
  cumulative: new Float64Array(HISTOGRAM_BINS + 1),
  expected: new Float64Array(REGIONS),
  probability: new Float64Array(REGIONS),
  columns: new Float64Array(REGIONS * DEFAULT_QUANTILE_POINTS),
};

/**
 * Region fractions with their 90% interval under calibration uncertainty, from a histogram: the same
 * quantity as the model's strideRegionFractions (src/model/region-probability.ts), computed from the
 * histogram in O(bins + M) instead of O(samples × M). The expected fraction is the time-weighted mean of
 * the model's per-length probabilities at each non-empty bin's centre. For the interval, at each of the M
 * equal-probability points of N the true lengths are the estimates × r (r = SL* ÷ SL there); a region [a, b)
 * of true length then holds the time the estimate spends in [a/r, b/r), read off the cumulative histogram
 * (uniform within a bin, so within 1 nm of the exact thresholds). The 5th and 95th percentiles over the M
 * points follow, at the points' own positions (j + ½)/M.
 */
export function histogramRegionProbability(
  curve: ForceLengthCurve,
  weights: Float64Array,
  spread: CountSpread,
  lo = 0,
  hi = weights.length - 1,
  quantilePointCount: number = DEFAULT_QUANTILE_POINTS,
): RegionProbabilityFigures | null {
  if (!(spread.relativeSd > 0) || hi < lo) return null;
  const span = hi - lo + 1;
  // Scratch space shared by every call (synchronous, so never in use twice): no garbage per stride.
  const cumulative = scratch.cumulative;
  const expected = scratch.expected.fill(0);
  const p = scratch.probability;
  cumulative[0] = 0;
  for (let i = 0; i < span; i++) {
    const w = weights[lo + i] as number;
    cumulative[i + 1] = (cumulative[i] as number) + w;
    if (!(w > 0)) continue;
    regionProbabilities(curve, (lo + i + 0.5) * HISTOGRAM_BIN_UM, spread, p);
    for (let r = 0; r < REGIONS; r++) expected[r] = (expected[r] as number) + w * (p[r] as number);
  }
  const total = cumulative[span] as number;
  if (!(total > 0)) return null;
  /** Time with the estimate below x (µm). */
  const below = (x: number): number => {
    const u = x / HISTOGRAM_BIN_UM - lo;
    if (u <= 0) return 0;
    if (u >= span) return total;
    const i = Math.floor(u);
    return (cumulative[i] as number) + (weights[lo + i] as number) * (u - i);
  };
  const bounds = regionLowerBoundsUm(curve);
  const z = quantilePoints(Math.max(20, Math.floor(quantilePointCount)));
  const m = z.length;
  if (scratch.columns.length < REGIONS * m) scratch.columns = new Float64Array(REGIONS * m);
  const columns = Array.from({ length: REGIONS }, (_, r) => scratch.columns.subarray(r * m, (r + 1) * m));
  for (let j = 0; j < m; j++) {
    const ratio = lengthRatioAt(spread, z[j] as number);
    if (!(ratio > 0)) {
      // A true length of zero or less (a length-normal spread's far tail): too short.
      for (let r = 0; r < REGIONS; r++) (columns[r] as Float64Array)[j] = r === 0 ? 1 : 0;
      continue;
    }
    let previous = 0;
    for (let r = 0; r < REGIONS; r++) {
      const upper = r + 1 < REGIONS ? below((bounds[r + 1] as number) / ratio) : total;
      (columns[r] as Float64Array)[j] = (upper - previous) / total;
      previous = upper;
    }
  }
  const expectedRecord = zeroRegionRecord();
  const low = zeroRegionRecord();
  const high = zeroRegionRecord();
  for (let r = 0; r < REGIONS; r++) {
    const key = REGION_KEYS[r] as RegionKey;
    const column = columns[r] as Float64Array;
    expectedRecord[key] = (expected[r] as number) / total;
    let min = column[0] as number;
    let max = min;
    for (let j = 1; j < m; j++) {
      const x = column[j] as number;
      if (x < min) min = x;
      else if (x > max) max = x;
    }
    if (min === max) {
      // Most regions lie far from a stride's lengths: the same fraction at every N, nothing to sort.
      low[key] = min;
      high[key] = min;
      continue;
    }
    low[key] = quantileOfMidpointsBySelection(column, INTERVAL_LOW);
    high[key] = quantileOfMidpointsBySelection(column, INTERVAL_HIGH);
  }
  return { expected: expectedRecord, low, high };
}

/** Uncovered time; differences below a nanosecond are rounding of the sums, not gaps. */
function gapOf(uncoveredS: number): number {
  return uncoveredS > 1e-9 ? uncoveredS : 0;
}

/** Running figures of one segment (a stride or a phase). Reused from one stride to the next. */
export class SegmentAccumulator {
  startS = Number.NaN;
  slMinUm = Number.POSITIVE_INFINITY;
  slMaxUm = Number.NEGATIVE_INFINITY;
  velocityMinMmS = Number.POSITIVE_INFINITY;
  velocityMaxMmS = Number.NEGATIVE_INFINITY;
  slSecondsUm = 0;
  forceSeconds = 0;
  forceLvSeconds = 0;
  forceLvCoveredS = 0;
  forceTendonSeconds = 0;
  forceTendonCoveredS = 0;
  coveredS = 0;
  sampleCount = 0;
  readonly regionS = new Float64Array(REGIONS);
  readonly histogram = new LengthHistogram();

  reset(startS: number): void {
    this.startS = startS;
    this.slMinUm = Number.POSITIVE_INFINITY;
    this.slMaxUm = Number.NEGATIVE_INFINITY;
    this.velocityMinMmS = Number.POSITIVE_INFINITY;
    this.velocityMaxMmS = Number.NEGATIVE_INFINITY;
    this.slSecondsUm = 0;
    this.forceSeconds = 0;
    this.forceLvSeconds = 0;
    this.forceLvCoveredS = 0;
    this.forceTendonSeconds = 0;
    this.forceTendonCoveredS = 0;
    this.coveredS = 0;
    this.sampleCount = 0;
    this.regionS.fill(0);
    this.histogram.clear();
  }

  /** Credits the held values for dtS seconds. */
  credit(held: Held, dtS: number): void {
    this.coveredS += dtS;
    this.slSecondsUm += held.slUm * dtS;
    this.forceSeconds += held.force * dtS;
    if (Number.isFinite(held.forceLv)) {
      this.forceLvSeconds += held.forceLv * dtS;
      this.forceLvCoveredS += dtS;
    }
    if (Number.isFinite(held.forceTendon)) {
      this.forceTendonSeconds += held.forceTendon * dtS;
      this.forceTendonCoveredS += dtS;
    }
    if (held.region >= 0) this.regionS[held.region] = (this.regionS[held.region] as number) + dtS;
    this.histogram.add(held.slUm, dtS);
  }

  /** Counts a sample inside the segment: its length and velocity extremes. */
  count(slUm: number, velocityMmS: number): void {
    this.sampleCount++;
    if (slUm < this.slMinUm) this.slMinUm = slUm;
    if (slUm > this.slMaxUm) this.slMaxUm = slUm;
    if (velocityMmS < this.velocityMinMmS) this.velocityMinMmS = velocityMmS;
    if (velocityMmS > this.velocityMaxMmS) this.velocityMaxMmS = velocityMmS;
  }

  finish(endS: number, curve: ForceLengthCurve, spread: CountSpread): SegmentFigures {
    const covered = this.coveredS;
    const regionFraction = zeroRegionRecord();
    for (let r = 0; r < REGIONS; r++) {
      regionFraction[REGION_KEYS[r] as RegionKey] = covered > 0 ? (this.regionS[r] as number) / covered : 0;
    }
    const any = this.sampleCount > 0;
    const min = any ? this.slMinUm : Number.NaN;
    const max = any ? this.slMaxUm : Number.NaN;
    const h = this.histogram;
    const clampTo = (x: number): number => (any ? Math.min(max, Math.max(min, x)) : x);
    return {
      startS: this.startS,
      endS,
      slMinUm: min,
      slMaxUm: max,
      slMeanUm: covered > 0 ? this.slSecondsUm / covered : Number.NaN,
      slP5Um: clampTo(histogramQuantile(h.weights, 0.05, h.lo, h.hi)),
      slP95Um: clampTo(histogramQuantile(h.weights, 0.95, h.lo, h.hi)),
      excursionUm: max - min,
      regionFraction,
      regionProbability: histogramRegionProbability(curve, h.weights, spread, h.lo, h.hi),
      forceMean: covered > 0 ? this.forceSeconds / covered : Number.NaN,
      forceLvMean: this.forceLvCoveredS > 0 ? this.forceLvSeconds / this.forceLvCoveredS : Number.NaN,
      forceTendonMean: this.forceTendonCoveredS > 0 ? this.forceTendonSeconds / this.forceTendonCoveredS : Number.NaN,
      velocityMinMmS: Number.isFinite(this.velocityMinMmS) ? this.velocityMinMmS : Number.NaN,
      velocityMaxMmS: Number.isFinite(this.velocityMaxMmS) ? this.velocityMaxMmS : Number.NaN,
      gapS: gapOf(endS - this.startS - covered),
      sampleCount: this.sampleCount,
    };
  }
}

/** A growable buffer of (time, length) points of the stride in progress, for its cycle curve. */
export class CycleBuffer {
  tS = new Float64Array(256);
  slUm = new Float64Array(256);
  length = 0;
  /** Most points a stride keeps (about 11 min at 100 Hz); past it the stride gives no cycle curve. */
  static readonly MAX = 1 << 16;
  overflow = false;

  clear(): void {
    this.length = 0;
    this.overflow = false;
  }

  push(tS: number, slUm: number): void {
    if (this.length === this.tS.length) {
      if (this.length >= CycleBuffer.MAX) {
        this.overflow = true;
        return;
      }
      const t = new Float64Array(this.length * 2);
      const s = new Float64Array(this.length * 2);
      t.set(this.tS);
      s.set(this.slUm);
      this.tS = t;
      this.slUm = s;
    }
    this.tS[this.length] = tS;
    this.slUm[this.length] = slUm;
    this.length++;
  }
}

/**
 * Resamples points (times ascending) to CYCLE_POINTS points at 0, 1, …, 100% of [startS, endS] by linear
 * interpolation (time normalization, common practice in gait analysis, no source); before the first point
 * or after the last, the nearest point's value. Writes into `out`; false when there are no points.
 */
export function resampleCycle(
  tS: ArrayLike<number>,
  slUm: ArrayLike<number>,
  n: number,
  startS: number,
  endS: number,
  out: Float64Array,
): boolean {
  if (n === 0 || !(endS > startS)) return false;
  let j = 0;
  for (let p = 0; p < CYCLE_POINTS; p++) {
    const t = startS + ((endS - startS) * p) / (CYCLE_POINTS - 1);
    while (j < n - 1 && (tS[j + 1] as number) <= t) j++;
    const t0 = tS[j] as number;
    const v0 = slUm[j] as number;
    if (t <= t0 || j === n - 1) {
      out[p] = v0;
      continue;
    }
    const t1 = tS[j + 1] as number;
    const v1 = slUm[j + 1] as number;
    out[p] = v0 + ((v1 - v0) * (t - t0)) / (t1 - t0);
  }
  return true;
}

export function emptyCycleCurve(): CycleCurve {
  return { strideCount: 0, slMeanUm: new Float64Array(CYCLE_POINTS), slM2Um2: new Float64Array(CYCLE_POINTS) };
}

/** Folds one resampled stride into the running mean and sum of squares (Welford 1962, Technometrics 4:419–420 — from memory). */
export function foldCycle(curve: CycleCurve, points: Float64Array): void {
  curve.strideCount++;
  const n = curve.strideCount;
  for (let p = 0; p < CYCLE_POINTS; p++) {
    const x = points[p] as number;
    const mean = curve.slMeanUm[p] as number;
    const delta = x - mean;
    const next = mean + delta / n;
    curve.slMeanUm[p] = next;
    curve.slM2Um2[p] = (curve.slM2Um2[p] as number) + delta * (x - next);
  }
}

/** Sample SD at each point (n − 1 in the denominator); NaN with fewer than two strides. */
export function cycleSd(curve: CycleCurve): number[] {
  const out: number[] = [];
  for (let p = 0; p < CYCLE_POINTS; p++) {
    out.push(curve.strideCount > 1 ? Math.sqrt((curve.slM2Um2[p] as number) / (curve.strideCount - 1)) : Number.NaN);
  }
  return out;
}
