/**
 * Golden-section search of [x0, x1] for where f is highest (sign 1) or lowest (sign -1), narrowing the
 * bracket `iterations` times; the bracket's middle at the end. f should have one extremum in the bracket.
 */
export function goldenSection(f: (x: number) => number, x0: number, x1: number, sign: 1 | -1, iterations: number): number {
  const g = (Math.sqrt(5) - 1) / 2;
  let lo = x0;
  let hi = x1;
  for (let i = 0; i < iterations; i++) {
    const m1 = hi - g * (hi - lo);
    const m2 = lo + g * (hi - lo);
    if (sign * f(m1) > sign * f(m2)) hi = m2;
    else lo = m1;
  }
  return (lo + hi) / 2;
}
