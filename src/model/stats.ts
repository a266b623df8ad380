/**
 * Sample quantiles, one definition for the whole tool: type 7 of Hyndman & Fan (Hyndman RJ, Fan Y 1996,
 * Sample quantiles in statistical packages, The American Statistician 50:361–365), linear between order
 * statistics. With the n values sorted and h = (n − 1)·q (0-based), j = ⌊h⌋, it is
 * x[j] + (h − j)·(x[j+1] − x[j]); q = 0 gives the least value, q = 1 the greatest, q = ½ the median.
 * Also the quantile of a binned (grouped) distribution, for the time-weighted length histograms.
 */

/** Type 7 quantile (q in 0–1) of values sorted ascending; NaN for no values. */
export function quantileSorted(sorted: ArrayLike<number>, q: number): number {
  const n = sorted.length;
  if (n === 0) return Number.NaN;
  const h = q * (n - 1);
  const j = Math.floor(h);
  const a = sorted[j] as number;
  const b = sorted[Math.min(j + 1, n - 1)] as number;
  return a + (b - a) * (h - j);
}

/** Type 7 median of values sorted ascending; NaN for no values. */
export function medianSorted(sorted: ArrayLike<number>): number {
  return quantileSorted(sorted, 0.5);
}

/** Type 7 quantile (q in 0–1) of values in any order (a sorted copy is made; `values` is left as it is). */
export function quantile(values: readonly number[], q: number): number {
  return quantileSorted([...values].sort((a, b) => a - b), q);
}

/** Type 7 median of values in any order; NaN for no values. */
export function median(values: readonly number[]): number {
  return quantile(values, 0.5);
}

/**
 * Moves the k-th smallest value to index k, smaller ones before it, larger after (Hoare's selection:
 * Hoare CAR 1961, Algorithm 65: Find, Communications of the ACM 4:321–322; citation from memory).
 */
function selectKth(a: Float64Array, k: number): void {
  let lo = 0;
  let hi = a.length - 1;
  while (lo < hi) {
    const pivot = a[(lo + hi) >> 1] as number;
    let i = lo;
    let j = hi;
    while (i <= j) {
      while ((a[i] as number) < pivot) i++;
      while ((a[j] as number) > pivot) j--;
      if (i <= j) {
        const t = a[i] as number;
        a[i] = a[j] as number;
        a[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return;
  }
}

/** The value at fractional rank `h` (0-based) of values in any order, by selection; reorders `values`. */
function atRankBySelection(values: Float64Array, h: number): number {
  const j = Math.floor(h);
  selectKth(values, j);
  const a = values[j] as number;
  if (j + 1 >= values.length) return a;
  let b = Number.POSITIVE_INFINITY;
  for (let k = j + 1; k < values.length; k++) if ((values[k] as number) < b) b = values[k] as number;
  return a + (b - a) * (h - j);
}

/**
 * Type 7 quantile (q in 0–1) of values in any order, by selection rather than a full sort: the same value
 * as quantileSorted of the sorted values, in linear time on average. Reorders `values`; needs at least one.
 */
export function quantileBySelection(values: Float64Array, q: number): number {
  return atRankBySelection(values, q * (values.length - 1));
}

/**
 * quantileOfMidpoints (type 5) of values in any order, by selection: the same value as quantileOfMidpoints
 * of the sorted values. Reorders `values`; needs at least one.
 */
export function quantileOfMidpointsBySelection(values: Float64Array, q: number): number {
  return atRankBySelection(values, Math.min(values.length - 1, Math.max(0, q * values.length - 0.5)));
}

/**
 * Quantile (q in 0–1) of a binned distribution: weights[b] is the weight (e.g. time) in bin b, which spans
 * [b, b + 1) bin widths. The weight is taken as spread evenly within each bin, so the result is where
 * the cumulative weight reaches q of the total, interpolated linearly inside the bin that crosses it (the
 * grouped-data quantile; common practice, no source). Only bins lo…hi are read. NaN when they hold no
 * weight.
 */
export function binnedQuantile(weights: ArrayLike<number>, q: number, binWidth: number, lo = 0, hi = weights.length - 1): number {
  let total = 0;
  for (let b = lo; b <= hi; b++) total += weights[b] as number;
  if (!(total > 0)) return Number.NaN;
  const target = q * total;
  let cum = 0;
  for (let b = lo; b <= hi; b++) {
    const w = weights[b] as number;
    if (w > 0 && cum + w >= target) return (b + (target - cum) / w) * binWidth;
    cum += w;
  }
  return (hi + 1) * binWidth;
}

/**
 * Percentile of M sorted values that stand for M equal-probability points of a distribution, the i-th
 * (1-based) at probability (i − ½)/M: linear between those positions, the end values beyond them
 * (Hyndman & Fan 1996, Am Stat 50:361–365, definition 5 — from memory). Unlike type 7, the 5th and 95th
 * percentiles of equal-probability points of N then bound exactly 90 % of N's probability. NaN for no values.
 */
export function quantileOfMidpoints(sorted: ArrayLike<number>, q: number): number {
  const m = sorted.length;
  if (m === 0) return Number.NaN;
  const pos = Math.min(m - 1, Math.max(0, q * m - 0.5));
  const i = Math.floor(pos);
  const a = sorted[i] as number;
  const b = sorted[Math.min(i + 1, m - 1)] as number;
  return a + (b - a) * (pos - i);
}
