import { describe, expect, it } from 'vitest';
import { clockTime, elapsed, fixed, keepEnd, NO_VALUE, percent, signed } from '../../src/output/format.ts';

describe('format', () => {
  it('writes fixed decimals and a dash for what is unknown', () => {
    expect(fixed(2.7149, 2)).toBe('2.71');
    expect(fixed(Number.NaN, 2)).toBe(NO_VALUE);
    expect(fixed(Number.POSITIVE_INFINITY, 1)).toBe(NO_VALUE);
  });
  it('signs velocities with a true minus and no sign for zero', () => {
    expect(signed(-12.34, 1)).toBe('−12.3');
    expect(signed(5, 1)).toBe('+5.0');
    expect(signed(-0.01, 1)).toBe(' 0.0');
    expect(signed(Number.NaN, 1)).toBe(NO_VALUE);
  });
  it('writes elapsed time as m:ss.s, and h:mm:ss past an hour', () => {
    expect(elapsed(0)).toBe('0:00.0');
    expect(elapsed(12.46)).toBe('0:12.4');
    expect(elapsed(125.3)).toBe('2:05.3');
    expect(elapsed(3725)).toBe('1:02:05');
    expect(elapsed(Number.NaN)).toBe(NO_VALUE);
    expect(elapsed(-1)).toBe(NO_VALUE);
  });
  it('writes percentages without decimals', () => {
    expect(percent(0.634)).toBe('63%');
    expect(percent(Number.NaN)).toBe(NO_VALUE);
  });
  it('keeps the end of a long path', () => {
    expect(keepEnd('short', 10)).toBe('short');
    expect(keepEnd('replays/demo-walk.ndjson', 10)).toBe('…lk.ndjson');
    expect(keepEnd('abc', 1)).toBe('…');
    expect(keepEnd('abc', 0)).toBe('');
  });
  it('writes the time of day as HH:MM:SS', () => {
    expect(clockTime(new Date(2026, 0, 2, 3, 4, 5))).toBe('03:04:05');
  });
});
