import type { Gap } from '../trial/records.ts';

/** Nothing is carried across a Gap: drops what a stage keeps for its muscle, or for every muscle when it names none. */
export function forgetAcrossGap(perMuscle: Map<string, unknown>, gap: Gap): void {
  if (gap.muscle === null) perMuscle.clear();
  else perMuscle.delete(gap.muscle);
}
