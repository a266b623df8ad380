import { describe, expect, it } from 'vitest';
import { QUIET_SPREAD_FRACTION, sarcomereCountFromReference, summarizeWindow } from '../../src/model/quiet-window.ts';

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

  it('gives the one value of a one-sample window', () => {
    expect(summarizeWindow([1], [48], 0, 2)).toMatchObject({ count: 1, medianMm: 48, p5Mm: 48, p95Mm: 48, quiet: true });
  });
});

describe('sarcomereCountFromReference', () => {
  it('is fascicle (mm) × 1000 / sarcomere length (µm)', () => {
    expect(sarcomereCountFromReference(54, 2.7)).toBeCloseTo(20_000, 9);
  });
});
