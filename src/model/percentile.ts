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
