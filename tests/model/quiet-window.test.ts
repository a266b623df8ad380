import { describe, expect, it } from 'vitest';
import { POSTURE_DISAGREEMENT_FRACTION, QUIET_SPREAD_FRACTION, sarcomereCountFromReference, summarizeWindow, twoPostureCount } from '../../src/model/quiet-window.ts';

describe('summarizeWindow', () => {
  it('takes the median of the lengths inside the window, ends included', () => {
    const s = summarizeWindow([0, 1, 2, 3, 4], [10, 50, 51, 49, 90], 1, 3);
    expect(s.count).toBe(3);
    expect(s.medianMm).toBe(50);
    expect(s.quiet).toBe(true);
  });

  it('calls a window quiet while its 5th–95th percentile range stays within 5% of the median', () => {
    expect(QUIET_SPREAD_FRACTION).toBe(0.05);
    const still = Array.from({ length: 100 }, (_, i) => 50 + 0.5 * Math.sin(i));
    const moving = Array.from({ length: 100 }, (_, i) => 50 + 5 * Math.sin(i / 5));
    const t = still.map((_, i) => i * 0.01);
    expect(summarizeWindow(t, still, 0, 1).quiet).toBe(true);
    const m = summarizeWindow(t, moving, 0, 1);
    expect(m.quiet).toBe(false);
    expect(m.spreadFraction).toBeGreaterThan(0.15);
  });

  it('gives count 0 and NaN figures for an empty window, and skips NaN lengths', () => {
    const empty = summarizeWindow([0, 1], [50, 50], 5, 6);
    expect(empty.count).toBe(0);
    expect(empty.medianMm).toBeNaN();
    expect(empty.quiet).toBe(false);
    expect(summarizeWindow([0, 1, 2], [50, Number.NaN, 52], 0, 2)).toMatchObject({ count: 2, medianMm: 51 });
  });

  it('takes the 5th and 95th percentiles linearly between order statistics (type 7, the usual default of statistics packages; common practice, no source)', () => {
    // 21 lengths 40, 41, …, 60 mm: type 7 puts the 5th percentile at the second (41) and the 95th at the twentieth (59).
    const mm = Array.from({ length: 21 }, (_, i) => 40 + i);
    const s = summarizeWindow(mm.map((_, i) => i), mm, 0, 20);
    expect(s).toMatchObject({ count: 21, medianMm: 50, p5Mm: 41, p95Mm: 59 });
    expect(s.spreadFraction).toBeCloseTo(18 / 50, 12);
  });

  it('gives the one value of a one-sample window', () => {
    expect(summarizeWindow([1], [48], 0, 2)).toMatchObject({ count: 1, medianMm: 48, p5Mm: 48, p95Mm: 48, quiet: true });
  });
});

describe('sarcomereCountFromReference', () => {
  it('is fascicle (mm) × 1000 / sarcomere length (µm)', () => {
    expect(sarcomereCountFromReference(54, 2.7)).toBeCloseTo(20_000, 9);
  });
});

describe('twoPostureCount', () => {
  // Vastus lateralis sarcomere lengths in vivo: 2.84 ± 0.16 µm at 50° and 3.17 ± 0.13 µm at 110° of knee flexion
  // (Chen, Sanchez, Schnitzer & Delp 2016, J Biomech 49:2989–2994, abstract). The fascicle lengths are invented.
  it('gives N = Δfascicle / Δsarcomere length: 10 mm over 2.84 → 3.17 µm is 30 303 sarcomeres', () => {
    const r = twoPostureCount({ fascicleMm: 80, sarcomereUm: 2.84 }, { fascicleMm: 90, sarcomereUm: 3.17 });
    expect(Math.round(r.count)).toBe(30_303);
  });

  it('does not depend on a constant part of the tracked length, which it returns', () => {
    // 86.06 mm of fascicle at 2.84 µm with 30 303 sarcomeres, plus 12 mm of tracked aponeurosis at both postures.
    const n = 10_000 / 0.33;
    const f1 = (n * 2.84) / 1000;
    const f2 = (n * 3.17) / 1000;
    const r = twoPostureCount({ fascicleMm: f1 + 12, sarcomereUm: 2.84 }, { fascicleMm: f2 + 12, sarcomereUm: 3.17 });
    expect(r.count).toBeCloseTo(n, 6);
    expect(r.offsetMm).toBeCloseTo(12, 9);
    // The single-posture counts take the 12 mm for sarcomeres: 4225 and 3785 too many (14 % high), yet only
    // 1.3 % apart — a constant part hides from one posture and shows only in the difference of two.
    expect(r.singleCounts[0]).toBeCloseTo(n + 12_000 / 2.84, 6);
    expect(r.singleCounts[1]).toBeCloseTo(n + 12_000 / 3.17, 6);
    expect(r.disagreement).toBeCloseTo(0.0128, 4);
    expect(r.disagreement).toBeLessThan(POSTURE_DISAGREEMENT_FRACTION);
  });

  it('agrees with both single-posture counts when there is no constant part', () => {
    const r = twoPostureCount({ fascicleMm: 56.8, sarcomereUm: 2.84 }, { fascicleMm: 63.4, sarcomereUm: 3.17 });
    expect(r.count).toBeCloseTo(20_000, 6);
    expect(r.singleCounts[0]).toBeCloseTo(20_000, 6);
    expect(r.disagreement).toBeCloseTo(0, 12);
    expect(r.offsetMm).toBeCloseTo(0, 9);
  });

  it('propagates the two SDs: between-person SDs of 0.16 and 0.13 µm leave N a relative SD of 0.62', () => {
    const r = twoPostureCount({ fascicleMm: 80, sarcomereUm: 2.84, sarcomereSdUm: 0.16 }, { fascicleMm: 90, sarcomereUm: 3.17, sarcomereSdUm: 0.13 });
    expect(r.relativeSd).toBeCloseTo(Math.hypot(0.16, 0.13) / 0.33, 12);
    expect(r.relativeSd).toBeCloseTo(0.62, 2);
  });
});
