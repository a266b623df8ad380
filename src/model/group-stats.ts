/**
 * Statistics across subjects: the mean, the sample SD and the 95 % confidence interval of a group, and
 * the paired t-test of two conditions (Student 1908, Biometrika 6:1–25). The sums are compensated and the
 * SD is the corrected two-pass algorithm (Chan, Golub & LeVeque 1983, The American Statistician
 * 37:242–247), so values that differ only in their last digits (NIST's NumAcc data sets) keep their
 * spread. The t distribution's quantiles and tail probabilities come from a well-kept library (stdlib).
 */
import tCdf from '@stdlib/stats-base-dists-t-cdf';
import tQuantile from '@stdlib/stats-base-dists-t-quantile';

/** Sum with Neumaier's compensation: the low-order bits lost at each addition are carried in a second sum. */
function compensatedSum(values: ArrayLike<number>, shift = 0): number {
  let sum = 0;
  let carry = 0;
  for (let i = 0; i < values.length; i++) {
    const x = (values[i] as number) - shift;
    const t = sum + x;
    carry += Math.abs(sum) >= Math.abs(x) ? sum - t + x : x - t + sum;
    sum = t;
  }
  return sum + carry;
}

/** The arithmetic mean; NaN for no values. */
export function meanOf(values: ArrayLike<number>): number {
  const n = values.length;
  if (n === 0) return Number.NaN;
  // Shifted by the first value, so large values with a small spread keep their digits.
  const shift = values[0] as number;
  return shift + compensatedSum(values, shift) / n;
}

/** The sample standard deviation (n − 1 in the denominator); NaN for fewer than two values. */
export function sampleSd(values: ArrayLike<number>, mean: number = meanOf(values)): number {
  const n = values.length;
  if (n < 2) return Number.NaN;
  let squares = 0;
  let squaresCarry = 0;
  let deviations = 0;
  for (let i = 0; i < n; i++) {
    const d = (values[i] as number) - mean;
    const sq = d * d;
    const t = squares + sq;
    squaresCarry += squares >= sq ? squares - t + sq : sq - t + squares;
    squares = t;
    deviations += d;
  }
  // The corrected two-pass formula: the second term removes what error the mean itself carries.
  const sumSquares = squares + squaresCarry - (deviations * deviations) / n;
  return Math.sqrt(Math.max(0, sumSquares) / (n - 1));
}

/** The two-sided critical value of the t distribution with `df` degrees of freedom for a `level` interval (0.95: 97.5th percentile). */
export function tCritical(df: number, level = 0.95): number {
  return tQuantile(1 - (1 - level) / 2, df);
}

/** The two-sided p-value of a t statistic with `df` degrees of freedom: P(|T| ≥ |t|). */
export function tTwoSidedP(t: number, df: number): number {
  return Math.min(1, 2 * tCdf(-Math.abs(t), df));
}

export interface GroupFigures {
  readonly n: number;
  /** Null for no values. */
  readonly mean: number | null;
  /** Sample SD; null for fewer than two values. */
  readonly sd: number | null;
  /** 95 % confidence interval of the mean, t distribution with n − 1 degrees of freedom; null for fewer than two values. */
  readonly ci95Low: number | null;
  readonly ci95High: number | null;
}

function finiteOrNull(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}

/** Mean, sample SD and 95 % confidence interval of the mean of the finite values given (others are left out). */
export function groupFigures(given: readonly number[]): GroupFigures {
  const values = given.filter(Number.isFinite);
  const n = values.length;
  if (n === 0) return { n, mean: null, sd: null, ci95Low: null, ci95High: null };
  const mean = meanOf(values);
  if (n === 1) return { n, mean, sd: null, ci95Low: null, ci95High: null };
  const sd = sampleSd(values, mean);
  const half = tCritical(n - 1) * (sd / Math.sqrt(n));
  return { n, mean, sd, ci95Low: finiteOrNull(mean - half), ci95High: finiteOrNull(mean + half) };
}

export interface PairedTest {
  readonly nPairs: number;
  /** Mean of b − a; null for no pairs. */
  readonly meanDiff: number | null;
  /** 95 % confidence interval of the mean difference; null for fewer than two pairs. */
  readonly ci95Low: number | null;
  readonly ci95High: number | null;
  /** Mean difference over its standard error; null for fewer than two pairs or differences that do not vary. */
  readonly t: number | null;
  /** Two-sided p-value of t with nPairs − 1 degrees of freedom; null when t is. */
  readonly p: number | null;
  /** Effect size: mean difference over the SD of the differences; null when t is. */
  readonly dz: number | null;
}

/**
 * Paired t-test of b against a, two-sided: pairs (a[i], b[i]) whose values are both finite count; the
 * differences b − a give the mean difference, its 95 % interval and t = mean / (SD / √n) with n − 1
 * degrees of freedom.
 */
export function pairedTTest(a: readonly number[], b: readonly number[]): PairedTest {
  const diffs: number[] = [];
  for (let i = 0; i < Math.min(a.length, b.length); i++) {
    const d = (b[i] as number) - (a[i] as number);
    if (Number.isFinite(d)) diffs.push(d);
  }
  const g = groupFigures(diffs);
  const none = { t: null, p: null, dz: null };
  if (g.sd === null || g.mean === null) return { nPairs: g.n, meanDiff: g.mean, ci95Low: g.ci95Low, ci95High: g.ci95High, ...none };
  if (!(g.sd > 0)) return { nPairs: g.n, meanDiff: g.mean, ci95Low: g.ci95Low, ci95High: g.ci95High, ...none };
  const t = g.mean / (g.sd / Math.sqrt(g.n));
  return { nPairs: g.n, meanDiff: g.mean, ci95Low: g.ci95Low, ci95High: g.ci95High, t, p: tTwoSidedP(t, g.n - 1), dz: g.mean / g.sd };
}
