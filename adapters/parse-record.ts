/**
 * One lengthwise-stream record (an already-parsed JSON value) → one Frame.
 *
 * The zod schemas below are the edge's definition of what is valid. The common valid shapes (a sample,
 * a gait event, a marker, each with only its own keys) are recognised first by hand-written checks
 * that accept exactly what the schemas accept; anything else goes through the unsafe-key and depth
 * scan and then the schemas, which also give the rejection its message. Unknown extra keys are
 * allowed (and ignored), so a device may add fields without breaking older readers.
 */
import { z } from 'zod';
import { GAIT_EVENT_NAMES, makeSample, SIDES, type Frame, type Header, type MuscleDeclaration, type Rejection } from '../src/trial/records.ts';
import { REJECT_REASONS, type RejectReason } from '../src/trial/reasons.ts';
import { parseCalibration } from './calibration-file.ts';
import { markerFrame } from './old-link-marker.ts';
import { freshCopy } from './lexing.ts';
import { EXCERPT_CHARS, MAX_LINE_BYTES } from './limits.ts';

/** Deepest nesting accepted (the top-level object is level 1; a header's calibration needs 4). */
export const MAX_DEPTH = 8;
/** Longest live message accepted, in characters: as many as the line cap's bytes. */
export const MAX_MESSAGE_CHARS = MAX_LINE_BYTES;
/** Keys refused anywhere in a record, because they can alter objects' prototypes. */
export const UNSAFE_KEYS: ReadonlySet<string> = new Set(['__proto__', 'constructor', 'prototype']);

/** Pennation angles a sample may carry, degrees: the schema, the quick readings and the messages take the bounds from here. */
export const MIN_PENNATION_DEG = 0;
export const MAX_PENNATION_DEG = 90;
/** Tracking qualities a sample may carry: 0 (lost) to 1 (sure). */
export const MIN_QUALITY = 0;
export const MAX_QUALITY = 1;
/** An activation (e.g. an EMG envelope normalised to its maximum) lies in 0–1. */
export const MIN_ACTIVATION = 0;
export const MAX_ACTIVATION = 1;

const timeS = z.number();
export const sampleSchema = z.object({
  t: timeS,
  muscle: z.string().min(1),
  fascicle_mm: z.number().positive(),
  pennation_deg: z.number().min(MIN_PENNATION_DEG).max(MAX_PENNATION_DEG).optional(),
  quality: z.number().min(MIN_QUALITY).max(MAX_QUALITY).optional(),
  activation: z.number().min(MIN_ACTIVATION).max(MAX_ACTIVATION).optional(),
});
export const gaitEventSchema = z.object({ t: timeS, event: z.enum(GAIT_EVENT_NAMES), side: z.enum(SIDES) });
export const markerSchema = z.object({ t: timeS, marker: z.string() });
/** A lost live connection, as the session log writes it; `t` is left out when the connection carried no time. */
export const disconnectionSchema = z.object({
  t: timeS.optional(),
  disconnected: z.object({ muscles: z.array(z.string().min(1, 'must be a non-empty muscle name')).nullable(), detail: z.string() }),
});
/** Most records one rejection record may stand for. */
export const MAX_REJECTED_COUNT = 1_000_000_000;
/**
 * Records a session log received and rejected, one line per reason (see src/session-log/log-line.ts):
 * the reader counts them by their reason, so a replay of the log counts what the live session did.
 */
export const rejectedSchema = z.object({
  rejected: z.enum(REJECT_REASONS),
  count: z.number().int().min(1).max(MAX_REJECTED_COUNT).optional(),
  message: z.string().optional(),
  excerpt: z.string().optional(),
});
/** A live device whose clock restarted, as the session log writes it (its later records carry shifted times). */
export const clockResetSchema = z.object({
  t: timeS,
  clock_reset: z.object({
    offset_s: z.number(),
    muscles: z.array(z.string().min(1, 'must be a non-empty muscle name')).nullable(),
    detail: z.string(),
  }),
});
export const headerSchema = z.object({
  format: z.literal('lengthwise-stream'),
  version: z.literal(1),
  subject: z.string().optional(),
  trial: z.string().optional(),
  rate_hz: z.number().positive().optional(),
  muscles: z.record(z.string().min(1), z.object({ side: z.enum(SIDES).optional() })).optional(),
  /** Validated by parseCalibration (adapters/calibration-file.ts). */
  calibration: z.unknown().optional(),
});

