/** A trial with no usable sample is a failure in every command, said one way: the commonest reasons and the first bad lines. */
import { nothingUsableMessage, type RejectionTally } from '../trial/rejection-tally.ts';
import type { TrialState } from '../trial/state.ts';

const HINT =
  'check that it is a lengthwise-stream trial (NDJSON, its CSV variant, or a session log), or read a table in your own columns ' +
  'through a mapping (--mapping FILE; lengthwise inspect FILE shows how a file is read)';

/** Why the trial gave no usable sample, or null when it gave some. */
export function noUsableSample(source: string, state: TrialState, tally: RejectionTally): string | null {
  const f = state.frames;
  if (f.accepted > 0) return null;
  return nothingUsableMessage('valid sample', source, f.received, tally, HINT);
}
