import { describe, expect, it } from 'vitest';
import { nameRejections } from '../../adapters/name-rejections.ts';
import type { Frame } from '../../src/trial/records.ts';
import { firstRejectionLines } from '../../src/trial/rejection-tally.ts';
import { runFrames, sample } from '../helpers/frames.ts';

describe('nameRejections', () => {
  it('names the file of each rejection and leaves other frames alone', async () => {
    const s = sample(0, 'calf', 50);
    const rejected: Frame = { kind: 'rejection', reason: 'out_of_range', message: 'fascicle is -3', line: 7, excerpt: '-3', field: 'fascicle' };
    const out = await runFrames(nameRejections('calf.csv'), [[s, rejected]]);
    expect(out).toEqual([s, { ...rejected, file: 'calf.csv' }]);
  });
});

describe('firstRejectionLines', () => {
  it('says the file before the line when a rejection names one, and the line alone otherwise', () => {
    const r = { kind: 'rejection', reason: 'out_of_range', message: 'fascicle is -3', line: 7, excerpt: '-3', field: 'fascicle' } as const;
    expect(firstRejectionLines([r, { ...r, file: 'calf.csv' }])).toBe('  line 7 (fascicle): fascicle is -3\n  calf.csv line 7 (fascicle): fascicle is -3');
  });
});
