/**
 * How uncertain a calibration's sarcomere count N is, as a distribution of the true sarcomere length
 * SL* around the estimate SL. N is positive and its error multiplicative, so it is never a normal
 * distribution of N (that puts mass at N ≤ 0 and skews the long-length regions):
 *
 * - `lognormal`: ln N ~ Normal(ln N̂, s²) with s² = ln(1 + cv²), so N has the stated relative SD cv and
 *   N̂ is its median. Then ln SL* ~ Normal(ln SL, s²). For counts whose error lies in N itself (a stated
 *   count, an optimal or published fibre length divided by a sarcomere length).
 * - `length_normal`: SL* ~ Normal(SL, (cv·SL)²). For counts whose error lies in the sarcomere length they
 *   were derived from (N = F·1000/SLref with SLref uncertain): SL* = SL × SLref* ÷ SLref̂ is then exactly normal.
 *
 * Both are first-order translations of a stated SD (common practice, no source).
 */
import { normalCdf } from './normal.ts';

export const SPREAD_SHAPES = ['lognormal', 'length_normal'] as const;
export type SpreadShape = (typeof SPREAD_SHAPES)[number];

export interface CountSpread {
  /** SD of N relative to N (lognormal), or SD of the derived-from sarcomere length relative to it (length_normal); 0: none stated. */
  readonly relativeSd: number;
  readonly shape: SpreadShape;
}

export const NO_SPREAD: CountSpread = { relativeSd: 0, shape: 'lognormal' };

/**
 * Largest relative SD a calibration may state. Above it the 90 % range of the true sarcomere length spans
 * more than a factor of 4.7 (lognormal: e^(2 × 1.645 × 0.47)), wider than the whole curve (1.27–4.24 µm, a
 * factor of 3.3); a length-normal spread would put 2 % of its mass at lengths ≤ 0. Our own limit.
 */
export const MAX_RELATIVE_SD = 0.5;

/** Why a spread makes a calibration meaningless; null when it does not. */
export function spreadProblem(spread: CountSpread): string | null {
  const cv = spread.relativeSd;
  if (Number.isFinite(cv) && cv >= 0 && cv <= MAX_RELATIVE_SD) return null;
  return (
    `the stated SDs give the sarcomere count a relative SD of ${Number.isFinite(cv) ? cv.toFixed(2) : String(cv)}; ` +
    `accepted: 0 to ${MAX_RELATIVE_SD}. Above that the true sarcomere length's 90 % range spans more than the whole ` +
    'force–length curve, so no region can be told apart; state the SD of your own measurement (not a between-person SD), or leave it out'
  );
}

/** σ of ln N for a lognormal N with relative SD cv: √ln(1 + cv²). */
export function logSd(relativeSd: number): number {
  return Math.sqrt(Math.log1p(relativeSd * relativeSd));
}

/**
 * SL* ÷ SL at the standard normal quantile z (increasing in z): e^(s·z) (lognormal) or 1 + cv·z
 * (length_normal; ≤ 0 below z = −1/cv, a true length of zero or less).
 */
export function lengthRatioAt(spread: CountSpread, z: number): number {
  return spread.shape === 'lognormal' ? Math.exp(logSd(spread.relativeSd) * z) : 1 + spread.relativeSd * z;
}

/**
 * P(SL* ≥ boundaryUm) for an estimate slUm (both > 0, relativeSd > 0): Φ(ln(SL/b)/s) (lognormal) or
 * Φ((1 − b/SL)/cv) (length_normal).
 */
export function probabilityAtLeast(spread: CountSpread, slUm: number, boundaryUm: number): number {
  if (spread.shape === 'lognormal') return normalCdf(Math.log(slUm / boundaryUm) / logSd(spread.relativeSd));
  return normalCdf((1 - boundaryUm / slUm) / spread.relativeSd);
}
