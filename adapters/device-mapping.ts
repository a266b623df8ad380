/**
 * Device mappings and live message decoding.
 *
 * Devices name their fields and choose their units their own way. A mapping file (lengthwise-mapping,
 * version 1; JSON, validated here, no code evaluated) says which of the device's fields is which of ours
 * and in which units the device sends them; decodeMessage then turns each record of a message into our
 * lengthwise-stream record before the ordinary record parser (parse-record.ts) judges it, so a mapped
 * record is accepted or rejected exactly like a native one.
 */
import { readJsonFile, schemaProblems } from './json-file.ts';
import { z } from 'zod';
import type { Frame, Rejection, Sample } from '../src/trial/records.ts';
import { MAX_LINE_BYTES } from './limits.ts';
import { elementExcerpt, makeRejection, MAX_MESSAGE_CHARS, parseMessage, parseRecordValue, readJson } from './parse-record.ts';

export const LENGTH_UNITS = ['m', 'cm', 'mm'] as const;
export const ANGLE_UNITS = ['rad', 'deg'] as const;
export const TIME_UNITS = ['s', 'ms', 'us', 'µs'] as const;
export type LengthUnit = (typeof LENGTH_UNITS)[number];
export type AngleUnit = (typeof ANGLE_UNITS)[number];
export type TimeUnit = (typeof TIME_UNITS)[number];

/** Our record fields a mapping may rename. */
export const MAPPED_FIELDS = ['t', 'muscle', 'fascicle', 'pennation', 'quality', 'activation', 'event', 'side', 'marker'] as const;
export type MappedField = (typeof MAPPED_FIELDS)[number];

/** The field of a lengthwise-stream record each mapped field becomes. */
const OUR_KEY: Readonly<Record<MappedField, string>> = {
  t: 't',
  muscle: 'muscle',
  fascicle: 'fascicle_mm',
  pennation: 'pennation_deg',
  quality: 'quality',
  activation: 'activation',
  event: 'event',
  side: 'side',
  marker: 'marker',
};

const OUR_KEYS: ReadonlySet<string> = new Set(Object.values(OUR_KEY));

const MM_PER: Readonly<Record<LengthUnit, number>> = { m: 1000, cm: 10, mm: 1 };
const DEG_PER: Readonly<Record<AngleUnit, number>> = { rad: 180 / Math.PI, deg: 1 };
const S_PER: Readonly<Record<TimeUnit, number>> = { s: 1, ms: 1e-3, us: 1e-6, µs: 1e-6 };

/** A validated mapping, ready to apply. */
export interface DeviceMapping {
  /** Free text naming the device (for messages). */
  readonly device: string;
  /** Our field → the device's field name. Fields left out keep our own name. */
  readonly fields: Readonly<Record<MappedField, string>>;
  readonly lengthUnit: LengthUnit;
  readonly angleUnit: AngleUnit;
  readonly timeUnit: TimeUnit;
  /** Added to the device time after the unit conversion, seconds. */
  readonly timeOffsetS: number;
  /** The device's words for our values: event names, sides, muscle names. */
  readonly values: {
    readonly event: Readonly<Record<string, string>>;
    readonly side: Readonly<Record<string, string>>;
    readonly muscle: Readonly<Record<string, string>>;
  };
}

const fieldName = z.string().min(1, { error: 'a device field name must not be empty' });
const words = z.record(z.string(), z.string()).optional();

export const deviceMappingSchema = z.strictObject(
  {
    format: z.literal('lengthwise-mapping', { error: 'must be "lengthwise-mapping"' }),
    version: z.literal(1, { error: 'must be 1 (this reader reads version 1 of lengthwise-mapping)' }),
    device: z.string().optional(),
    fields: z
      .strictObject(
        {
          t: fieldName.optional(),
          muscle: fieldName.optional(),
          fascicle: fieldName.optional(),
          pennation: fieldName.optional(),
          quality: fieldName.optional(),
          activation: fieldName.optional(),
          event: fieldName.optional(),
          side: fieldName.optional(),
          marker: fieldName.optional(),
        },
        { error: `unknown key in "fields"; accepted: ${MAPPED_FIELDS.join(', ')}` },
      )
      .optional(),
    units: z
      .strictObject(
        {
          length: z.enum(LENGTH_UNITS, { error: 'accepted: "m", "cm" or "mm"' }).optional(),
          angle: z.enum(ANGLE_UNITS, { error: 'accepted: "rad" or "deg"' }).optional(),
          time: z.enum(TIME_UNITS, { error: 'accepted: "s", "ms", "us" or "µs"' }).optional(),
        },
        { error: 'unknown key in "units"; accepted: length, angle, time' },
      )
      .optional(),
    time_offset_s: z.number({ error: 'must be a number of seconds' }).finite({ error: 'must be finite' }).optional(),
    values: z
      .strictObject({ event: words, side: words, muscle: words }, { error: 'unknown key in "values"; accepted: event, side, muscle' })
      .optional(),
  },
  { error: 'unknown key; accepted: format, version, device, fields, units, time_offset_s, values' },
);