type Kind = 'sample' | 'event' | 'marker' | 'disconnection' | 'clock_reset' | 'header' | 'rejected';

const SHAPE: Readonly<Record<Kind, string>> = {
  sample: '{"t": SECONDS, "muscle": "NAME", "fascicle_mm": MM, "pennation_deg"?: DEG, "quality"?: 0..1, "activation"?: 0..1}',
  event: '{"t": SECONDS, "event": "foot_strike"|"toe_off", "side": "left"|"right"}',
  marker: '{"t": SECONDS, "marker": "TEXT"}',
  disconnection: '{"t"?: SECONDS, "disconnected": {"muscles": ["NAME", …] | null, "detail": "TEXT"}}',
  clock_reset: '{"t": SECONDS, "clock_reset": {"offset_s": SECONDS, "muscles": ["NAME", …] | null, "detail": "TEXT"}}',
  header: '{"format": "lengthwise-stream", "version": 1, "subject"?, "trial"?, "rate_hz"?, "muscles"?, "calibration"?}',
  rejected: '{"rejected": "REASON", "count"?: N, "message"?: "TEXT", "excerpt"?: "TEXT"}',
};

/** What each field accepts, said the same way in every message. */
export const FIELD_RULE: Readonly<Record<string, string>> = {
  t: 'must be a finite number (seconds on the device clock)',
  muscle: 'must be a non-empty string (any name, e.g. "calf")',
  fascicle_mm: 'must be a finite number > 0 (millimetres); if your device sends metres, use a device mapping',
  pennation_deg: `must be a number from ${MIN_PENNATION_DEG} to ${MAX_PENNATION_DEG} (degrees), or left out when there is none`,
  quality: `must be a number from ${MIN_QUALITY} to ${MAX_QUALITY}, or left out when there is none`,
  activation: `must be a number from ${MIN_ACTIVATION} to ${MAX_ACTIVATION} (e.g. an EMG envelope normalised to its maximum), or left out when there is none`,
  event: 'must be "foot_strike" or "toe_off"',
  side: 'must be "left" or "right"',
  marker: 'must be a string',
  disconnected: 'must be an object {"muscles": ["NAME", …] | null, "detail": "TEXT"}',
  'disconnected.muscles': 'must be a list of muscle names, or null for every muscle',
  'disconnected.detail': 'must be a string',
  clock_reset: 'must be an object {"offset_s": SECONDS, "muscles": ["NAME", …] | null, "detail": "TEXT"}',
  'clock_reset.offset_s': 'must be a number (seconds added to the device\'s times)',
  'clock_reset.muscles': 'must be a list of muscle names, or null for every muscle',
  'clock_reset.detail': 'must be a string',
  format: 'must be "lengthwise-stream"',
  version: 'must be 1 (this reader reads version 1 of lengthwise-stream)',
  subject: 'must be a string, or left out',
  trial: 'must be a string, or left out',
  rate_hz: 'must be a finite number > 0 (samples per second), or left out',
  muscles: 'must be an object {NAME: {"side"?: "left"|"right"}}, or left out',
  rejected: `must be a reason code: ${REJECT_REASONS.join(', ')}`,
  count: `must be a whole number from 1 to ${MAX_REJECTED_COUNT}, or left out for one`,
};

/** Fields whose numeric values have a physically possible range: a number outside it is out_of_range. */
const RANGED_FIELDS: ReadonlySet<string> = new Set(['t', 'fascicle_mm', 'pennation_deg', 'quality', 'activation', 'rate_hz']);

