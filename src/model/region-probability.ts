/**
 * From calibration uncertainty to the probability of each region. The estimate is SL = F·1000/N̂; the
 * truth SL* follows the calibration's spread (src/model/count-spread.ts: lognormal, or normal in the
 * length). SL* lies in the region [a, b) with probability P(SL* ≥ a) − P(SL* ≥ b), each a normal CDF.
 * (A length-normal spread's mass at SL* ≤ 0 counts as too_short, so the six probabilities sum to 1.)
 */
import { normalQuantile } from './normal.ts';
import { regionLowerBoundsUm, regionAt, type ForceLengthCurve } from './geometry.ts';
import { REGION_KEYS, regionIndex, zeroRegionRecord, type RegionKey } from './regions.ts';
import { quantileOfMidpoints } from './stats.ts';
import { lengthRatioAt, probabilityAtLeast, type CountSpread } from './count-spread.ts';

const REGIONS = REGION_KEYS.length;

/**
 * Probability of each region (REGION_KEYS order) for one estimated sarcomere length, written into `out`
 * (no allocation when `out` is given). A spread of relative SD 0 gives certainty in the estimate's region.
 */
export function regionProbabilities(
  curve: ForceLengthCurve,
  sarcomereUm: number,
  spread: CountSpread,
  out: Float64Array = new Float64Array(REGIONS),
): Float64Array {
  out.fill(0);
  const relativeSd = spread.relativeSd;
  if (!Number.isFinite(sarcomereUm) || !(sarcomereUm > 0) || !(relativeSd >= 0)) {
    out.fill(Number.NaN);
    return out;
  }
  if (relativeSd === 0) {
    out[regionIndex(regionAt(curve, sarcomereUm))] = 1;
    return out;
  }
  const lower = regionLowerBoundsUm(curve);
  // above = P(SL* ≥ lower[i]); lower[0] = 0, and all mass (SL* ≤ 0 included) lies at or above it.
  let previous = 1;
  for (let i = 1; i < REGIONS; i++) {
    const above = probabilityAtLeast(spread, sarcomereUm, lower[i] as number);
    out[i - 1] = previous - above;
    previous = above;
  }
  out[REGIONS - 1] = previous;
  return out;
}

/** The same as a record keyed by region, for summaries (`region_probability`). */
export function regionProbabilityRecord(curve: ForceLengthCurve, sarcomereUm: number, spread: CountSpread): Record<RegionKey, number> {
  const p = regionProbabilities(curve, sarcomereUm, spread);
  const record = zeroRegionRecord();
  REGION_KEYS.forEach((key, i) => {
    record[key] = p[i] as number;
  });
  return record;
}

/** The interval of region time: from its 5th to its 95th percentile over N, 90 %. */
export const INTERVAL_LOW = 0.05;
export const INTERVAL_HIGH = 0.95;

/** Number of quantile points of N in strideRegionFractions. */
export const DEFAULT_QUANTILE_POINTS = 200;

export interface RegionFractionsWithInterval {
  /** Expected time fraction of each region: the time-weighted mean of the samples' region probabilities. */
  readonly expected: Record<RegionKey, number>;
  /** 5th percentile of each region's fraction over the distribution of N (quantileOfMidpoints). */
  readonly low: Record<RegionKey, number>;
  /** 95th percentile. */
  readonly high: Record<RegionKey, number>;
}

const quantileCache = new Map<number, Float64Array>();

/** z-values of M equal-probability points of the standard normal: Φ⁻¹((j + ½)/M), computed once per M. */
export function quantilePoints(m: number): Float64Array {
  let z = quantileCache.get(m);
  if (z === undefined) {
    z = new Float64Array(m);
    for (let j = 0; j < m; j++) z[j] = normalQuantile((j + 0.5) / m);
    quantileCache.set(m, z);
  }
  return z;
}

/**
 * Per-stride time fraction per region, with a 90% interval, under calibration uncertainty.
 *
 * The calibration's error is one value for the whole trial, not a fresh draw per sample: every sample of
 * the stride moves together when N is off. So the fraction is a function of the one true N, and its
 * interval comes from N's distribution: the stride's lengths are re-scaled (SL·N̂/N) at M equal-probability
 * quantile points of N, at probabilities (j + ½)/M (deterministic — the same input always gives the same
 * interval, no seed), the time fractions are computed at each, and the 5th and 95th percentiles are taken
 * per region at those same positions (quantileOfMidpoints), so the interval holds 90 % of N. Treating
 * samples as independent would shrink the interval wrongly. The expected fraction is exact: the
 * time-weighted mean of the analytic per-sample probabilities.
 *
 * `durationsS[i]` is the time sample i stands for (zero-order hold); NaN lengths are skipped.
 */
export function strideRegionFractions(
  curve: ForceLengthCurve,
  sarcomereUm: ArrayLike<number>,
  durationsS: ArrayLike<number>,
  spread: CountSpread,
  quantilePointCount: number = DEFAULT_QUANTILE_POINTS,
): RegionFractionsWithInterval {
  const relativeSd = spread.relativeSd;
  const expected = new Float64Array(REGIONS);
  const p = new Float64Array(REGIONS);
  let total = 0;
  const n = Math.min(sarcomereUm.length, durationsS.length);
  for (let i = 0; i < n; i++) {
    const sl = sarcomereUm[i] as number;
    const w = durationsS[i] as number;
    if (!Number.isFinite(sl) || !(w > 0)) continue;
    regionProbabilities(curve, sl, spread, p);
    for (let r = 0; r < REGIONS; r++) expected[r] = (expected[r] as number) + w * (p[r] as number);
    total += w;
  }
  const toRecord = (values: Float64Array): Record<RegionKey, number> => {
    const record = zeroRegionRecord();
    REGION_KEYS.forEach((key, r) => {
      record[key] = total > 0 ? values[r] as number : Number.NaN;
    });
    return record;
  };
  if (total === 0) return { expected: toRecord(expected), low: toRecord(expected), high: toRecord(expected) };
  for (let r = 0; r < REGIONS; r++) expected[r] = (expected[r] as number) / total;
  if (!(relativeSd > 0)) {
    const e = toRecord(expected);
    return { expected: e, low: { ...e }, high: { ...e } };
  }

  const z = quantilePoints(Math.max(20, Math.floor(quantilePointCount)));
  const m = z.length;
  // fractions[r * m + j]: fraction of region r when the true lengths are SL·ratio(z_j).
  const fractions = new Float64Array(REGIONS * m);
  for (let j = 0; j < m; j++) {
    const ratio = lengthRatioAt(spread, z[j] as number);
    for (let i = 0; i < n; i++) {
      const sl = sarcomereUm[i] as number;
      const w = durationsS[i] as number;
      if (!Number.isFinite(sl) || !(w > 0)) continue;
      const r = ratio > 0 ? regionIndex(regionAt(curve, sl * ratio)) : 0;
      fractions[r * m + j] = (fractions[r * m + j] as number) + w / total;
    }
  }
  const low = new Float64Array(REGIONS);
  const high = new Float64Array(REGIONS);
  const column = new Float64Array(m);
  for (let r = 0; r < REGIONS; r++) {
    for (let j = 0; j < m; j++) column[j] = fractions[r * m + j] as number;
    column.sort();
    low[r] = quantileOfMidpoints(column, INTERVAL_LOW);
    high[r] = quantileOfMidpoints(column, INTERVAL_HIGH);
  }
  return { expected: toRecord(expected), low: toRecord(low), high: toRecord(high) };
}