export const MAPPING_HOW_TO =
  'accepted: {"format": "lengthwise-mapping", "version": 1, "device"?: TEXT, ' +
  `"fields"?: {OUR: DEVICE_FIELD} with OUR among ${MAPPED_FIELDS.join(', ')}, ` +
  '"units"?: {"length"?: "m"|"cm"|"mm", "angle"?: "rad"|"deg", "time"?: "s"|"ms"|"us"}, "time_offset_s"?: S, ' +
  '"values"?: {"event"?: {DEVICE: "foot_strike"|"toe_off"}, "side"?: {DEVICE: "left"|"right"}, "muscle"?: {DEVICE: NAME}}} ' +
  '(examples in adapters/mappings/)';

export type MappingResult = { readonly ok: true; readonly mapping: DeviceMapping } | { readonly ok: false; readonly problems: readonly string[] };

function record(entries: Record<string, string> | undefined): Readonly<Record<string, string>> {
  const out: Record<string, string> = Object.create(null);
  if (entries !== undefined) for (const [k, v] of Object.entries(entries)) out[k] = v;
  return out;
}

/** Validates an already-parsed JSON value as a mapping; failures are sentences, never a throw. */
export function parseDeviceMapping(value: unknown): MappingResult {
  const parsed = deviceMappingSchema.safeParse(value);
  if (!parsed.success) return { ok: false, problems: schemaProblems(parsed.error, MAPPING_HOW_TO) };
  const d = parsed.data;
  const fields = {} as Record<MappedField, string>;
  for (const f of MAPPED_FIELDS) fields[f] = d.fields?.[f] ?? OUR_KEY[f];
  const seen = new Map<string, MappedField>();
  for (const f of MAPPED_FIELDS) {
    const other = seen.get(fields[f]);
    if (other !== undefined) {
      return { ok: false, problems: [`fields: "${other}" and "${f}" both read the device field "${fields[f]}"; give each of our fields its own device field`] };
    }
    seen.set(fields[f], f);
  }
  return {
    ok: true,
    mapping: {
      device: d.device ?? 'device',
      fields,
      lengthUnit: d.units?.length ?? 'mm',
      angleUnit: d.units?.angle ?? 'deg',
      timeUnit: d.units?.time ?? 's',
      timeOffsetS: d.time_offset_s ?? 0,
      values: { event: record(d.values?.event), side: record(d.values?.side), muscle: record(d.values?.muscle) },
    },
  };
}

/** Reads and validates a mapping file; unreadable files and bad JSON are problems too. */
export function readDeviceMapping(path: string): Promise<MappingResult> {
  return readJsonFile(path, 'mapping', MAPPING_HOW_TO, parseDeviceMapping);
}

function scaled(value: unknown, factor: number, offset = 0): unknown {
  return typeof value === 'number' ? value * factor + offset : value;
}

function word(value: unknown, words: Readonly<Record<string, string>>): unknown {
  return typeof value === 'string' && Object.hasOwn(words, value) ? words[value] : value;
}

/**
 * One device record (a parsed JSON value) → a lengthwise-stream record. Mapped fields are renamed and
 * converted; every other key is passed through unchanged, so the parser still refuses unsafe keys and
 * deep nesting. A value that is not an object is returned as it is (the parser rejects it).
 */
