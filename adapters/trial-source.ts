/**
 * A trial as the commands read it: a trial file (fileSource), with, when an events file is given, its
 * rejections first and then the trial's frames with its events merged in time order; or a trial
 * description (lengthwise-trial JSON), whose recordings are merged in time order on one clock.
 *
 * openTrial also says what the trial runs with besides its records (calibration, sides, the notes where
 * the command line won over a description, the files it reads); trialSource gives its records alone.
 */
import { defer, from, mergeMap, throwError, type Observable } from 'rxjs';
import type { Batch, Side } from '../src/trial/records.ts';
import type { CalibrationSpec } from '../src/model/calibration.ts';
import { mappedSides } from './device-mapping.ts';
import { openDescription, TrialDescriptionError, type DescribedFile, type GivenOptions } from './described-trial.ts';
import { fileSource, type FileSourceOptions } from './file-source.ts';
import { withEventsFile } from './merge-events.ts';
import { isTrialDescription } from './trial-description.ts';

export interface TrialSourceOptions extends FileSourceOptions {
  /** The file given with --events (gait events from another system), read through the mapping's "events". */
  readonly eventsPath?: string | undefined;
}

/** A trial file's records, with the --events file merged in. */
function fileTrial(path: string, options: TrialSourceOptions): Observable<Batch> {
  const { eventsPath, ...fileOptions } = options;
  if (eventsPath === undefined) return fileSource(path, fileOptions);
  return withEventsFile(eventsPath, options.mapping ?? null, () => fileSource(path, fileOptions), {
    ...(options.maxLineBytes !== undefined ? { maxLineBytes: options.maxLineBytes } : {}),
    ...(options.chunkBytes !== undefined ? { chunkBytes: options.chunkBytes } : {}),
  });
}

/** A trial (a file, or a description) ready to run. */
export interface OpenedTrial {
  /** Its records, read as they are played; `pause$` stops reading while it says true. */
  readonly records: (pause$?: Observable<boolean>) => Observable<Batch>;
  /** The calibration given (on the command line, or the description's). */
  readonly calibration: CalibrationSpec | undefined;
  /** Muscles' sides from outside the stream (the mappings', --side). */
  readonly sides: Readonly<Record<string, Side>>;
  /** Where the command line won over a description (they also go into the trial's notes). */
  readonly notes: readonly string[];
  /** Every file a description's trial reads, the description first; null for a trial file. */
  readonly files: readonly DescribedFile[] | null;
  /** The time a description's recordings span together on its clock (from their first and last rows); null for a trial file. */
  readonly spanS: { readonly firstS: number; readonly lastS: number } | null;
}

export type OpenTrialResult = { readonly ok: true; readonly trial: OpenedTrial } | { readonly ok: false; readonly status: 1 | 2; readonly message: string };

/**
 * Opens the trial at `path` with what the command line gives: a trial file as it is, a description with
 * its files read and checked (see openDescription). `given.sides` are the command line's (--side and a
 * --mapping's); a trial file also takes the sides of `given.mapping`.
 */
export async function openTrial(path: string, given: GivenOptions): Promise<OpenTrialResult> {
  if (await isTrialDescription(path)) {
    const result = await openDescription(path, given);
    if (!result.ok) return result;
    const { opened } = result;
    return {
      ok: true,
      trial: {
        records: (pause$) => opened.records({ pause$ }),
        calibration: opened.resolved.calibration,
        sides: opened.resolved.sides,
        notes: opened.resolved.notes,
        files: opened.resolved.files,
        spanS: opened.shared ?? spanOf(opened.spans),
      },
    };
  }
  const mapping = given.mapping ?? null;
  return {
    ok: true,
    trial: {
      records: (pause$) => fileTrial(path, { mapping, eventsPath: given.eventsPath, ...(pause$ !== undefined ? { pause$ } : {}) }),
      calibration: given.calibration,
      sides: { ...mappedSides(mapping), ...given.sides },
      notes: [],
      files: null,
      spanS: null,
    },
  };
}

/** The whole time the recordings span, when they share none. */
function spanOf(spans: readonly { readonly firstS: number; readonly lastS: number }[]): { firstS: number; lastS: number } | null {
  const firstS = Math.min(...spans.map((s) => s.firstS));
  const lastS = Math.max(...spans.map((s) => s.lastS));
  return Number.isFinite(firstS) && Number.isFinite(lastS) && lastS > firstS ? { firstS, lastS } : null;
}

/**
 * The records of the trial at `path`: a trial file (with the --events file merged in), or a trial
 * description's recordings (the options' mapping and events file winning over its own). A description
 * that cannot be used errors with a SourceFormatError saying why.
 */
export function trialSource(path: string, options: TrialSourceOptions = {}): Observable<Batch> {
  return defer(() => from(isTrialDescription(path))).pipe(
    mergeMap((described) => {
      if (!described) return fileTrial(path, options);
      return from(openDescription(path, { mapping: options.mapping ?? null, eventsPath: options.eventsPath })).pipe(
        mergeMap((result) => (result.ok ? result.opened.records({ pause$: options.pause$ }) : throwError(() => new TrialDescriptionError(path, result.status, result.message)))),
      );
    }),
  );
}
