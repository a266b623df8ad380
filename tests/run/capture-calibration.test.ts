import { describe, expect, it } from 'vitest';
import { captureCalibration } from '../../src/run/capture-calibration.ts';
import { parseCalibration } from '../../adapters/calibration-file.ts';

describe('captureCalibration', () => {
  it('sets N = median fascicle × 1000 / assumed sarcomere length (the reference method)', () => {
    const result = captureCalibration('calf', 'human', Array.from({ length: 300 }, (_, i) => 54 + (i % 3) * 0.1), 2.7);
    expect(result.ok).toBe(true);
    if (!result.ok) return;
    expect(result.fascicleMm).toBeCloseTo(54.1, 9);
    expect(result.frame.sarcomeresInSeries).toBeCloseTo((54.1 * 1000) / 2.7, 6);
    expect(result.frame.source).toBe('runtime');
  });

  it('gives JSON that the calibration file reader accepts, ready to save and reuse', () => {
    const result = captureCalibration('calf', 'human', Array.from({ length: 100 }, () => 54), 2.7);
    if (!result.ok) throw new Error(result.message);
    const back = parseCalibration(JSON.parse(JSON.stringify(result.json)));
    expect(back.ok).toBe(true);
  });

  it('refuses an implausible assumed length and too few samples, saying what to do', () => {
    const tooLong = captureCalibration('calf', 'human', Array.from({ length: 100 }, () => 54), 9);
    expect(tooLong.ok).toBe(false);
    if (!tooLong.ok) expect(tooLong.message).toContain('between 1 and 5');
    const tooFew = captureCalibration('calf', 'human', [54, 54], 2.7);
    expect(tooFew.ok).toBe(false);
    if (!tooFew.ok) expect(tooFew.message).toContain('hold the posture');
  });
});
