/** Muscles named outside the trial (--side, a mapping's muscles, a calibration) that the trial lacks: said with both lists, so a misspelled name is found. */
import type { CalibrationSpec } from '../model/calibration.ts';
import type { Side } from '../trial/records.ts';
import type { TrialState } from '../trial/state.ts';

function quoted(names: readonly string[]): string {
  return names.length === 0 ? 'none' : names.map((n) => `"${n}"`).join(', ');
}

/** One sentence for each source of names that names muscles the trial lacks. */
export function namesMissingFromTrial(
  state: TrialState,
  named: { readonly sides?: Readonly<Record<string, Side>>; readonly calibration?: CalibrationSpec | undefined },
): string[] {
  const trial = [...state.muscles.values()].filter((m) => m.latest !== null).map((m) => m.name);
  const have = new Set(trial);
  const out: string[] = [];
  const check = (what: string, names: readonly string[]): void => {
    const lacking = names.filter((n) => !have.has(n));
    if (lacking.length > 0) out.push(`${what} names ${quoted(lacking)}, which the trial lacks; the trial has ${quoted(trial)}. Check the spelling of each name`);
  };
  check('the side settings (--side, the mapping\'s "muscles")', Object.keys(named.sides ?? {}));
  if (named.calibration !== undefined) check('the calibration', Object.keys(named.calibration.muscles));
  return out;
}
