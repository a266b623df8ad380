import type { OperatorFunction } from 'rxjs';
import type { Batch, Frame, Header } from '../trial/records.ts';
import { MAX_MUSCLES_PER_TRIAL } from '../trial/settings.ts';
import { MuscleRoster, tooManyMuscles } from '../trial/muscle-roster.ts';
import { statefulStage } from './stateful-stage.ts';

export interface LimitMusclesOptions {
  /** Most distinct muscles the trial takes. @default MAX_MUSCLES_PER_TRIAL */
  readonly maxMuscles?: number;
}

/** The rejection of a header that declares more muscles than the trial has room for. */
function tooManyDeclared(h: Header, roster: MuscleRoster): Frame {
  const names = Object.keys(h.muscles);
  return {
    kind: 'rejection',
    reason: 'too_many_muscles',
    message:
      `header declares ${roster.newNames(names)} muscles not yet seen, and the trial has ${roster.size} already: a trial takes at most ${roster.max} muscles; ` +
      'declare only the muscles the trial carries, or split the trial',
    line: h.line,
    excerpt: JSON.stringify({ format: 'lengthwise-stream', muscles: names.slice(0, 5) }).slice(0, 200),
  };
}

/**
 * Takes the trial's first maxMuscles muscles (named by samples or declared by headers, in order) and
 * rejects a sample of any further muscle, or a header declaring more, as too_many_muscles: every later
 * stage keeps state per muscle, so this bounds the trial's memory whatever names the input makes up.
 */
export function limitMuscles(options: LimitMusclesOptions = {}): OperatorFunction<Batch, Batch> {
  const max = options.maxMuscles ?? MAX_MUSCLES_PER_TRIAL;
  return statefulStage(() => {
    const roster = new MuscleRoster(max);
    return (batch) => {
      for (let i = 0; i < batch.length; i++) {
        const f = batch[i] as Frame;
        if (f.kind === 'sample') {
          if (!roster.admit(f.muscle)) batch[i] = tooManyMuscles(f, max, 'trial');
        } else if (f.kind === 'header') {
          const names = Object.keys(f.muscles);
          if (names.length > 0 && !roster.admitAll(names)) batch[i] = tooManyDeclared(f, roster);
        }
      }
      return batch;
    };
  });
}
