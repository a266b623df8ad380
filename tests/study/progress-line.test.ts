import { describe, expect, it } from 'vitest';
import { durationText, progressBar, progressFigures, rateText, secondsLeft } from '../../src/study/progress-line.ts';
import type { StudyProgress } from '../../src/study/run-study.ts';

const half: StudyProgress = { trialsTotal: 10, trialsDone: 5, trialsFailed: 0, bytesTotal: 1000, bytesDone: 500, samples: 200_000 };

describe('progress line', () => {
  it('writes rates in samples per second with k and M', () => {
    expect(rateText(0)).toBe('— samples/s');
    expect(rateText(Number.NaN)).toBe('— samples/s');
    expect(rateText(950)).toBe('950 samples/s');
    expect(rateText(12_345)).toBe('12.3 k samples/s');
    expect(rateText(2_500_000)).toBe('2.50 M samples/s');
  });

  it('writes durations as m:ss and h:mm:ss, and a dash when unknown', () => {
    expect(durationText(0)).toBe('0:00');
    expect(durationText(61.4)).toBe('1:01');
    expect(durationText(3725)).toBe('1:02:05');
    expect(durationText(Number.NaN)).toBe('—');
  });

  it('estimates the time left from the bytes still to read at the rate so far', () => {
    expect(secondsLeft(half, 4)).toBe(4);
    expect(secondsLeft({ ...half, bytesDone: 0 }, 4)).toBeNaN();
    expect(secondsLeft({ ...half, trialsDone: 10 }, 4)).toBe(0);
  });

  it('says trials done, failures, rate and time left', () => {
    expect(progressFigures(half, 4)).toBe('5/10 trials · 50.0 k samples/s · 0:04 left');
    expect(progressFigures({ ...half, trialsFailed: 2 }, 4)).toContain('5/10 trials, 2 failed');
    expect(progressFigures({ ...half, trialsFailed: 2 }, 4, 3)).toContain('5/10 trials, 2 failed, 3 with warnings ·');
    expect(progressBar(half, 4, 100, 1)).toContain('5/10 trials, 1 with warnings');
  });

  it('fills the bar with the bytes read and never passes the terminal width', () => {
    const line = progressBar(half, 4, 80);
    expect(line.length).toBeLessThan(80);
    const bar = line.split(' ')[0]!;
    expect([...bar].filter((c) => c === '█').length).toBe(Math.round(bar.length / 2));
    expect(progressBar(half, 4, 20).length).toBeLessThan(20);
    expect(progressBar({ ...half, bytesTotal: 0, bytesDone: 0 }, 4, 80)).toContain('5/10 trials');
  });
});
