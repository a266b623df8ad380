/**
 * Linear-interpolated percentile of sorted values ("type 7": between the order statistics around
 * q·(n − 1); common practice, no source); NaN for no values.
 */
export function percentileOfSorted(sorted: ArrayLike<number>, q: number): number {
  if (sorted.length === 0) return Number.NaN;
  const pos = q * (sorted.length - 1);
  const i = Math.floor(pos);
  const a = sorted[i] as number;
  const b = sorted[Math.min(i + 1, sorted.length - 1)] as number;
  return a + (b - a) * (pos - i);
}

/**
 * Percentile of M sorted values that stand for M equal-probability points of a distribution, the i-th
 * (1-based) at probability (i − ½)/M: linear between those positions, the end values beyond them
 * (Hyndman & Fan 1996, Am Stat 50:361–365, definition 5 — from memory). Unlike type 7, the 5th and 95th
 * percentiles of equal-probability points of N then bound exactly 90 % of N's probability. NaN for no values.
 */
export function percentileOfMidpoints(sorted: ArrayLike<number>, q: number): number {
  const m = sorted.length;
  if (m === 0) return Number.NaN;
  const pos = Math.min(m - 1, Math.max(0, q * m - 0.5));
  const i = Math.floor(pos);
  const a = sorted[i] as number;
  const b = sorted[Math.min(i + 1, m - 1)] as number;
  return a + (b - a) * (pos - i);
}
