/**
 * A trial description opened for a command: its mappings and calibration read, what the command line
 * gives put over it (each with a note), its recordings looked at (first and last rows) and checked
 * (each muscle in one recording, the clocks overlapping by a stride), and its records: every recording
 * read through its mapping, onto the joint clock, merged in time order as they are read, with the
 * events file's events merged in.
 */
import { concat, of, type Observable } from 'rxjs';
import type { Batch, Frame, Side } from '../src/trial/records.ts';
import type { CalibrationSpec } from '../src/model/calibration.ts';
import { readCalibrationFile } from './calibration-file.ts';
import { claimMuscles, MuscleClaims, musclesInTwo } from './claim-muscles.ts';
import { DEFAULT_STRIDE_S, overlapProblems, sharedSpan, type RecordingSpan } from './clock-overlap.ts';
import { EVENT_FIELDS, mappedSides, readDeviceMapping, type DeviceMapping, type EventField } from './device-mapping.ts';
import { fileSource } from './file-source.ts';
import { RECORDING_CHUNK_BYTES } from './limits.ts';
import { mergeByTime } from './merge-by-time.ts';
import { withEventsFile } from './merge-events.ts';
import { nameRejections } from './name-rejections.ts';
import { probeRecording, probeStrideS } from './recording-probe.ts';
import { shiftTimes } from './shift-times.ts';
import { readTrialDescription, type TrialDescription } from './trial-description.ts';

/** What the command line gives for a trial; each wins over the description's own, with a note. */
export interface GivenOptions {
  readonly calibration?: CalibrationSpec | undefined;
  /** Read every recording and the events file through this one (its "events" section for the events). */
  readonly mapping?: DeviceMapping | null | undefined;
  readonly eventsPath?: string | undefined;
  /** Muscles' sides given outside the description (--side, and a --mapping's). */
  readonly sides?: Readonly<Record<string, Side>> | undefined;
}

export interface ResolvedRecording {
  readonly file: string;
  readonly mapping: DeviceMapping | null;
  /** The mapping's file, or null (our own columns, or the command line's mapping). */
  readonly mappingPath: string | null;
  readonly timeOffsetS: number;
}

/** A description with its files read and the command line put over it. */
export interface ResolvedDescription {
  readonly description: TrialDescription;
  readonly recordings: readonly ResolvedRecording[];
  readonly events: { readonly file: string; readonly mapping: DeviceMapping | null } | null;
  readonly calibration: CalibrationSpec | undefined;
  readonly sides: Readonly<Record<string, Side>>;
  /** Where the command line won over the description, one sentence each. */
  readonly notes: readonly string[];
  /** Every file the trial reads: the description, then its recordings, mappings, events file and calibration, as used. */
  readonly files: readonly DescribedFile[];
}

/** A file a described trial reads, and what it is to the trial (as the outputs' provenance names it). */
export interface DescribedFile {
  readonly kind: 'description' | 'recording' | 'mapping' | 'events' | 'calibration';
  readonly path: string;
}

/** A trial description that cannot be used, as an error of the trial's records (see trialSource). */
export class TrialDescriptionError extends Error {
  override readonly name = 'TrialDescriptionError';
  readonly path: string;
  /** 2: a file it names is not accepted; 1: its recordings cannot be read or do not fit together. */
  readonly status: 1 | 2;

  constructor(path: string, status: 1 | 2, problem: string) {
    super(`${path}: ${problem}`);
    this.path = path;
    this.status = status;
  }
}

/** Why a description cannot be used: status 2 when a file it names is not accepted (as a bad option file), 1 when its recordings cannot be read or do not fit together. */
export type Refusal = { readonly ok: false; readonly status: 1 | 2; readonly message: string };

/**
 * The mapping that reads a description's events file: its "events" section, or, without one, its top
 * level (fields t, event, side, marker; its time unit, offset, words and table).
 */
function eventsReading(mapping: DeviceMapping): DeviceMapping {
  if (mapping.events !== null) return mapping;
  const given: Partial<Record<EventField, string>> = {};
  for (const f of EVENT_FIELDS) {
    const name = mapping.given[f];
    if (name !== undefined) given[f] = name;
  }
  return {
    ...mapping,
    events: {
      table: mapping.table,
      given,
      timeUnit: mapping.timeUnit,
      timeOffsetS: mapping.timeOffsetS,
      values: { event: mapping.values.event, side: mapping.values.side },
    },
  };
}

