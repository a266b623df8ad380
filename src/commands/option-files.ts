/**
 * The files that options name (--settings, --calibration, --mapping), read and checked the same way by
 * every command: a file that is not accepted is said with each problem, and the command exits 2 (usage).
 */
import { readCalibrationFile } from '../../adapters/calibration-file.ts';
import { mappedSides, readDeviceMapping, type DeviceMapping } from '../../adapters/device-mapping.ts';
import { putNamedSides } from '../../adapters/named-sides.ts';
import { readSettingsFile } from '../../adapters/settings-file.ts';
import { DEFAULT_SETTINGS, type Settings } from '../trial/settings.ts';
import type { CalibrationSpec } from '../model/calibration.ts';
import type { CommandIo } from '../run/io.ts';
import type { Side } from '../trial/records.ts';
import { pathClash, type NamedPath } from '../run/output-paths.ts';
import type { ProvenanceSources, RunInput } from '../run/run-provenance.ts';
import { sidecarPath } from '../output/run-provenance.ts';

/** --settings FILE: every processing choice (lengthwise-settings JSON); every command takes it. Read it with settingsOption. */
export const SETTINGS_OPTION = { settings: { type: 'string' } } as const;

/** --settings, --calibration and --mapping, the same in every command that runs trials; read them with trialFiles. */
export const TRIAL_FILE_OPTIONS = { ...SETTINGS_OPTION, calibration: { type: 'string' }, mapping: { type: 'string' } } as const;

/** --events (gait events from another system) and --side NAME=left|right (repeatable), for the commands that read recorded trials. */
export const TRIAL_INPUT_OPTIONS = { events: { type: 'string' }, side: { type: 'string', multiple: true } } as const;

/**
 * Reads the --side values (NAME=left|right, each muscle once) over the sides the mapping gives: a muscle
 * named by both takes --side. Null after saying what was wrong.
 */
export function sidesOption(command: string, mapping: DeviceMapping | undefined, given: readonly string[] | undefined, io: CommandIo): Record<string, Side> | null {
  const sides = mappedSides(mapping);
  const problem = putNamedSides(given ?? [], sides, { spaces: false });
  if (problem?.kind === 'not_a_side') {
    io.err(`lengthwise ${command}: --side "${problem.piece}" is not a side: give NAME=left or NAME=right, e.g. --side calf=right (once per muscle)`);
    return null;
  }
  if (problem?.kind === 'twice') {
    io.err(`lengthwise ${command}: --side names "${problem.name}" twice; give each muscle's side once`);
    return null;
  }
  return sides;
}

/** What a finished trial writes (--summary, --strides, --report; see finishTrial) and --plain, the same in live and replay. */
export const TRIAL_OUTPUT_OPTIONS = {
  summary: { type: 'string' },
  strides: { type: 'string' },
  report: { type: 'string' },
  plain: { type: 'boolean', default: false },
} as const;

/** The file's content; undefined when the option was not given; `refused` when it was said why not. */
export type OptionFile<T> = { readonly ok: true; readonly value: T | undefined } | { readonly ok: false };

function refuse(command: string, what: string, problems: readonly string[], io: CommandIo): { ok: false } {
  io.err(`lengthwise ${command}: the ${what} was not accepted:\n  ${problems.join('\n  ')}`);
  return { ok: false };
}

/** The settings a --settings file gives (every key it leaves out at its default), or the defaults without one. */
export async function settingsOption(command: string, path: string | undefined, io: CommandIo): Promise<{ readonly ok: true; readonly value: Settings } | { readonly ok: false }> {
  if (path === undefined) return { ok: true, value: DEFAULT_SETTINGS };
  const result = await readSettingsFile(path);
  return result.ok ? { ok: true, value: result.settings } : refuse(command, 'settings file', result.problems, io);
}

export async function calibrationOption(command: string, path: string | undefined, io: CommandIo): Promise<OptionFile<CalibrationSpec>> {
  if (path === undefined) return { ok: true, value: undefined };
  const result = await readCalibrationFile(path);
  return result.ok ? { ok: true, value: result.spec } : refuse(command, 'calibration', result.problems, io);
}

