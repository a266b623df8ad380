import { describe, expect, it } from 'vitest';
import { lastValueFrom, of, toArray } from 'rxjs';
import { claimMuscles, MuscleClaims } from '../../adapters/claim-muscles.ts';
import { SourceFormatError } from '../../adapters/file-source.ts';
import type { Batch } from '../../src/trial/records.ts';
import { runFrames, sample } from '../helpers/frames.ts';

describe('claimMuscles', () => {
  it('lets each recording carry its own muscles', async () => {
    const claims = new MuscleClaims(['calf.csv', 'thigh.csv']);
    expect(await runFrames(claimMuscles(claims, 0), [[sample(0, 'calf', 50), sample(0.01, 'calf', 50)]])).toHaveLength(2);
    expect(await runFrames(claimMuscles(claims, 1), [[sample(0, 'thigh', 80)]])).toHaveLength(1);
  });

  it('stops the trial at a sample of a muscle another recording carries, naming both files and the line', async () => {
    const claims = new MuscleClaims(['calf.csv', 'thigh.csv']);
    await runFrames(claimMuscles(claims, 0), [[sample(0, 'calf', 50)]]);
    const late = sample(0.5, 'calf', 51);
    const error = await lastValueFrom(of<Batch>([sample(0, 'thigh', 80), late]).pipe(claimMuscles(claims, 1), toArray())).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(SourceFormatError);
    expect((error as Error).message).toBe(
      `thigh.csv line ${late.line}: muscle "calf" is in two recordings, calf.csv and thigh.csv: a muscle may come from one recording only; ` +
        'leave it out of one (its mapping\'s "muscles", or rename it with "values": {"muscle": …}), or describe the two as two trials',
    );
  });
});