/** A Rejection; the excerpt is cut to EXCERPT_CHARS and copied so it does not pin a large input string. */
export function makeRejection(reason: RejectReason, message: string, line: number, excerpt: string, field?: string): Rejection {
  const cut = excerpt.length > EXCERPT_CHARS ? excerpt.slice(0, EXCERPT_CHARS) : excerpt;
  const rejection: Rejection = { kind: 'rejection', reason, message, line, excerpt: freshCopy(cut) };
  return field === undefined ? rejection : { ...rejection, field };
}

/** The rejection of a line (or message) longer than the cap. */
export function tooLongRejection(line: number, lengthBytes: number, capBytes: number, excerpt: string): Rejection {
  return makeRejection(
    'line_too_long',
    `line is ${lengthBytes} bytes long: lines may be at most ${capBytes} bytes; ` +
      'put one record on each line (NDJSON), or raise the cap (maxLineBytes) if your records really are this long',
    line,
    excerpt,
  );
}

/** The rejection of text that is not JSON. */
function notJsonRejection(line: number, text: string, detail: string): Rejection {
  return makeRejection(
    'not_json',
    `line is not valid JSON (${detail}): each line must be one JSON object, e.g. ` +
      '{"t": 0.01, "muscle": "calf", "fascicle_mm": 52.3}; check that the file is NDJSON (one object per line), ' +
      'not a pretty-printed JSON document or a CSV file without its header row',
    line,
    text,
  );
}

/** What reading JSON text gives: the value, or the not_json rejection that says why it is not JSON. */
export type JsonRead = { readonly ok: true; readonly value: unknown } | { readonly ok: false; readonly rejection: Rejection };

/** JSON.parse that never throws: the value of `text`, or the not_json rejection of it as line `line`. */
export function readJson(text: string, line: number): JsonRead {
  try {
    return { ok: true, value: JSON.parse(text) as unknown };
  } catch (error) {
    return { ok: false, rejection: notJsonRejection(line, text, error instanceof Error ? error.message : String(error)) };
  }
}

function isPlainObject(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

/** Fast check for a sample with only sample keys; null when the schema must decide. */
/**
 * The receive time a session log adds to every record it writes. Like any unknown key the schemas ignore
 * it; the quick checks take it too, so replaying a log stays on the quick path.
 */
const RECEIVE_TIME_KEY = 'rx';

function quickSample(o: Record<string, unknown>, line: number): Frame | null {
  for (const key in o) {
    if (
      key !== 't' &&
      key !== 'muscle' &&
      key !== 'fascicle_mm' &&
      key !== 'pennation_deg' &&
      key !== 'quality' &&
      key !== 'activation' &&
      key !== RECEIVE_TIME_KEY
    ) {
      return null;
    }
  }
  const t = o['t'];
  const muscle = o['muscle'];
  const fascicleMm = o['fascicle_mm'];
  const p = o['pennation_deg'];
  const q = o['quality'];
  const a = o['activation'];
  if (typeof t !== 'number' || t - t !== 0) return null;
  if (typeof muscle !== 'string' || muscle.length === 0) return null;
  if (typeof fascicleMm !== 'number' || !(fascicleMm > 0) || fascicleMm === Infinity) return null;
  let pennationDeg = Number.NaN;
  if (p !== undefined) {
    if (typeof p !== 'number' || !(p >= MIN_PENNATION_DEG && p <= MAX_PENNATION_DEG)) return null;
    pennationDeg = p;
  }
  let quality = 1;
  if (q !== undefined) {
    if (typeof q !== 'number' || !(q >= MIN_QUALITY && q <= MAX_QUALITY)) return null;
    quality = q;
  }
  let activation = Number.NaN;
  if (a !== undefined) {
    if (typeof a !== 'number' || !(a >= MIN_ACTIVATION && a <= MAX_ACTIVATION)) return null;
    activation = a;
  }
  return makeSample(t, muscle, fascicleMm, pennationDeg, quality, line, activation);
}

function quickEvent(o: Record<string, unknown>, line: number): Frame | null {
  for (const key in o) if (key !== 't' && key !== 'event' && key !== 'side' && key !== RECEIVE_TIME_KEY) return null;
  const t = o['t'];
  const event = o['event'];
  const side = o['side'];
  if (typeof t !== 'number' || t - t !== 0) return null;
  if (event !== 'foot_strike' && event !== 'toe_off') return null;
  if (side !== 'left' && side !== 'right') return null;
  return { kind: 'event', tS: t, event, side, line };
}

function quickMarker(o: Record<string, unknown>, line: number): Frame | null {
  for (const key in o) if (key !== 't' && key !== 'marker' && key !== RECEIVE_TIME_KEY) return null;
  const t = o['t'];
  const marker = o['marker'];
  if (typeof t !== 'number' || t - t !== 0 || typeof marker !== 'string') return null;
  return markerFrame(t, marker, line);
}

interface ScanProblem {
  readonly reason: 'unsafe_key' | 'too_deep';
  readonly path: string;
  readonly key: string;
}

/** Looks for unsafe keys and for nesting deeper than MAX_DEPTH; never recurses past the cap. */
function scan(value: unknown, depth: number, path: string): ScanProblem | null {
  if (typeof value !== 'object' || value === null) return null;
  if (depth > MAX_DEPTH) return { reason: 'too_deep', path, key: '' };
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i++) {
      const problem = scan(value[i], depth + 1, `${path}[${i}]`);
      if (problem !== null) return problem;
    }
    return null;
  }
  for (const key of Object.keys(value)) {
    const where = path === '' ? key : `${path}.${key}`;
    if (UNSAFE_KEYS.has(key)) return { reason: 'unsafe_key', path: where, key };
    const problem = scan((value as Record<string, unknown>)[key], depth + 1, where);
    if (problem !== null) return problem;
  }
  return null;
}

