/**
 * Number → text exactly as String() and JSON.stringify write it, about twice as fast for the values a
 * generator writes (at most six decimals): integer arithmetic instead of shortest-round-trip search.
 */
export function formatNumber(v: number): string {
  const m = Math.round(v * 1e6);
  // Only values that are exactly a six-decimal number take the fast path (and never -0 or huge ones).
  if (m / 1e6 !== v || m > 9e14 || m < -9e14 || Object.is(v, -0)) return String(v);
  const a = m < 0 ? -m : m;
  const whole = Math.floor(a / 1e6);
  let frac = a - whole * 1e6;
  const sign = m < 0 ? '-' : '';
  if (frac === 0) return `${sign}${whole}`;
  let digits = 6;
  while (frac % 10 === 0) {
    frac /= 10;
    digits--;
  }
  return `${sign}${whole}.${String(frac).padStart(digits, '0')}`;
}
