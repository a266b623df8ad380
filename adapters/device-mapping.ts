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
import { SIDES, type Frame, type Rejection, type Sample, type Side } from '../src/trial/records.ts';
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
export const RECORD_KEY: Readonly<Record<MappedField, string>> = {
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

const RECORD_KEYS: ReadonlySet<string> = new Set(Object.values(RECORD_KEY));

export const MM_PER: Readonly<Record<LengthUnit, number>> = { m: 1000, cm: 10, mm: 1 };
export const DEG_PER: Readonly<Record<AngleUnit, number>> = { rad: 180 / Math.PI, deg: 1 };
export const S_PER: Readonly<Record<TimeUnit, number>> = { s: 1, ms: 1e-3, us: 1e-6, µs: 1e-6 };

/** Cell delimiters a table may use, and the decimal marks its numbers may use. */
export const DELIMITERS = [',', ';', '\t', '|'] as const;
export type Delimiter = (typeof DELIMITERS)[number];
export const DECIMAL_MARKS = ['.', ','] as const;
export type DecimalMark = (typeof DECIMAL_MARKS)[number];

/** How a table is laid out; each key left out is found from the file itself. */
export interface TableSettings {
  readonly delimiter?: Delimiter;
  readonly decimal?: DecimalMark;
  /** Lines before the header row (blank lines included): the header row is line skipLines + 1. */
  readonly skipLines?: number;
}

/** A muscle named in a mapping: its side, and (in a table with a column per muscle) its columns. */
export interface MappedMuscle {
  readonly side?: Side;
  readonly fascicle?: string;
  readonly pennation?: string;
  readonly quality?: string;
  readonly activation?: string;
}

/** Our fields of an events file a mapping may rename. */
export const EVENT_FIELDS = ['t', 'event', 'side', 'marker'] as const;
export type EventField = (typeof EVENT_FIELDS)[number];

/** How to read the file given with --events. */
export interface EventsMapping {
  readonly table: TableSettings;
  /** Our field → the file's field (column) name, only those the mapping gives. */
  readonly given: Readonly<Partial<Record<EventField, string>>>;
  readonly timeUnit: TimeUnit;
  /** Added after the unit conversion, so the events land on the samples' clock. */
  readonly timeOffsetS: number;
  readonly values: {
    readonly event: Readonly<Record<string, string>>;
    readonly side: Readonly<Record<string, string>>;
  };
}


/** A validated mapping, ready to apply. */
export interface DeviceMapping {
  /** Free text naming the device (for messages). */
  readonly device: string;
  /** Our field → the device's field name. Fields left out keep our own name. */
  readonly fields: Readonly<Record<MappedField, string>>;
  /** The fields the mapping names itself (a table must have these columns; the others are used when present). */
  readonly given: Readonly<Partial<Record<MappedField, string>>>;
  /** How a table is laid out (delimiter, decimal mark, lines before the header row); empty: found from the file. */
  readonly table: TableSettings;
  /** Muscles the mapping names (our names): their sides, and their columns in a table with a column per muscle. */
  readonly muscles: Readonly<Record<string, MappedMuscle>>;
  /** 'wide' when muscles name their fascicle columns (a row per time, columns per muscle), else 'long' (a row per sample). */
  readonly layout: 'long' | 'wide';
  /** How to read the file given with --events; null: our own names and units. */
  readonly events: EventsMapping | null;
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

const tableSchema = z.strictObject({
  delimiter: z.enum(DELIMITERS, { error: 'accepted: ",", ";", "\\t" (tab) or "|"' }).optional(),
  decimal: z.enum(DECIMAL_MARKS, { error: 'accepted: "." or ","' }).optional(),
  skip_lines: z
    .number({ error: 'must be a whole number of lines' })
    .int({ error: 'must be a whole number of lines' })
    .min(0, { error: 'must be 0 or more' })
    .max(10_000, { error: 'at most 10000 lines may come before the header row' })
    .optional(),
});

const muscleSchema = z.strictObject({
  side: z.enum(SIDES, { error: 'accepted: "left" or "right"' }).optional(),
  fascicle: fieldName.optional(),
  pennation: fieldName.optional(),
  quality: fieldName.optional(),
  activation: fieldName.optional(),
});

const eventsSchema = z.strictObject({
  table: tableSchema.optional(),
  fields: z
    .strictObject({ t: fieldName.optional(), event: fieldName.optional(), side: fieldName.optional(), marker: fieldName.optional() })
    .optional(),
  units: z.strictObject({ time: z.enum(TIME_UNITS, { error: 'accepted: "s", "ms", "us" or "µs"' }).optional() }).optional(),
  time_offset_s: z.number({ error: 'must be a number of seconds' }).finite({ error: 'must be finite' }).optional(),
  values: z.strictObject({ event: words, side: words }).optional(),
});

export const deviceMappingSchema = z.strictObject({
  format: z.literal('lengthwise-mapping', { error: 'must be "lengthwise-mapping"' }),
  version: z.literal(1, { error: 'must be 1 (this reader reads version 1 of lengthwise-mapping)' }),
  device: z.string().optional(),
  table: tableSchema.optional(),
  fields: z
    .strictObject({
      t: fieldName.optional(),
      muscle: fieldName.optional(),
      fascicle: fieldName.optional(),
      pennation: fieldName.optional(),
      quality: fieldName.optional(),
      activation: fieldName.optional(),
      event: fieldName.optional(),
      side: fieldName.optional(),
      marker: fieldName.optional(),
    })
    .optional(),
  units: z
    .strictObject({
      length: z.enum(LENGTH_UNITS, { error: 'accepted: "m", "cm" or "mm"' }).optional(),
      angle: z.enum(ANGLE_UNITS, { error: 'accepted: "rad" or "deg"' }).optional(),
      time: z.enum(TIME_UNITS, { error: 'accepted: "s", "ms", "us" or "µs"' }).optional(),
    })
    .optional(),
  time_offset_s: z.number({ error: 'must be a number of seconds' }).finite({ error: 'must be finite' }).optional(),
  muscles: z.record(z.string().min(1, { error: 'a muscle name must not be empty' }), muscleSchema).optional(),
  values: z.strictObject({ event: words, side: words, muscle: words }).optional(),
  events: eventsSchema.optional(),
});

export const MAPPING_HOW_TO =
  'accepted: {"format": "lengthwise-mapping", "version": 1, "device"?: TEXT, ' +
  '"table"?: {"delimiter"?: ","|";"|"\\t"|"|", "decimal"?: "."|",", "skip_lines"?: N}, ' +
  `"fields"?: {OUR: DEVICE_FIELD} with OUR among ${MAPPED_FIELDS.join(', ')}, ` +
  '"units"?: {"length"?: "m"|"cm"|"mm", "angle"?: "rad"|"deg", "time"?: "s"|"ms"|"us"}, "time_offset_s"?: S, ' +
  '"muscles"?: {NAME: {"side"?: "left"|"right", "fascicle"?: COLUMN, "pennation"?: COLUMN, "quality"?: COLUMN, "activation"?: COLUMN}}, ' +
  '"values"?: {"event"?: {DEVICE: "foot_strike"|"toe_off"}, "side"?: {DEVICE: "left"|"right"}, "muscle"?: {DEVICE: NAME}}, ' +
  '"events"?: {"table"?, "fields"?: {"t"?, "event"?, "side"?, "marker"?}, "units"?: {"time"?}, "time_offset_s"?, "values"?: {"event"?, "side"?}}} ' +
  '(examples in adapters/mappings/)';

export type MappingResult = { readonly ok: true; readonly mapping: DeviceMapping } | { readonly ok: false; readonly problems: readonly string[] };

function record(entries: Record<string, string> | undefined): Readonly<Record<string, string>> {
  const out: Record<string, string> = Object.create(null);
  if (entries !== undefined) for (const [k, v] of Object.entries(entries)) out[k] = v;
  return out;
}

function tableSettings(t: z.output<typeof tableSchema> | undefined): TableSettings {
  return {
    ...(t?.delimiter !== undefined ? { delimiter: t.delimiter } : {}),
    ...(t?.decimal !== undefined ? { decimal: t.decimal } : {}),
    ...(t?.skip_lines !== undefined ? { skipLines: t.skip_lines } : {}),
  };
}

function givenFields<F extends string>(fields: Partial<Record<F, string | undefined>> | undefined, names: readonly F[]): Partial<Record<F, string>> {
  const given: Partial<Record<F, string>> = {};
  for (const f of names) {
    const name = fields?.[f];
    if (name !== undefined) given[f] = name;
  }
  return given;
}

/** What the muscles of a mapping say against its fields: a layout, or the problems that make it neither. */
function musclesLayout(muscles: Readonly<Record<string, MappedMuscle>>, given: Partial<Record<MappedField, string>>): { layout: 'long' | 'wide'; problems: string[] } {
  const entries = Object.entries(muscles);
  const wide = entries.some(([, m]) => m.fascicle !== undefined);
  const problems: string[] = [];
  if (wide) {
    for (const [name, m] of entries) {
      if (m.fascicle === undefined) {
        problems.push(`muscles.${name}: names no "fascicle" column, but other muscles do (a table with a column per muscle); give its fascicle column, or leave the muscle out`);
      }
    }
    for (const f of ['muscle', 'fascicle', 'pennation', 'quality', 'activation'] as const) {
      if (given[f] !== undefined) {
        problems.push(`fields.${f}: a table with a column per muscle reads each muscle's columns from "muscles"; leave fields.${f} out (or name no fascicle columns in "muscles" for a table with a row per sample)`);
      }
    }
  } else {
    for (const [name, m] of entries) {
      for (const f of ['pennation', 'quality', 'activation'] as const) {
        if (m[f] !== undefined) problems.push(`muscles.${name}.${f}: names a column, but the muscle names no "fascicle" column; give "fascicle" too (a table with a column per muscle)`);
      }
    }
  }
  return { layout: wide ? 'wide' : 'long', problems };
}

/** Two of our fields (or two muscles' columns) may not read the same device field or column. */
function sharedFieldProblems(fields: Readonly<Record<MappedField, string>>, muscles: Readonly<Record<string, MappedMuscle>>, layout: 'long' | 'wide'): string[] {
  const seen = new Map<string, string>();
  const problems: string[] = [];
  const use = (who: string, name: string): void => {
    const other = seen.get(name);
    if (other === undefined) seen.set(name, who);
    else {
      const both = other.startsWith('"') && who.startsWith('"') ? `fields: ${other} and ${who}` : `${other} and ${who}`;
      problems.push(`${both} both read the device field "${name}"; give each its own device field`);
    }
  };
  for (const f of MAPPED_FIELDS) {
    if (layout === 'wide' && (f === 'muscle' || f === 'fascicle' || f === 'pennation' || f === 'quality' || f === 'activation')) continue;
    use(`"${f}"`, fields[f]);
  }
  if (layout === 'wide') {
    for (const [name, m] of Object.entries(muscles)) {
      for (const f of ['fascicle', 'pennation', 'quality', 'activation'] as const) {
        const column = m[f];
        if (column !== undefined) use(`muscles.${name}.${f}`, column);
      }
    }
  }
  return problems;
}

/** Validates an already-parsed JSON value as a mapping; failures are sentences, never a throw. */
export function parseDeviceMapping(value: unknown): MappingResult {
  const parsed = deviceMappingSchema.safeParse(value);
  if (!parsed.success) return { ok: false, problems: schemaProblems(parsed.error, MAPPING_HOW_TO, deviceMappingSchema, value) };
  const d = parsed.data;
  const fields = {} as Record<MappedField, string>;
  for (const f of MAPPED_FIELDS) fields[f] = d.fields?.[f] ?? RECORD_KEY[f];
  const given = givenFields(d.fields, MAPPED_FIELDS);
  const muscles: Record<string, MappedMuscle> = Object.create(null);
  for (const [name, m] of Object.entries(d.muscles ?? {})) {
    muscles[name] = {
      ...(m.side !== undefined ? { side: m.side } : {}),
      ...(m.fascicle !== undefined ? { fascicle: m.fascicle } : {}),
      ...(m.pennation !== undefined ? { pennation: m.pennation } : {}),
      ...(m.quality !== undefined ? { quality: m.quality } : {}),
      ...(m.activation !== undefined ? { activation: m.activation } : {}),
    };
  }
  const { layout, problems } = musclesLayout(muscles, given);
  problems.push(...sharedFieldProblems(fields, muscles, layout));
  if (problems.length > 0) return { ok: false, problems };
  const e = d.events;
  return {
    ok: true,
    mapping: {
      device: d.device ?? 'device',
      fields,
      given,
      table: tableSettings(d.table),
      muscles,
      layout,
      lengthUnit: d.units?.length ?? 'mm',
      angleUnit: d.units?.angle ?? 'deg',
      timeUnit: d.units?.time ?? 's',
      timeOffsetS: d.time_offset_s ?? 0,
      values: { event: record(d.values?.event), side: record(d.values?.side), muscle: record(d.values?.muscle) },
      events:
        e === undefined
          ? null
          : {
              table: tableSettings(e.table),
              given: givenFields(e.fields, EVENT_FIELDS),
              timeUnit: e.units?.time ?? 's',
              timeOffsetS: e.time_offset_s ?? 0,
              values: { event: record(e.values?.event), side: record(e.values?.side) },
            },
    },
  };
}

/** The sides a mapping declares for its muscles. */
export function mappedSides(mapping: DeviceMapping | null | undefined): Record<string, Side> {
  const sides: Record<string, Side> = Object.create(null);
  if (mapping === null || mapping === undefined) return sides;
  for (const [name, m] of Object.entries(mapping.muscles)) if (m.side !== undefined) sides[name] = m.side;
  return sides;
}

/**
 * The mapping an NDJSON events file is read through: the events block's fields, time unit, offset and
 * words, our own names for the rest. null: the file is in our own names and units.
 */
export function eventsDeviceMapping(mapping: DeviceMapping | null): DeviceMapping | null {
  const e = mapping?.events ?? null;
  if (e === null) return null;
  const fields = {} as Record<MappedField, string>;
  for (const f of MAPPED_FIELDS) fields[f] = RECORD_KEY[f];
  for (const f of EVENT_FIELDS) {
    const name = e.given[f];
    if (name !== undefined) fields[f] = name;
  }
  return {
    device: mapping?.device ?? 'device',
    fields,
    given: e.given,
    table: e.table,
    muscles: Object.create(null) as Record<string, MappedMuscle>,
    layout: 'long',
    lengthUnit: 'mm',
    angleUnit: 'deg',
    timeUnit: e.timeUnit,
    timeOffsetS: e.timeOffsetS,
    values: { event: e.values.event, side: e.values.side, muscle: Object.create(null) as Record<string, string> },
    events: null,
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
    if (!RECORD_KEYS.has(key) && !Object.values(mapping.fields).includes(key)) out[key] = device[key];
  }
  const put = (f: MappedField, convert: (v: unknown) => unknown): void => {
    const from = mapping.fields[f];
    if (Object.hasOwn(device, from)) out[RECORD_KEY[f]] = convert(device[from]);
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
