/**
 * The stride period of a fascicle-length signal, for trials without gait events: the dominant period
 * from the autocorrelation of the signal resampled to a uniform grid. Pure functions of numbers.
 */
import { quantileSorted } from './stats.ts';

export interface PeriodOptions {
  /** Shortest period looked for (s). @default 0.4 */
  readonly minPeriodS?: number;
  /** Longest period looked for (s). @default 3 */
  readonly maxPeriodS?: number;
  /** Grid step of the resampled signal (s). @default 0.01 */
  readonly gridS?: number;
  /** Smallest normalized autocorrelation at the period for the signal to count as periodic. @default 0.3 */
  readonly minCorrelation?: number;
  /**
   * Most points of the resampled grid: a signal longer than this many grid steps is read from its start
   * only, so the work and memory are bounded by a count, never by the span its times claim. @default 65536
   */
  readonly maxGridPoints?: number;
}

export const DEFAULT_MIN_PERIOD_S = 0.4;
/** Grid step (s) of the resampled signal: a numerical resolution (with the parabola through the peak, 10 and 50 ms find the same period to 1 ms on smooth signals). */
export const DEFAULT_GRID_S = 0.01;
export const DEFAULT_MAX_PERIOD_S = 3;
/** Most points of the resampled grid (over ten minutes at the default 10 ms step). */
export const DEFAULT_MAX_GRID_POINTS = 1 << 16;

export interface PeriodEstimate {
  readonly periodS: number;
  /** Normalized autocorrelation at the period (biased estimator, 1 at lag 0). */
  readonly correlation: number;
  /** Spread of the signal: its 95th minus its 5th percentile (the signal's unit). */
  readonly rangeP5P95: number;
}

/**
 * Linear resampling of (t, x) points, times ascending, to a grid from the first time in steps of gridS,
 * of at most maxPoints points (the grid stops there however far the last time lies).
 */
export function resampleUniform(tS: ArrayLike<number>, x: ArrayLike<number>, n: number, gridS: number, maxPoints = DEFAULT_MAX_GRID_POINTS): Float64Array {
  if (n === 0) return new Float64Array(0);
  const t0 = tS[0] as number;
  const span = (tS[n - 1] as number) - t0;
  const points = Math.floor(span / gridS) + 1;
  const m = points >= 1 ? Math.min(points, maxPoints) : 1;
  const out = new Float64Array(m);
  let j = 0;
  for (let i = 0; i < m; i++) {
    const t = t0 + i * gridS;
    while (j < n - 2 && (tS[j + 1] as number) <= t) j++;
    const ta = tS[j] as number;
    const tb = tS[Math.min(j + 1, n - 1)] as number;
    const xa = x[j] as number;
    const xb = x[Math.min(j + 1, n - 1)] as number;
    out[i] = tb > ta ? xa + ((xb - xa) * Math.min(1, Math.max(0, (t - ta) / (tb - ta)))) : xa;
  }
  return out;
}

/**
 * Normalized autocorrelation r(k) = Σ (x_i − x̄)(x_{i+k} − x̄) / Σ (x_i − x̄)², k = 0…maxLag (the biased
 * estimator, which shrinks long lags and so favours the fundamental period over its multiples; common
 * practice, no source).
 */
export function autocorrelation(x: Float64Array, maxLag: number): Float64Array {
  const n = x.length;
  let mean = 0;
  for (let i = 0; i < n; i++) mean += x[i] as number;
  mean /= n;
  const d = new Float64Array(n);
  let energy = 0;
  for (let i = 0; i < n; i++) {
    const v = (x[i] as number) - mean;
    d[i] = v;
    energy += v * v;
  }
  const lags = Math.min(maxLag, n - 1);
  const r = new Float64Array(lags + 1);
  if (!(energy > 0)) return r.fill(Number.NaN);
  for (let k = 0; k <= lags; k++) {
    let sum = 0;
    for (let i = 0; i + k < n; i++) sum += (d[i] as number) * (d[i + k] as number);
    r[k] = sum / energy;
  }
  return r;
}

/**
 * The dominant period of a signal, or null when it is not periodic enough within the searched range.
 * Takes the highest local maximum of the autocorrelation between the shortest and longest period, then
 * prefers a whole fraction of it (½, ⅓) whose correlation is nearly as high, so a multiple of the
 * period is not taken for the period; refines the lag by a parabola through the peak and its neighbours.
 */
export function dominantPeriod(tS: ArrayLike<number>, x: ArrayLike<number>, n: number, options: PeriodOptions = {}): PeriodEstimate | null {
  const gridS = options.gridS ?? DEFAULT_GRID_S;
  const minLag = Math.max(2, Math.round((options.minPeriodS ?? DEFAULT_MIN_PERIOD_S) / gridS));
  const grid = resampleUniform(tS, x, n, gridS, options.maxGridPoints ?? DEFAULT_MAX_GRID_POINTS);
  // At least two whole periods must fit, so the longest lag looked for is half the signal.
  const maxLag = Math.min(Math.round((options.maxPeriodS ?? DEFAULT_MAX_PERIOD_S) / gridS), Math.floor(grid.length / 2));
  if (maxLag <= minLag) return null;
  const r = autocorrelation(grid, maxLag + 1);
  const isPeak = (k: number): boolean => k > 0 && k < r.length - 1 && (r[k] as number) >= (r[k - 1] as number) && (r[k] as number) >= (r[k + 1] as number);
  let best = -1;
  for (let k = minLag; k <= maxLag; k++) if (isPeak(k) && (best < 0 || (r[k] as number) > (r[best] as number))) best = k;
  if (best < 0 || !((r[best] as number) >= (options.minCorrelation ?? 0.3))) return null;
  for (const divisor of [3, 2]) {
    const around = Math.round(best / divisor);
    if (around < minLag) continue;
    let local = -1;
    const reach = Math.max(1, Math.round(around * 0.1));
    for (let k = around - reach; k <= around + reach; k++) if (isPeak(k) && (local < 0 || (r[k] as number) > (r[local] as number))) local = k;
    if (local >= 0 && (r[local] as number) >= 0.85 * (r[best] as number)) {
      best = local;
      break;
    }
  }
  const a = r[best - 1] as number;
  const b = r[best] as number;
  const c = r[best + 1] as number;
  const denominator = a - 2 * b + c;
  const shift = denominator < 0 ? (0.5 * (a - c)) / denominator : 0;
  const sorted = Float64Array.from(grid).sort();
  return {
    periodS: (best + Math.max(-0.5, Math.min(0.5, shift))) * gridS,
    correlation: b,
    rangeP5P95: quantileSorted(sorted, 0.95) - quantileSorted(sorted, 0.05),
  };
}