function refused(status: 1 | 2, message: string): Refusal {
  return { ok: false, status, message };
}

function errorText(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}

/** Reads the description and the files it names, and puts the command line over it. */
export async function resolveDescription(path: string, given: GivenOptions = {}): Promise<{ readonly ok: true; readonly resolved: ResolvedDescription } | Refusal> {
  const read = await readTrialDescription(path);
  if (!read.ok) return refused(2, `the trial description was not accepted:\n  ${read.problems.join('\n  ')}`);
  const d = read.description;
  const notes: string[] = [];
  const files: DescribedFile[] = [{ kind: 'description', path }];
  const commandMapping = given.mapping ?? null;

  // Each mapping file once, however many recordings share it.
  const mappings = new Map<string, DeviceMapping>();
  const mappingAt = async (file: string, of: string): Promise<DeviceMapping | Refusal> => {
    const known = mappings.get(file);
    if (known !== undefined) return known;
    const result = await readDeviceMapping(file);
    if (!result.ok) return refused(2, `the mapping of ${of} was not accepted:\n  ${result.problems.join('\n  ')}`);
    mappings.set(file, result.mapping);
    files.push({ kind: 'mapping', path: file });
    return result.mapping;
  };

  const described = [...d.recordings.map((r) => r.mapping), d.events?.mapping ?? null].filter((m): m is string => m !== null);
  if (commandMapping !== null && described.length > 0) {
    notes.push(`--mapping wins over the description's mappings (${[...new Set(described)].join(', ')}): every recording and the events file are read through it`);
  }
  const recordings: ResolvedRecording[] = [];
  for (const r of d.recordings) {
    files.push({ kind: 'recording', path: r.file });
    if (commandMapping !== null || r.mapping === null) {
      recordings.push({ file: r.file, mapping: commandMapping, mappingPath: null, timeOffsetS: r.timeOffsetS });
      continue;
    }
    const mapping = await mappingAt(r.mapping, r.file);
    if ('ok' in mapping) return mapping;
    recordings.push({ file: r.file, mapping, mappingPath: r.mapping, timeOffsetS: r.timeOffsetS });
  }

  // The events file: --events, or the description's; read through --mapping, or the description's events mapping.
  let events: ResolvedDescription['events'] = null;
  const eventsFile = given.eventsPath ?? d.events?.file ?? null;
  if (eventsFile !== null) {
    if (given.eventsPath !== undefined && d.events !== null) {
      const how = commandMapping === null && d.events.mapping !== null ? `; it is read through the description's events mapping (${d.events.mapping})` : '';
      notes.push(`--events wins over the description's events file (${d.events.file})${how}`);
    }
    files.push({ kind: 'events', path: eventsFile });
    let mapping = commandMapping;
    if (mapping === null && d.events !== null && d.events.mapping !== null) {
      const read = await mappingAt(d.events.mapping, eventsFile);
      if ('ok' in read) return read;
      mapping = eventsReading(read);
    }
    events = { file: eventsFile, mapping };
  }

  let calibration = given.calibration;
  if (d.calibration !== null) {
    if (calibration !== undefined) notes.push(`--calibration wins over the description's calibration (${d.calibration})`);
    else {
      const result = await readCalibrationFile(d.calibration);
      if (!result.ok) return refused(2, `the description's calibration was not accepted:\n  ${result.problems.join('\n  ')}`);
      calibration = result.spec;
      files.push({ kind: 'calibration', path: d.calibration });
    }
  }

  // Sides from the recordings' mappings (one side a muscle), then the command line's over them.
  const sides: Record<string, Side> = Object.assign(Object.create(null) as Record<string, Side>, mappedSides(commandMapping));
  const sideFrom = new Map<string, string>();
  for (const r of recordings) {
    if (r.mappingPath === null || r.mapping === null) continue;
    for (const [name, m] of Object.entries(r.mapping.muscles)) {
      if (m.side === undefined) continue;
      const before = sides[name];
      if (before !== undefined && before !== m.side) {
        return refused(2, `the trial description was not accepted:\n  muscle "${name}" is ${before} in ${sideFrom.get(name) ?? ''} and ${m.side} in ${r.mappingPath}: give each muscle one side`);
      }
      sides[name] = m.side;
      sideFrom.set(name, r.mappingPath);
    }
  }
  for (const [name, side] of Object.entries(given.sides ?? {})) {
    const before = sides[name];
    if (before !== undefined && before !== side) notes.push(`--side ${name}=${side} wins over ${sideFrom.get(name) ?? 'the description'}, which gives ${before}`);
    sides[name] = side;
  }
  return { ok: true, resolved: { description: d, recordings, events, calibration, sides, notes, files: files.filter((f, i) => files.findIndex((g) => g.path === f.path) === i) } };
}