export async function mappingOption(command: string, path: string | undefined, io: CommandIo): Promise<OptionFile<DeviceMapping>> {
  if (path === undefined) return { ok: true, value: undefined };
  const result = await readDeviceMapping(path);
  return result.ok ? { ok: true, value: result.mapping } : refuse(command, 'device mapping', result.problems, io);
}

/** What a trial's --settings, --calibration and --mapping name. */
export interface TrialFiles {
  /** The effective settings: the file's over the defaults, or the defaults. */
  readonly settings: Settings;
  readonly calibration: CalibrationSpec | undefined;
  readonly mapping: DeviceMapping | undefined;
}

/** Reads the files a trial's options may name, the settings first, then the calibration; null once one was refused (and said why). */
export async function trialFiles(
  command: string,
  values: { readonly settings?: string | undefined; readonly calibration?: string | undefined; readonly mapping?: string | undefined },
  io: CommandIo,
): Promise<TrialFiles | null> {
  const settings = await settingsOption(command, values.settings, io);
  if (!settings.ok) return null;
  const calibration = await calibrationOption(command, values.calibration, io);
  if (!calibration.ok) return null;
  const mapping = await mappingOption(command, values.mapping, io);
  if (!mapping.ok) return null;
  return { settings: settings.value, calibration: calibration.value, mapping: mapping.value };
}

/** The paths among `values` of the given options, each named by its option. */
function optionPaths(options: object, values: Readonly<Record<string, unknown>>): NamedPath[] {
  const out: NamedPath[] = [];
  for (const key of Object.keys(options)) {
    const path = values[key];
    if (typeof path === 'string') out.push({ path, role: `--${key}` });
  }
  return out;
}

/** The files a trial's options name for reading (TRIAL_FILE_OPTIONS and TRIAL_INPUT_OPTIONS' --events). */
export function trialInputPaths(values: Readonly<Record<string, unknown>>): NamedPath[] {
  return optionPaths({ ...TRIAL_FILE_OPTIONS, events: TRIAL_INPUT_OPTIONS.events }, values);
}

/** The files a finished trial writes (TRIAL_OUTPUT_OPTIONS), the stride table's provenance beside it included. */
export function trialOutputPaths(values: Readonly<Record<string, unknown>>): NamedPath[] {
  const paths = optionPaths(TRIAL_OUTPUT_OPTIONS, values);
  const strides = values['strides'];
  if (typeof strides === 'string') paths.push({ path: sidecarPath(strides), role: "--strides's provenance (FILE.provenance.json)" });
  return paths;
}

/**
 * What a trial's outputs record as their provenance: the settings in effect and the files the options
 * name (the trial file and any others first, given in `first`).
 */
export function provenanceSources(
  settings: Settings,
  values: { readonly settings?: string | undefined; readonly calibration?: string | undefined; readonly mapping?: string | undefined; readonly events?: string | undefined },
  first: readonly RunInput[],
): ProvenanceSources {
  const named: RunInput[] = [];
  if (values.events !== undefined) named.push({ kind: 'events', path: values.events });
  if (values.mapping !== undefined) named.push({ kind: 'mapping', path: values.mapping });
  if (values.calibration !== undefined) named.push({ kind: 'calibration', path: values.calibration });
  if (values.settings !== undefined) named.push({ kind: 'settings', path: values.settings });
  return { settings, inputs: [...first, ...named], calibrationFile: values.calibration ?? null };
}

/**
 * Refuses, before any work, an output path that is an input, the session log or another output of the
 * run (see pathClash): says which and how to fix it. True when the paths are fine.
 */
export async function outputsApart(command: string, inputs: readonly NamedPath[], outputs: readonly NamedPath[], io: CommandIo): Promise<boolean> {
  const clash = await pathClash(inputs, outputs);
  if (clash !== null) io.err(`lengthwise ${command}: ${clash}`);
  return clash === null;
}
