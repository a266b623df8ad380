import { describe, expect, it } from 'vitest';
import { compileTrajectory } from '../../src/sim/trajectory.ts';
import { DEFAULT_MUSCLES, scenarioMuscles } from '../../src/sim/scenarios.ts';

describe('compileTrajectory', () => {
  it('scales one harmonic so its extremes are exactly the given lengths, at the given peak phase', () => {
    const t = compileTrajectory({ minUm: 2.4, maxUm: 3.0, harmonics: [{ amplitude: 5, peakPhase: 0.25 }] });
    expect(t.meanUm).toBeCloseTo(2.7, 12);
    expect(t.sarcomereUmAt(0.25)).toBeCloseTo(3.0, 12);
    expect(t.sarcomereUmAt(0.75)).toBeCloseTo(2.4, 12);
    expect(t.sarcomereUmAt(1.25)).toBeCloseTo(3.0, 12);
    expect(t.deviationUmAt(0.25)).toBeCloseTo(0.3, 12);
  });

  // Every built-in profile is a sum of harmonics.
  const profiles = (['walk', 'run'] as const).flatMap((scenario) =>
    scenarioMuscles(scenario, DEFAULT_MUSCLES).map((m) => ({ profile: `${m.name} ${scenario}`, spec: m.trajectory })),
  );

  it.each(profiles)('hits the given extremes for a sum of harmonics ($profile), and never leaves them', ({ spec }) => {
    const t = compileTrajectory(spec);
    const values = Array.from({ length: 100_001 }, (_, i) => t.sarcomereUmAt(i / 100_000));
    expect(Math.min(...values)).toBeCloseTo(spec.minUm, 8);
    expect(Math.max(...values)).toBeCloseTo(spec.maxUm, 8);
    expect(Math.min(...values)).toBeGreaterThanOrEqual(spec.minUm - 1e-12);
    expect(Math.max(...values)).toBeLessThanOrEqual(spec.maxUm + 1e-12);
  });

  it('refuses a spec with no harmonics or with max not above min', () => {
    expect(() => compileTrajectory({ minUm: 2, maxUm: 3, harmonics: [] })).toThrow(RangeError);
    expect(() => compileTrajectory({ minUm: 3, maxUm: 3, harmonics: [{ amplitude: 1, peakPhase: 0 }] })).toThrow(/maxUm > minUm/);
  });
});