function scanRejection(problem: ScanProblem, line: number, excerpt: string): Rejection {
  if (problem.reason === 'unsafe_key') {
    return makeRejection(
      'unsafe_key',
      `key "${problem.key}" at ${problem.path}: keys named __proto__, constructor or prototype are refused anywhere ` +
        'in a record because they can alter objects; rename the key (a muscle name may be any other text)',
      line,
      excerpt,
    );
  }
  return makeRejection(
    'too_deep',
    `nesting deeper than ${MAX_DEPTH} levels at ${problem.path || '(top level)'}: no record of the format needs ` +
      'more than 4 (a header with a calibration); send flat records as described under "Stream format" in the README',
    line,
    excerpt,
  );
}

function kindOf(o: Record<string, unknown>): Kind | null {
  if (Object.hasOwn(o, 'format')) return 'header';
  if (Object.hasOwn(o, 'disconnected')) return 'disconnection';
  if (Object.hasOwn(o, 'clock_reset')) return 'clock_reset';
  if (Object.hasOwn(o, 'event')) return 'event';
  if (Object.hasOwn(o, 'marker')) return 'marker';
  if (Object.hasOwn(o, 'muscle') || Object.hasOwn(o, 'fascicle_mm')) return 'sample';
  // Last: a record of another kind with a field of this name stays what it is.
  if (Object.hasOwn(o, 'rejected')) return 'rejected';
  return null;
}

function describe(value: unknown): string {
  if (typeof value === 'number') return String(value);
  if (typeof value === 'string') {
    const quoted = JSON.stringify(value.length > 40 ? `${value.slice(0, 40)}…` : value);
    return `the string ${quoted}`;
  }
  if (value === null) return 'null';
  if (Array.isArray(value)) return 'an array';
  return typeof value === 'object' ? 'an object' : typeof value;
}

function valueAt(o: unknown, path: readonly PropertyKey[]): unknown {
  let v: unknown = o;
  for (const key of path) {
    if (typeof v !== 'object' || v === null || !Object.hasOwn(v, key)) return undefined;
    v = (v as Record<PropertyKey, unknown>)[key];
  }
  return v;
}

