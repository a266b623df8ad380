/** Small statistics for benchmark figures. */

/** The q-quantile (0–1) by linear interpolation between order statistics; NaN for no values. */
export function quantile(values: readonly number[], q: number): number {
  if (values.length === 0) return Number.NaN;
  const sorted = [...values].sort((a, b) => a - b);
  const pos = (sorted.length - 1) * q;
  const lo = Math.floor(pos);
  const hi = Math.ceil(pos);
  const a = sorted[lo] as number;
  const b = sorted[hi] as number;
  return a + (b - a) * (pos - lo);
}

export function median(values: readonly number[]): number {
  return quantile(values, 0.5);
}
