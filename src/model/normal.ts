/** The standard normal distribution: density, distribution function and its inverse. */

const INV_SQRT_2PI = 1 / Math.sqrt(2 * Math.PI);

/** Standard normal density φ(z). */
export function normalPdf(z: number): number {
  return INV_SQRT_2PI * Math.exp(-0.5 * z * z);
}

/**
 * Standard normal distribution function Φ(z), absolute error below 7.5e-8: the polynomial approximation
 * 26.2.17 of Abramowitz & Stegun 1964 (Handbook of Mathematical Functions, NBS Applied Mathematics
 * Series 55), with Φ(−z) = 1 − Φ(z). Allocation-free.
 */
export function normalCdf(z: number): number {
  if (Number.isNaN(z)) return Number.NaN;
  if (z === Number.POSITIVE_INFINITY) return 1;
  if (z === Number.NEGATIVE_INFINITY) return 0;
  if (z === 0) return 0.5;
  const x = Math.abs(z);
  const t = 1 / (1 + 0.2316419 * x);
  const poly = t * (0.31938153 + t * (-0.356563782 + t * (1.781477937 + t * (-1.821255978 + t * 1.330274429))));
  const upper = normalPdf(x) * poly;
  return z >= 0 ? 1 - upper : upper;
}

/**
 * Inverse of Φ: the z with Φ(z) = p, by bisection on normalCdf (so it is exactly as good as normalCdf,
 * and needs no further published coefficients). For precomputing quantile points, not per sample.
 */
export function normalQuantile(p: number): number {
  if (!(p >= 0 && p <= 1)) return Number.NaN;
  if (p === 0) return Number.NEGATIVE_INFINITY;
  if (p === 1) return Number.POSITIVE_INFINITY;
  let lo = -9;
  let hi = 9;
  for (let i = 0; i < 80; i++) {
    const mid = (lo + hi) / 2;
    if (normalCdf(mid) < p) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}
