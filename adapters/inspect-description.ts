/**
 * How a trial description will be read, without running the pipeline: each recording inspected as a
 * file of its own (through its mapping, its times on the trial's joint clock), the events file, the time
 * the recordings share, and what keeps them from fitting together (a muscle in two recordings, a clock
 * that does not overlap the others' by a stride). The files are read through, as `inspect` reads a file.
 */
import type { Side } from '../src/trial/records.ts';
import { sharedSpan, type RecordingSpan } from './clock-overlap.ts';
import { musclesInTwo } from './claim-muscles.ts';
import { clockProblems, resolveDescription, type GivenOptions, type Refusal } from './described-trial.ts';
import { inspectEvents, inspectFile, type InspectedEvents, type Inspection } from './inspect-file.ts';

export interface InspectedRecording extends Inspection {
  /** The mapping file it is read through; null: our own columns, or the command line's --mapping. */
  readonly mapping: string | null;
  readonly time_offset_s: number;
  /** Its first and last sample on the trial's joint clock (offset added); null without samples. */
  readonly first_s: number | null;
  readonly last_s: number | null;
}

export interface DescriptionInspection {
  readonly format: 'lengthwise-inspection';
  readonly version: 1;
  readonly file: string;
  /** What the file is: a trial description. */
  readonly description: true;
  readonly readable: boolean;
  readonly problem: string | null;
  readonly subject: string | null;
  readonly trial: string | null;
  /** The calibration file it names; null when none (or the command line's wins). */
  readonly calibration: string | null;
  /** Where the command line wins over the description. */
  readonly notes: readonly string[];
  readonly recordings: readonly InspectedRecording[];
  /** The time every recording covers on the joint clock; null when they share none. */
  readonly overlap: { readonly first_s: number; readonly last_s: number; readonly duration_s: number } | null;
  readonly events_file: InspectedEvents | null;
}

export interface InspectDescriptionOptions extends GivenOptions {
  /** Intervals longer than this are gaps, seconds (the pipeline's threshold). */
  readonly gapS: number;
  /** Sides given with --side alone (the inspection says where each side comes from). */
  readonly sideOption?: Readonly<Record<string, Side>>;
}

function span(i: Inspection): { first: number | null; last: number | null } {
  const muscles = Object.values(i.muscles);
  const firsts = muscles.flatMap((m) => (m.first_s === null ? [] : [m.first_s]));
  const lasts = muscles.flatMap((m) => (m.last_s === null ? [] : [m.last_s]));
  return { first: firsts.length > 0 ? Math.min(...firsts) : null, last: lasts.length > 0 ? Math.max(...lasts) : null };
}

/** Inspects the description at `path`; a description that is not accepted (or names a file that is not) is a Refusal. */
export async function inspectDescription(path: string, options: InspectDescriptionOptions): Promise<DescriptionInspection | Refusal> {
  const resolution = await resolveDescription(path, options);
  if (!resolution.ok) return resolution;
  const r = resolution.resolved;
  const events = r.events === null ? null : await inspectEvents(r.events.file, r.events.mapping, options.gapS);
  const recordings: InspectedRecording[] = [];
  for (const x of r.recordings) {
    const i = await inspectFile(x.file, {
      mapping: x.mapping,
      sides: options.sideOption ?? {},
      gapS: options.gapS,
      timeOffsetS: x.timeOffsetS,
      firstStrike: events?.firstStrike ?? null,
    });
    const s = span(i);
    recordings.push({ ...i, mapping: x.mappingPath, time_offset_s: x.timeOffsetS, first_s: s.first, last_s: s.last });
  }

  const problems: string[] = [];
  for (const rec of recordings) if (rec.problem !== null) problems.push(rec.problem);
  if (events !== null && events.events.problem !== null) problems.push(events.events.problem);
  problems.push(...musclesInTwo(recordings.map((rec) => ({ file: rec.file, muscles: Object.keys(rec.muscles) }))));
  const spans: RecordingSpan[] = recordings.map((rec) => ({ file: rec.file, offsetS: rec.time_offset_s, firstS: rec.first_s ?? Number.NaN, lastS: rec.last_s ?? Number.NaN }));
  problems.push(...(await clockProblems(spans, r.events)));
  const shared = sharedSpan(spans);
  const d = r.description;
  return {
    format: 'lengthwise-inspection',
    version: 1,
    file: path,
    description: true,
    readable: problems.length === 0,
    problem: problems.length === 0 ? null : problems.join('\n'),
    subject: d.subject,
    trial: d.trial,
    calibration: options.calibration === undefined ? d.calibration : null,
    notes: r.notes,
    recordings,
    overlap: shared === null ? null : { first_s: shared.firstS, last_s: shared.lastS, duration_s: shared.lastS - shared.firstS },
    events_file: events?.events ?? null,
  };
}
