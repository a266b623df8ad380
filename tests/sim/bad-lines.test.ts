import { describe, expect, it } from 'vitest';
import { badLineNdjson } from '../../src/sim/bad-lines.ts';
import { MAX_MUSCLES_PER_TRIAL } from '../../src/trial/settings.ts';

const CONTEXT = { tS: 1.005, muscle: 'calf', last: null, variant: 0, longLineChars: 100 };

describe('the too_many_muscles bad line', () => {
  it('declares one muscle more than a trial takes: the default cap, or the receiver\'s settings', () => {
    const declared = (line: string | null): number => Object.keys((JSON.parse(line ?? '{}') as { muscles: object }).muscles).length;
    expect(declared(badLineNdjson('too_many_muscles', CONTEXT))).toBe(MAX_MUSCLES_PER_TRIAL + 1);
    expect(declared(badLineNdjson('too_many_muscles', { ...CONTEXT, maxMuscles: 3 }))).toBe(4);
  });
});
