import { describe, expect, it } from 'vitest';
import { shiftTimes } from '../../adapters/shift-times.ts';
import type { Frame } from '../../src/trial/records.ts';
import { header, runFrames, sample, strike } from '../helpers/frames.ts';

describe('shiftTimes', () => {
  it('adds the offset to every frame with a time and leaves the others as they are', async () => {
    const h = header();
    const rejected: Frame = { kind: 'rejection', reason: 'not_json', message: 'not JSON', line: 9, excerpt: '' };
    const out = await runFrames(shiftTimes(-412.35), [
      [h, sample(412.35, 'thigh', 80, { quality: 0.9, pennationDeg: 17 }), rejected],
      [strike(413, 'right'), { kind: 'marker', tS: 414, marker: 'belt on', line: 12 }],
    ]);
    expect(out[0]).toBe(h);
    expect(out[1]).toMatchObject({ kind: 'sample', muscle: 'thigh', fascicleMm: 80, quality: 0.9, pennationDeg: 17 });
    expect((out[1] as { tS: number }).tS).toBeCloseTo(0, 12);
    expect(out[2]).toBe(rejected);
    expect((out[3] as { tS: number }).tS).toBeCloseTo(0.65, 12);
    expect(out[4]).toMatchObject({ kind: 'marker', marker: 'belt on', line: 12 });
    expect((out[4] as { tS: number }).tS).toBeCloseTo(1.65, 12);
  });

  it('keeps a sample\'s line, and its enrichment fields unset, as the parser made it', async () => {
    const s = sample(1, 'calf', 50);
    const [out] = await runFrames(shiftTimes(2), [[s]]);
    expect(out).toEqual({ ...s, tS: 3 });
  });

  it('passes frames through untouched with no offset', async () => {
    const s = sample(1, 'calf', 50);
    const [out] = await runFrames(shiftTimes(0), [[s]]);
    expect(out).toBe(s);
  });
});
