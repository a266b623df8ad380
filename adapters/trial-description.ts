/**
 * A trial description (lengthwise-trial, version 1): the files of one trial recorded by several probes,
 * each exported on its own and on its own clock, plus the gait events from another system and the
 * calibration. JSON, checked when it is read, never run as code:
 *
 *   {"format": "lengthwise-trial", "version": 1, "subject": "S01", "trial": "walk-1",
 *    "recordings": [{"file": "calf.csv", "mapping": "calf-map.json"},
 *                   {"file": "thigh.csv", "mapping": "thigh-map.json", "time_offset_s": -0.35}],
 *    "events": {"file": "events.tsv", "mapping": "events-map.json"},
 *    "calibration": "cal.json"}
 *
 * Paths are relative to the description's own folder (an absolute path stays as it is).
 */
import { open } from 'node:fs/promises';
import { dirname, isAbsolute, join, resolve } from 'node:path';
import { z } from 'zod';
import { readJsonFile, schemaProblems } from './json-file.ts';

export const TRIAL_DESCRIPTION_FORMAT = 'lengthwise-trial';

/** Most recordings one description may join (each reads its file as it plays; each muscle comes from one). */
export const MAX_RECORDINGS = 16;

/** One recording: its file, the mapping it is read through (null: our own columns), and its clock's offset. */
export interface DescribedRecording {
  /** The path as the commands open it (the description's folder joined to the path it gives). */
  readonly file: string;
  readonly mapping: string | null;
  /** Added to its times after the mapping's own conversion and offset, seconds. */
  readonly timeOffsetS: number;
}

export interface TrialDescription {
  /** The description file itself. */
  readonly path: string;
  readonly subject: string | null;
  readonly trial: string | null;
  readonly recordings: readonly DescribedRecording[];
  /** The gait events file and the mapping whose "events" section (or top level) describes it. */
  readonly events: { readonly file: string; readonly mapping: string | null } | null;
  readonly calibration: string | null;
}

export type DescriptionResult = { readonly ok: true; readonly description: TrialDescription } | { readonly ok: false; readonly problems: readonly string[] };

const pathText = z
  .string({ error: "must be a file's path (text), relative to the description's folder" })
  .min(1, { error: "must not be empty: give a file's path, relative to the description's folder" })
  .max(4096, { error: 'is too long for a path' });

const seconds = z.number({ error: 'must be a number of seconds' }).finite({ error: 'must be finite' });

const name = z.string({ error: 'must be text' }).min(1, { error: 'must not be empty' }).max(200, { error: 'must be at most 200 characters' });

export const trialDescriptionSchema = z.strictObject({
  format: z.literal(TRIAL_DESCRIPTION_FORMAT, { error: `must be "${TRIAL_DESCRIPTION_FORMAT}"` }),
  version: z.literal(1, { error: 'must be 1 (this reader reads version 1 of lengthwise-trial)' }),
  subject: name.optional(),
  trial: name.optional(),
  recordings: z
    .array(z.strictObject({ file: pathText, mapping: pathText.optional(), time_offset_s: seconds.optional() }), { error: 'must be a list of recordings' })
    .min(1, { error: 'must name at least one recording' })
    .max(MAX_RECORDINGS, { error: `may name at most ${MAX_RECORDINGS} recordings` }),
  events: z.strictObject({ file: pathText, mapping: pathText.optional() }).optional(),
  calibration: pathText.optional(),
});

export const DESCRIPTION_HOW_TO =
  'accepted: {"format": "lengthwise-trial", "version": 1, "subject"?: TEXT, "trial"?: TEXT, ' +
  '"recordings": [{"file": PATH, "mapping"?: PATH, "time_offset_s"?: S}, …], "events"?: {"file": PATH, "mapping"?: PATH}, ' +
  '"calibration"?: PATH} (paths relative to the description\'s folder; see the README\'s "Several recordings, one trial")';

/** A path the description gives, as the commands open it. */
function besideDescription(descriptionPath: string, path: string): string {
  return isAbsolute(path) ? path : join(dirname(descriptionPath), path);
}

/** Validates an already-parsed JSON value as a description at `path`; failures are sentences, never a throw. */
export function parseTrialDescription(value: unknown, path: string): DescriptionResult {
  const parsed = trialDescriptionSchema.safeParse(value);
  if (!parsed.success) return { ok: false, problems: schemaProblems(parsed.error, DESCRIPTION_HOW_TO, trialDescriptionSchema, value) };
  const d = parsed.data;
  const at = (p: string): string => besideDescription(path, p);
  const recordings = d.recordings.map((r) => ({ file: at(r.file), mapping: r.mapping === undefined ? null : at(r.mapping), timeOffsetS: r.time_offset_s ?? 0 }));
  const events = d.events === undefined ? null : { file: at(d.events.file), mapping: d.events.mapping === undefined ? null : at(d.events.mapping) };

  // A file read twice would give each of its records twice.
  const problems: string[] = [];
  const seen = new Map<string, string>();
  const named = [...recordings.map((r, i) => ({ key: `recordings[${i}].file`, file: r.file })), ...(events === null ? [] : [{ key: 'events.file', file: events.file }])];
  for (const { key, file } of named) {
    const same = seen.get(resolve(file));
    if (same !== undefined) problems.push(`${key} names the same file as ${same} (${file}): each file of a trial is read once; name each recording once`);
    else seen.set(resolve(file), key);
  }
  if (problems.length > 0) return { ok: false, problems };
  return {
    ok: true,
    description: { path, subject: d.subject ?? null, trial: d.trial ?? null, recordings, events, calibration: d.calibration === undefined ? null : at(d.calibration) },
  };
}

/** Reads and validates a description file; unreadable files and bad JSON are problems too. */
export function readTrialDescription(path: string): Promise<DescriptionResult> {
  return readJsonFile(path, 'trial description', DESCRIPTION_HOW_TO, (value) => parseTrialDescription(value, path));
}

/** Bytes of a file's start looked at to tell a description from a trial file. */
const SNIFF_BYTES = 4096;
const DESCRIPTION_START = new RegExp(`^\\s*\\{[\\s\\S]*"format"\\s*:\\s*"${TRIAL_DESCRIPTION_FORMAT}"`);

/**
 * True when the file at `path` is a trial description: a JSON object whose "format" (within its first
 * 4 KiB) is "lengthwise-trial". A trial file (NDJSON, a table) or a file that cannot be read is not.
 */
export async function isTrialDescription(path: string): Promise<boolean> {
  let handle;
  try {
    handle = await open(path, 'r');
  } catch {
    return false;
  }
  try {
    const buffer = Buffer.alloc(SNIFF_BYTES);
    const { bytesRead } = await handle.read(buffer, 0, SNIFF_BYTES, 0);
    let text = buffer.toString('utf8', 0, bytesRead);
    if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
    return DESCRIPTION_START.test(text);
  } catch {
    return false;
  } finally {
    await handle.close();
  }
}
