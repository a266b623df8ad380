/**
 * A small seeded pseudo-random generator (mulberry32) and a Gaussian draw on top of it. Deterministic:
 * the same seed gives the same sequence on every platform, so generated trials are byte-identical.
 */

export interface Prng {
  /** Uniform in [0, 1). */
  next(): number;
  /** Standard normal (mean 0, SD 1). */
  gauss(): number;
}

/** Mixes a seed and a stream label into a 32-bit state, so independent streams come from one seed. */
export function deriveSeed(seed: number, stream: number): number {
  let h = (Math.trunc(seed) ^ Math.imul(stream + 0x9e3779b9, 0x85ebca6b)) >>> 0;
  h = Math.imul(h ^ (h >>> 16), 0x7feb352d) >>> 0;
  h = Math.imul(h ^ (h >>> 15), 0x846ca68b) >>> 0;
  return (h ^ (h >>> 16)) >>> 0;
}

/** mulberry32: a 32-bit state generator, plenty for noise and schedules of a simulation. */
export function createPrng(seed: number): Prng {
  let state = seed >>> 0;
  let spare = Number.NaN;
  const next = (): number => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  const gauss = (): number => {
    if (!Number.isNaN(spare)) {
      const s = spare;
      spare = Number.NaN;
      return s;
    }
    // Box–Muller; 1 - u keeps the logarithm's argument in (0, 1].
    const u = 1 - next();
    const v = next();
    const r = Math.sqrt(-2 * Math.log(u));
    spare = r * Math.sin(2 * Math.PI * v);
    return r * Math.cos(2 * Math.PI * v);
  };
  return { next, gauss };
}
