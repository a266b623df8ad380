/**
 * A calibration from a quiet window of a trial: the median fascicle length while the person stands
 * still, paired with a sarcomere length measured (or assumed) for that posture, gives the sarcomere count.
 */
import { medianSorted, quantileSorted } from './stats.ts';

/** Above this (5th–95th percentile range / median), a window is not quiet. Our own threshold. */
export const QUIET_SPREAD_FRACTION = 0.05;

export interface WindowSummary {
  /** Samples inside the window. */
  readonly count: number;
  readonly medianMm: number;
  readonly p5Mm: number;
  readonly p95Mm: number;
  /** (p95 − p5) / median: how much the fascicle length varies inside the window. */
  readonly spreadFraction: number;
  readonly quiet: boolean;
}

/**
 * Summary of the fascicle lengths whose time lies in [startS, endS]; NaN lengths are skipped.
 * An empty window gives count 0 and NaN figures.
 */
export function summarizeWindow(
  tS: ArrayLike<number>,
  fascicleMm: ArrayLike<number>,
  startS: number,
  endS: number,
  quietSpreadFraction: number = QUIET_SPREAD_FRACTION,
): WindowSummary {
  const inside: number[] = [];
  const n = Math.min(tS.length, fascicleMm.length);
  for (let i = 0; i < n; i++) {
    const t = tS[i] as number;
    const f = fascicleMm[i] as number;
    if (t >= startS && t <= endS && Number.isFinite(f)) inside.push(f);
  }
  inside.sort((a, b) => a - b);
  const medianMm = medianSorted(inside);
  const p5Mm = quantileSorted(inside, 0.05);
  const p95Mm = quantileSorted(inside, 0.95);
  const spreadFraction = (p95Mm - p5Mm) / medianMm;
  return { count: inside.length, medianMm, p5Mm, p95Mm, spreadFraction, quiet: spreadFraction <= quietSpreadFraction };
}

/** Sarcomeres in series from a fascicle length (mm) and the sarcomere length (µm) it stands at: F × 1000 / SL. */
export function sarcomereCountFromReference(fascicleMm: number, sarcomereUm: number): number {
  return (fascicleMm * 1000) / sarcomereUm;
}