export interface ReadOptions {
  /** true while the consumer wants no more read (a paced replay's read-ahead valve). */
  readonly pause$?: Observable<boolean> | undefined;
}

/** A description ready to play. */
export interface OpenedDescription {
  readonly resolved: ResolvedDescription;
  /** Each recording's span on the joint clock, from its first and last rows. */
  readonly spans: readonly RecordingSpan[];
  /** The time every recording covers, null when not known. */
  readonly shared: { readonly firstS: number; readonly lastS: number } | null;
  /** The trial's records: the description's own (its subject and trial, the notes), then the recordings merged in time order with the events. */
  readonly records: (options?: ReadOptions) => Observable<Batch>;
}

/** The frames a description puts before its recordings: a header with its subject and trial (when it gives them), and the notes. */
function openingFrames(r: ResolvedDescription): Frame[] {
  const out: Frame[] = [];
  const d = r.description;
  if (d.subject !== null || d.trial !== null) {
    out.push({ kind: 'header', ...(d.subject !== null ? { subject: d.subject } : {}), ...(d.trial !== null ? { trial: d.trial } : {}), muscles: {}, line: 0 });
  }
  for (const text of r.notes) out.push({ kind: 'notice', muscle: null, text });
  return out;
}

function recordsOf(r: ResolvedDescription): (options?: ReadOptions) => Observable<Batch> {
  return (options = {}) => {
    const claims = new MuscleClaims(r.recordings.map((x) => x.file));
    const merged = (): Observable<Batch> =>
      mergeByTime(
        r.recordings.map((x, i) => (pause$: Observable<boolean>) =>
          fileSource(x.file, { mapping: x.mapping, pause$, chunkBytes: RECORDING_CHUNK_BYTES }).pipe(shiftTimes(x.timeOffsetS), nameRejections(x.file), claimMuscles(claims, i)),
        ),
        options.pause$ !== undefined ? { pause$: options.pause$ } : {},
      );
    const opening = openingFrames(r);
    const body = r.events === null ? merged() : withEventsFile(r.events.file, r.events.mapping, merged);
    return opening.length > 0 ? concat(of(opening), body) : body;
  };
}

/**
 * The recordings whose clock does not overlap the others' by one stride (see overlapProblems): a stride's
 * length from the start of the events file, or a slow walking stride without one.
 */
export async function clockProblems(spans: readonly RecordingSpan[], events: ResolvedDescription['events']): Promise<string[]> {
  if (spans.length < 2) return [];
  const strideS = events === null ? null : await probeStrideS(events.file, events.mapping);
  return strideS === null
    ? overlapProblems(spans, DEFAULT_STRIDE_S, 'a slow walking stride, as no gait events tell one')
    : overlapProblems(spans, strideS, `the median time between foot strikes of one side at the start of ${events?.file ?? 'the events file'}`);
}

/**
 * Resolves the description, then looks at each recording's first and last rows: refuses a muscle in two
 * recordings and a recording whose clock does not overlap the others' by one stride, before anything plays.
 */
export async function openDescription(path: string, given: GivenOptions = {}): Promise<{ readonly ok: true; readonly opened: OpenedDescription } | Refusal> {
  const resolution = await resolveDescription(path, given);
  if (!resolution.ok) return resolution;
  const r = resolution.resolved;
  let probes;
  try {
    probes = await Promise.all(r.recordings.map((x) => probeRecording(x.file, x.mapping, x.timeOffsetS)));
  } catch (error) {
    return refused(1, errorText(error));
  }
  const [twice] = musclesInTwo(r.recordings.map((x, i) => ({ file: x.file, muscles: probes[i]?.muscles ?? [] })));
  if (twice !== undefined) return refused(1, twice);
  const spans: RecordingSpan[] = r.recordings.map((x, i) => ({ file: x.file, offsetS: x.timeOffsetS, firstS: probes[i]?.firstS ?? Number.NaN, lastS: probes[i]?.lastS ?? Number.NaN }));
  const problems = await clockProblems(spans, r.events);
  if (problems.length > 0) return refused(1, problems.join('\n'));
  return { ok: true, opened: { resolved: r, spans, shared: sharedSpan(spans), records: recordsOf(r) } };
}
