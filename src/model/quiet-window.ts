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

/** Two postures' single-posture counts disagree beyond this share of their mean: a constant part of the tracked length. Our own threshold. */
export const POSTURE_DISAGREEMENT_FRACTION = 0.05;

/** One posture: a window's median fascicle length (mm) and the sarcomere length (µm, with its SD when known) it stands at. */
export interface Posture {
  readonly fascicleMm: number;
  readonly sarcomereUm: number;
  readonly sarcomereSdUm?: number;
}

export interface TwoPostureCount {
  /** N = Δfascicle length × 1000 / Δsarcomere length: independent of any constant part of the tracked length. */
  readonly count: number;
  /** The constant part (mm): fascicle − N × sarcomere length / 1000, the same at both postures. */
  readonly offsetMm: number;
  /** SD of the difference of the sarcomere lengths / that difference (0 when no SD was given): N's relative SD. */
  readonly relativeSd: number;
  /** Each posture's own count, F × 1000 / SL (which holds only when the constant part is zero). */
  readonly singleCounts: readonly [number, number];
  /** |difference of the single counts| / their mean. */
  readonly disagreement: number;
}

/**
 * The sarcomere count from two postures: the tracked length F = c + N·SL/1000 at both, so
 * N = (F₂ − F₁) × 1000 / (SL₂ − SL₁) whatever the constant part c (aponeurosis or tendon pieces in the tracked
 * line, a tracking offset). The sarcomere lengths' SDs give N's by first-order propagation (common practice,
 * no source): σ(ΔSL) = √(σ₁² + σ₂²), and N's relative SD is σ(ΔSL)/|ΔSL|. The two sarcomere lengths must
 * differ; NaN figures otherwise.
 */
export function twoPostureCount(a: Posture, b: Posture): TwoPostureCount {
  const dSl = b.sarcomereUm - a.sarcomereUm;
  const count = ((b.fascicleMm - a.fascicleMm) * 1000) / dSl;
  const offsetMm = a.fascicleMm - (count * a.sarcomereUm) / 1000;
  const sdA = a.sarcomereSdUm ?? 0;
  const sdB = b.sarcomereSdUm ?? 0;
  const relativeSd = Math.hypot(sdA, sdB) / Math.abs(dSl);
  const singleA = sarcomereCountFromReference(a.fascicleMm, a.sarcomereUm);
  const singleB = sarcomereCountFromReference(b.fascicleMm, b.sarcomereUm);
  const disagreement = Math.abs(singleA - singleB) / ((singleA + singleB) / 2);
  return { count, offsetMm, relativeSd, singleCounts: [singleA, singleB], disagreement };
}