function issueRejection(kind: Kind, o: Record<string, unknown>, issue: z.core.$ZodIssue, line: number, excerpt: string): Rejection {
  const path = issue.path;
  const field = typeof path[0] === 'string' ? path[0] : '';
  const where = path.map(String).join('.') || '(top level)';
  const value = valueAt(o, path);
  const present = value !== undefined;
  const last = path.length > 0 ? String(path[path.length - 1]) : '';
  const rule = FIELD_RULE[where] ?? FIELD_RULE[last] ?? issue.message;
  const record = kind === 'event' ? 'gait event' : kind;

  if (kind === 'event' && field === 'event' && path.length === 1 && typeof value === 'string') {
    return makeRejection(
      'unknown_event',
      `event is ${describe(value)}: the gait events are "foot_strike" and "toe_off"; ` +
        'send other device events as markers ({"t": SECONDS, "marker": "TEXT"})',
      line,
      excerpt,
      field,
    );
  }
  if (path.length === 1 && RANGED_FIELDS.has(field) && typeof value === 'number') {
    return makeRejection('out_of_range', `${field} is ${describe(value)}: ${rule}`, line, excerpt, field);
  }
  if (field === 'version' && typeof value === 'number') {
    return makeRejection(
      'schema',
      `header version is ${value}: this reader reads version 1 of lengthwise-stream; write version 1, or update lengthwise`,
      line,
      excerpt,
    );
  }
  const problem = present ? `is ${describe(value)}` : 'is missing';
  const named = kind === 'rejected' ? 'rejection record' : kind === 'clock_reset' ? 'clock reset' : record;
  return makeRejection('schema', `${named} ${where} ${problem}: ${rule}; accepted: ${SHAPE[kind]}`, line, excerpt, where === '(top level)' ? undefined : where);
}

function headerFrame(data: z.output<typeof headerSchema>, line: number, excerpt: string): Frame {
  const muscles: Record<string, MuscleDeclaration> = Object.create(null);
  if (data.muscles !== undefined) {
    for (const [name, declaration] of Object.entries(data.muscles)) {
      muscles[name] = declaration.side === undefined ? {} : { side: declaration.side };
    }
  }
  let header: Header = { kind: 'header', muscles, line };
  if (data.subject !== undefined) header = { ...header, subject: data.subject };
  if (data.trial !== undefined) header = { ...header, trial: data.trial };
  if (data.rate_hz !== undefined) header = { ...header, rateHz: data.rate_hz };
  if (data.calibration !== undefined) {
    const calibration = parseCalibration(data.calibration);
    if (!calibration.ok) {
      return makeRejection('schema', `header calibration is not valid: ${calibration.problems.join('; ')}`, line, excerpt);
    }
    header = { ...header, calibration: calibration.spec };
  }
  return header;
}

/**
 * An already-parsed value → one frame, by the schemas alone (no quick checks). The reference the quick
 * path is tested against; use parseRecordValue.
 */
export function parseRecordValueBySchema(value: unknown, line: number, excerpt: string): Frame {
  if (!isPlainObject(value)) {
    return makeRejection(
      'schema',
      `line is ${describe(value)}, not a record: each line must be one JSON object, e.g. ${SHAPE.sample}`,
      line,
      excerpt,
    );
  }
  const problem = scan(value, 1, '');
  if (problem !== null) return scanRejection(problem, line, excerpt);
  const kind = kindOf(value);
  if (kind === null) {
    return makeRejection(
      'schema',
      'object is not a record of the lengthwise-stream format: accepted are a sample ' +
        `${SHAPE.sample}, a gait event ${SHAPE.event}, a marker ${SHAPE.marker} or a header ${SHAPE.header}`,
      line,
      excerpt,
    );
  }
  switch (kind) {
    case 'sample': {
      const r = sampleSchema.safeParse(value);
      if (!r.success) return issueRejection(kind, value, firstIssue(r.error), line, excerpt);
      const d = r.data;
      return makeSample(d.t, d.muscle, d.fascicle_mm, d.pennation_deg ?? Number.NaN, d.quality ?? 1, line, d.activation ?? Number.NaN);
    }
    case 'event': {
      const r = gaitEventSchema.safeParse(value);
      if (!r.success) return issueRejection(kind, value, firstIssue(r.error), line, excerpt);
      return { kind: 'event', tS: r.data.t, event: r.data.event, side: r.data.side, line };
    }
    case 'marker': {
      const r = markerSchema.safeParse(value);
      if (!r.success) return issueRejection(kind, value, firstIssue(r.error), line, excerpt);
      return markerFrame(r.data.t, r.data.marker, line);
    }
    case 'disconnection': {
      const r = disconnectionSchema.safeParse(value);
      if (!r.success) return issueRejection(kind, value, firstIssue(r.error), line, excerpt);
      const { muscles, detail } = r.data.disconnected;
      return { kind: 'disconnection', tS: r.data.t ?? Number.NaN, muscles, detail, line };
    }
    case 'clock_reset': {
      const r = clockResetSchema.safeParse(value);
      if (!r.success) return issueRejection(kind, value, firstIssue(r.error), line, excerpt);
      const { offset_s: offsetS, muscles, detail } = r.data.clock_reset;
      return { kind: 'clock_reset', tS: r.data.t, offsetS, muscles, detail, line };
    }
    case 'header': {
      const r = headerSchema.safeParse(value);
      if (!r.success) return issueRejection(kind, value, firstIssue(r.error), line, excerpt);
      return headerFrame(r.data, line, excerpt);
    }
    case 'rejected': {
      const r = rejectedSchema.safeParse(value);
      if (!r.success) return issueRejection(kind, value, firstIssue(r.error), line, excerpt);
      const d = r.data;
      const rejection = makeRejection(d.rejected, d.message ?? `rejected as ${d.rejected} when it was received`, line, d.excerpt ?? '');
      return d.count === undefined || d.count === 1 ? rejection : { ...rejection, count: d.count };
    }
  }
}

