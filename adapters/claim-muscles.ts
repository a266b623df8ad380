/**
 * Each muscle of a trial comes from one recording: the first recording to carry a muscle claims it, and
 * a sample of that muscle from another recording stops the trial with both files named (two probes on
 * one muscle, or a mapping that names the wrong muscle, would otherwise interleave two signals as one).
 */
import { Observable, type OperatorFunction } from 'rxjs';
import type { Batch } from '../src/trial/records.ts';
import { MAX_MUSCLES_PER_TRIAL } from '../src/trial/settings.ts';
import { SourceFormatError } from './file-source.ts';

/**
 * Names claimed, at most: the trial takes MAX_MUSCLES_PER_TRIAL muscles and rejects samples of any
 * further one, so names beyond a few times that are not tracked (a flood of made-up names stays bounded).
 */
const MAX_CLAIMS = 4 * MAX_MUSCLES_PER_TRIAL;

/** What a muscle in two recordings is said as, wherever it is found. */
export function muscleInTwoMessage(muscle: string, first: string, second: string): string {
  return (
    `muscle "${muscle}" is in two recordings, ${first} and ${second}: a muscle may come from one recording only; ` +
    'leave it out of one (its mapping\'s "muscles", or rename it with "values": {"muscle": …}), or describe the two as two trials'
  );
}

/** Each muscle found in two of the recordings (their muscles as known so far), said as muscleInTwoMessage says it. */
export function musclesInTwo(recordings: readonly { readonly file: string; readonly muscles: readonly string[] }[]): string[] {
  const owner = new Map<string, string>();
  const problems: string[] = [];
  for (const r of recordings) {
    for (const m of r.muscles) {
      const other = owner.get(m);
      if (other === undefined) owner.set(m, r.file);
      else if (other !== r.file) problems.push(muscleInTwoMessage(m, other, r.file));
    }
  }
  return problems;
}

/** Which recording (by its place in the description) carries each muscle. */
export class MuscleClaims {
  private readonly owners = new Map<string, number>();

  constructor(readonly files: readonly string[]) {}

  /** Claims `muscle` for recording `index`; the other recording's index when it is already another's, else -1. */
  claim(muscle: string, index: number): number {
    const owner = this.owners.get(muscle);
    if (owner === undefined) {
      if (this.owners.size < MAX_CLAIMS) this.owners.set(muscle, index);
      return -1;
    }
    return owner === index ? -1 : owner;
  }
}

/** Claims the muscles of recording `index`' samples; errors (a SourceFormatError at the sample's line) on one another recording has. */
export function claimMuscles(claims: MuscleClaims, index: number): OperatorFunction<Batch, Batch> {
  const file = claims.files[index] ?? `recording ${index + 1}`;
  return (source) =>
    new Observable<Batch>((subscriber) => {
      let last = '';
      return source.subscribe({
        next: (batch) => {
          for (const f of batch) {
            if (f.kind !== 'sample' || f.muscle === last) continue;
            const other = claims.claim(f.muscle, index);
            if (other >= 0) {
              subscriber.error(new SourceFormatError(file, f.line, muscleInTwoMessage(f.muscle, claims.files[other] ?? `recording ${other + 1}`, file)));
              return;
            }
            last = f.muscle;
          }
          subscriber.next(batch);
        },
        error: (error: unknown) => subscriber.error(error),
        complete: () => subscriber.complete(),
      });
    });
}
