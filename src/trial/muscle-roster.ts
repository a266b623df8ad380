import { MAX_MUSCLES_PER_TRIAL } from './settings.ts';
import { sampleExcerpt, type Rejection, type Sample } from './records.ts';

/**
 * The muscles a trial (or one live device) takes: the first `max` distinct names, in the order samples
 * name them and headers declare them. Every part that keeps something per muscle before the pipeline's
 * own check (the recent fascicle lengths, a device's connection) keeps its own roster, fed the same
 * frames in the same order, so all of them take the same muscles.
 */
export class MuscleRoster {
  private readonly names = new Set<string>();

  constructor(readonly max: number = MAX_MUSCLES_PER_TRIAL) {}

  get size(): number {
    return this.names.size;
  }

  has(name: string): boolean {
    return this.names.has(name);
  }

  /** The names on the roster, in the order they went on. */
  list(): string[] {
    return [...this.names];
  }

  /** True when the name is on the roster, or has room to go on it now (it then is). */
  admit(name: string): boolean {
    if (this.names.has(name)) return true;
    if (this.names.size >= this.max) return false;
    this.names.add(name);
    return true;
  }

  /** How many of these names are not on the roster yet. */
  newNames(names: readonly string[]): number {
    let n = 0;
    for (const name of names) if (!this.names.has(name)) n++;
    return n;
  }

  /** Every name goes on, or none when they do not all fit: true when they are all on it now. */
  admitAll(names: readonly string[]): boolean {
    if (this.names.size + this.newNames(names) > this.max) return false;
    for (const name of names) this.names.add(name);
    return true;
  }
}

/** A name as a message shows it: quoted, and cut to 40 characters. */
export function shownName(name: string): string {
  return JSON.stringify(name.length > 40 ? `${name.slice(0, 40)}…` : name);
}

/** The rejection of a sample whose muscle would go past a roster of `max` (a trial's, or one live device's). */
export function tooManyMuscles(s: Sample, max: number, of: 'trial' | 'device'): Rejection {
  return {
    kind: 'rejection',
    reason: 'too_many_muscles',
    message:
      `muscle ${shownName(s.muscle)} would be muscle ${max + 1} of this ${of}: a ${of} ${of === 'trial' ? 'takes' : 'may carry'} at most ${max} muscles; ` +
      'check that each muscle keeps one name (no counter or time in it), or split the trial',
    line: s.line,
    excerpt: sampleExcerpt(s),
  };
}