function firstIssue(error: z.ZodError): z.core.$ZodIssue {
  // A failed safeParse always carries at least one issue.
  return error.issues[0] as z.core.$ZodIssue;
}

/** An already-parsed JSON value → one frame (a record, or a Rejection saying what failed). Never throws. */
export function parseRecordValue(value: unknown, line: number, excerpt: string): Frame {
  if (isPlainObject(value)) {
    let quick: Frame | null = null;
    if (typeof value['muscle'] === 'string') quick = quickSample(value, line);
    else if (typeof value['event'] === 'string') quick = quickEvent(value, line);
    else if (typeof value['marker'] === 'string') quick = quickMarker(value, line);
    if (quick !== null) return quick;
  }
  return parseRecordValueBySchema(value, line, excerpt);
}

/** One line of JSON text → one frame. */
export function parseJsonText(text: string, line: number): Frame {
  const json = readJson(text, line);
  return json.ok ? parseRecordValue(json.value, line, text) : json.rejection;
}

/**
 * A live WebSocket message → frames: one record, or a JSON array of records (devices batch them).
 * Element i of an array gets line number firstLine + i, so a caller counting messages advances its
 * counter by the number of frames returned. An empty array gives no frames. Text longer than maxChars
 * (default MAX_MESSAGE_CHARS) gives one line_too_long rejection.
 */
export function parseMessage(text: string, firstLine: number, maxChars: number = MAX_MESSAGE_CHARS): Frame[] {
  if (text.length > maxChars) {
    return [
      makeRejection(
        'line_too_long',
        `message is ${text.length} characters long: messages may be at most ${maxChars}; ` +
          'send smaller batches (an array of fewer records), or raise the cap',
        firstLine,
        text,
      ),
    ];
  }
  const json = readJson(text, firstLine);
  if (!json.ok) return [json.rejection];
  const value = json.value;
  if (!Array.isArray(value)) return [parseRecordValue(value, firstLine, text)];
  const frames: Frame[] = new Array<Frame>(value.length);
  for (let i = 0; i < value.length; i++) {
    const element: unknown = value[i];
    const frame = parseRecordValue(element, firstLine + i, '');
    frames[i] = frame.kind === 'rejection' ? { ...frame, excerpt: elementExcerpt(element) } : frame;
  }
  return frames;
}

/** The excerpt of one element of a message: its JSON text, cut to EXCERPT_CHARS. */
export function elementExcerpt(element: unknown): string {
  try {
    const text = JSON.stringify(element);
    return (text ?? String(element)).slice(0, EXCERPT_CHARS);
  } catch {
    return '(an element that cannot be shown)';
  }
}
