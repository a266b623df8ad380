/**
 * A true sarcomere-length trajectory over one gait cycle: a sum of a few harmonics, scaled so that its
 * lowest and highest values are exactly the given lengths. Smooth and periodic, so a filtered signal
 * can follow it closely.
 */
import { goldenSection } from './golden-section.ts';

/** One harmonic term A·cos(2π·h·(phase − peakPhase)); the h-th entry of a list is harmonic h (1-based). */
export interface Harmonic {
  readonly amplitude: number;
  /** Gait phase (0–1, 0 = foot strike) where this term peaks. */
  readonly peakPhase: number;
}

export interface TrajectorySpec {
  /** Shortest sarcomere length of the cycle (µm). */
  readonly minUm: number;
  /** Longest sarcomere length of the cycle (µm). */
  readonly maxUm: number;
  /** The cycle's shape; only the relative amplitudes and peak phases matter. */
  readonly harmonics: readonly Harmonic[];
}

export interface Trajectory {
  /** Mean over the cycle (µm). */
  readonly meanUm: number;
  /** Sarcomere length (µm) at a gait phase (any real; the cycle repeats every 1). */
  readonly sarcomereUmAt: (phase: number) => number;
  /** Deviation from the mean at a phase, before any stride-to-stride scaling (µm). */
  readonly deviationUmAt: (phase: number) => number;
}

const GRID = 4096;

/** Builds the evaluator; throws on a spec no trajectory can satisfy (a programming error, not input). */
export function compileTrajectory(spec: TrajectorySpec): Trajectory {
  if (!(spec.maxUm > spec.minUm) || spec.harmonics.length === 0) {
    throw new RangeError(
      `trajectory needs maxUm > minUm and at least one harmonic; got ${spec.minUm}–${spec.maxUm} µm with ${spec.harmonics.length} harmonics`,
    );
  }
  const n = spec.harmonics.length;
  const a = new Float64Array(n);
  const b = new Float64Array(n);
  spec.harmonics.forEach((h, i) => {
    const angle = 2 * Math.PI * (i + 1) * h.peakPhase;
    a[i] = h.amplitude * Math.cos(angle);
    b[i] = h.amplitude * Math.sin(angle);
  });
  // raw(φ) = Σ a_h cos(hθ) + b_h sin(hθ), θ = 2πφ; cos(hθ), sin(hθ) by the angle-addition recurrence.
  const raw = (phase: number): number => {
    const theta = 2 * Math.PI * phase;
    const c1 = Math.cos(theta);
    const s1 = Math.sin(theta);
    let c = c1;
    let s = s1;
    let sum = 0;
    for (let i = 0; i < n; i++) {
      sum += (a[i] as number) * c + (b[i] as number) * s;
      const cNext = c * c1 - s * s1;
      s = s * c1 + c * s1;
      c = cNext;
    }
    return sum;
  };
  let lo = Infinity;
  let hi = -Infinity;
  let loAt = 0;
  let hiAt = 0;
  for (let i = 0; i < GRID; i++) {
    const v = raw(i / GRID);
    if (v < lo) {
      lo = v;
      loAt = i / GRID;
    }
    if (v > hi) {
      hi = v;
      hiAt = i / GRID;
    }
  }
  lo = refine(raw, loAt, -1);
  hi = refine(raw, hiAt, 1);
  const scale = (spec.maxUm - spec.minUm) / (hi - lo);
  const meanUm = spec.minUm - lo * scale;
  return {
    meanUm,
    sarcomereUmAt: (phase) => meanUm + scale * raw(phase),
    deviationUmAt: (phase) => scale * raw(phase),
  };
}

/** Golden-section search around a grid extremum; sign 1 finds a maximum, -1 a minimum. */
function refine(f: (x: number) => number, at: number, sign: 1 | -1): number {
  return f(goldenSection(f, at - 1 / GRID, at + 1 / GRID, sign, 60));
}