export function applyMapping(value: unknown, mapping: DeviceMapping): unknown {
  if (typeof value !== 'object' || value === null || Array.isArray(value)) return value;
  const device = value as Record<string, unknown>;
  // No prototype: a "__proto__" key passes through as an own key (and is then refused by the parser).
  const out: Record<string, unknown> = Object.create(null);
  for (const key of Object.keys(device)) {
    if (!OUR_KEYS.has(key) && !Object.values(mapping.fields).includes(key)) out[key] = device[key];
  }
  const put = (f: MappedField, convert: (v: unknown) => unknown): void => {
    const from = mapping.fields[f];
    if (Object.hasOwn(device, from)) out[OUR_KEY[f]] = convert(device[from]);
  };
  put('t', (v) => scaled(v, S_PER[mapping.timeUnit], mapping.timeOffsetS));
  put('muscle', (v) => word(v, mapping.values.muscle));
  put('fascicle', (v) => scaled(v, MM_PER[mapping.lengthUnit]));
  put('pennation', (v) => scaled(v, DEG_PER[mapping.angleUnit]));
  put('quality', (v) => v);
  put('activation', (v) => v);
  put('event', (v) => word(v, mapping.values.event));
  put('side', (v) => word(v, mapping.values.side));
  put('marker', (v) => v);
  return out;
}

/** Longest live message accepted, in bytes: the same cap as a line of a file. */
export const MAX_MESSAGE_BYTES = MAX_LINE_BYTES;

/** The rejection of a message over the byte cap; made from its first bytes only. */
export function oversizeRejection(line: number, lengthBytes: number, capBytes: number, start: string): Rejection {
  return makeRejection(
    'line_too_long',
    `message is ${lengthBytes} bytes long: messages may be at most ${capBytes} bytes; ` +
      'send smaller batches (a JSON array of fewer records)',
    line,
    start,
  );
}

/**
 * Each header frame decoded from a message → its record as JSON text of our format. The session log
 * writes headers from this (a header's calibration is kept as the device sent it); other frames carry
 * all they need themselves.
 */
const headerJson = new WeakMap<Frame, string>();

/** The JSON text of a decoded header frame (see decodeMessage), or undefined. */
export function headerJsonOf(frame: Frame): string | undefined {
  return headerJson.get(frame);
}

function rememberHeaders(frames: readonly Frame[], values: () => readonly unknown[]): void {
  let got: readonly unknown[] | null = null;
  for (let i = 0; i < frames.length; i++) {
    const f = frames[i] as Frame;
    if (f.kind !== 'header') continue;
    got ??= values();
    try {
      const text = JSON.stringify(got[i]);
      if (text !== undefined) headerJson.set(f, text);
    } catch {
      // A value that cannot be shown again: the log falls back to the header's own fields.
    }
  }
}

/**
 * A live message → frames: one record, or a JSON array of records, each judged by the record parser
 * (through the mapping when one is given). Element i gets line firstLine + i. Never throws.
 */
export function decodeMessage(text: string, firstLine: number, mapping: DeviceMapping | null = null, maxChars = MAX_MESSAGE_CHARS): Frame[] {
  if (mapping === null) {
    const frames = parseMessage(text, firstLine, maxChars);
    rememberHeaders(frames, () => {
      const value: unknown = JSON.parse(text);
      return Array.isArray(value) ? value : [value];
    });
    return frames;
  }
  if (text.length > maxChars) return parseMessage(text, firstLine, maxChars);
  const json = readJson(text, firstLine);
  if (!json.ok) return [json.rejection];
  const elements: unknown[] = Array.isArray(json.value) ? json.value : [json.value];
  const mapped = elements.map((e) => applyMapping(e, mapping));
  const frames = mapped.map((m, i) => {
    const frame = parseRecordValue(m, firstLine + i, '');
    return frame.kind === 'rejection' ? { ...frame, excerpt: elementExcerpt(elements[i]) } : frame;
  });
  rememberHeaders(frames, () => mapped);
  return frames;
}

/** Below this a fascicle "length in mm" is almost surely in metres (no muscle has sub-millimetre fascicles). */
export const METRES_SUSPECT_MM = 1;

/**
 * A sentence when a muscle's fascicle length looks like it is in the wrong unit (0.05 "mm" is 50 mm sent
 * in metres), else null. Said once per muscle by the command; the sample itself is still accepted.
 */
export function unitHint(sample: Sample, mapping: DeviceMapping | null): string | null {
  if (!(sample.fascicleMm < METRES_SUSPECT_MM)) return null;
  const now = mapping === null ? 'no device mapping is in use' : `the mapping for ${mapping.device} says "${mapping.lengthUnit}"`;
  return (
    `muscle "${sample.muscle}": fascicle length ${sample.fascicleMm} mm looks like metres (${now}); ` +
    'if the device sends metres, give a mapping with "units": {"length": "m"} (--mapping FILE; examples in adapters/mappings/)'
  );
}
