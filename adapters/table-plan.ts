/**
 * What reading a table needs (its columns, units and words, from a mapping or our own CSV columns), and
 * the plan for one file once its header row is known: where each column sits and how its numbers convert.
 *
 * Layouts: 'long', a row per sample with a column naming the muscle (our own CSV is one); 'wide', a row
 * per time with columns per muscle (a mapping's muscles.NAME.fascicle); 'events', a row per gait event or
 * marker (the file given with --events).
 */
import {
  DEG_PER,
  MAPPED_FIELDS,
  MM_PER,
  RECORD_KEY,
  S_PER,
  type AngleUnit,
  type DecimalMark,
  type Delimiter,
  type DeviceMapping,
  type LengthUnit,
  type MappedField,
  type TableSettings,
  type TimeUnit,
} from './device-mapping.ts';
import type { LayoutQuery, TableLayout } from './table-layout.ts';

export type TableLayoutKind = 'long' | 'wide' | 'events';
export type TableRole = 'trial' | 'events';

/** Our fields a table's columns may hold: those a mapping may rename. */
export const TABLE_FIELDS = MAPPED_FIELDS;
export type TableField = MappedField;

/** Our CSV column for each field (the name a column has when no mapping renames it): the record's own key, but for time. */
export const OWN_COLUMN: Readonly<Record<TableField, string>> = { ...RECORD_KEY, t: 'time_s' };

const REQUIRED: Readonly<Record<TableLayoutKind, readonly TableField[]>> = {
  long: ['t', 'muscle', 'fascicle'],
  wide: ['t'],
  events: ['t', 'event', 'side'],
};

const FIELDS_OF: Readonly<Record<TableLayoutKind, readonly TableField[]>> = {
  long: TABLE_FIELDS,
  wide: ['t', 'event', 'side', 'marker'],
  events: ['t', 'event', 'side', 'marker'],
};

const NUMERIC: ReadonlySet<TableField> = new Set(['t', 'fascicle', 'pennation', 'quality', 'activation']);

/** A muscle read from its own columns (wide layout). */
export interface WideMuscle {
  readonly muscle: string;
  readonly fascicle: string;
  readonly pennation?: string;
  readonly quality?: string;
  readonly activation?: string;
}

/** What reading a table needs, before its file is seen. */
export interface TableReading {
  readonly kind: TableLayoutKind;
  readonly table: TableSettings;
  /** Each field's column name, and whether the mapping named it (then the file must have it). */
  readonly columns: Readonly<Partial<Record<TableField, { readonly name: string; readonly given: boolean }>>>;
  readonly wide: readonly WideMuscle[];
  readonly lengthUnit: LengthUnit;
  readonly angleUnit: AngleUnit;
  readonly timeUnit: TimeUnit;
  readonly timeOffsetS: number;
  /** The file's words for ours, as in a mapping. */
  readonly values: DeviceMapping['values'];
  /** Our own columns and units, no mapping: messages name the columns as the README does. */
  readonly own: boolean;
}

const NO_WORDS: Readonly<Record<string, string>> = Object.freeze(Object.create(null) as Record<string, string>);

/** What reading a trial table (role 'trial') or an events table needs, from a mapping or our own columns. */
export function tableReading(mapping: DeviceMapping | null, role: TableRole): TableReading {
  if (role === 'events') {
    const e = mapping?.events ?? null;
    const given: Partial<Record<TableField, string>> = e?.given ?? {};
    return {
      kind: 'events',
      table: e?.table ?? {},
      columns: columnsOf('events', given),
      wide: [],
      lengthUnit: 'mm',
      angleUnit: 'deg',
      timeUnit: e?.timeUnit ?? 's',
      timeOffsetS: e?.timeOffsetS ?? 0,
      values: { event: e?.values.event ?? NO_WORDS, side: e?.values.side ?? NO_WORDS, muscle: NO_WORDS },
      own: e === null,
    };
  }
  const kind: TableLayoutKind = mapping?.layout ?? 'long';
  const wide: WideMuscle[] = [];
  if (mapping !== null && kind === 'wide') {
    for (const [muscle, m] of Object.entries(mapping.muscles)) {
      if (m.fascicle === undefined) continue;
      wide.push({ muscle, fascicle: m.fascicle, ...(m.pennation !== undefined ? { pennation: m.pennation } : {}), ...(m.quality !== undefined ? { quality: m.quality } : {}), ...(m.activation !== undefined ? { activation: m.activation } : {}) });
    }
  }
  return {
    kind,
    table: mapping?.table ?? {},
    columns: columnsOf(kind, mapping?.given ?? {}),
    wide,
    lengthUnit: mapping?.lengthUnit ?? 'mm',
    angleUnit: mapping?.angleUnit ?? 'deg',
    timeUnit: mapping?.timeUnit ?? 's',
    timeOffsetS: mapping?.timeOffsetS ?? 0,
    values: mapping?.values ?? { event: NO_WORDS, side: NO_WORDS, muscle: NO_WORDS },
    own: mapping === null,
  };
}

function columnsOf(kind: TableLayoutKind, given: Partial<Record<TableField, string>>): TableReading['columns'] {
  const columns: Partial<Record<TableField, { name: string; given: boolean }>> = {};
  for (const f of FIELDS_OF[kind]) {
    const name = given[f];
    columns[f] = name !== undefined ? { name, given: true } : { name: OWN_COLUMN[f], given: false };
  }
  return columns;
}

/** Where a column's name comes from, as messages say it: the mapping key that names it, or ours (and, in an events file, the key that would rename it). */
function columnFrom(kind: TableLayoutKind, field: TableField, given: boolean): string {
  if (kind !== 'events') return given ? `fields.${field}` : 'our own column';
  return given ? `events.fields.${field}` : `our own column; a mapping's events.fields.${field} names yours`;
}

/** The columns that find the header row (those the reading cannot do without, and those the mapping names) and those that hold numbers. */
export function layoutQuery(reading: TableReading): LayoutQuery {
  const identify: { name: string; from: string }[] = [];
  const numeric: string[] = [];
  for (const f of TABLE_FIELDS) {
    const c = reading.columns[f];
    if (c === undefined) continue;
    if (c.given || REQUIRED[reading.kind].includes(f)) identify.push({ name: c.name, from: columnFrom(reading.kind, f, c.given) });
    if (NUMERIC.has(f)) numeric.push(c.name);
  }
  for (const m of reading.wide) {
    identify.push({ name: m.fascicle, from: `muscles.${m.muscle}.fascicle` });
    numeric.push(m.fascicle);
    for (const f of ['pennation', 'quality', 'activation'] as const) {
      const name = m[f];
      if (name === undefined) continue;
      identify.push({ name, from: `muscles.${m.muscle}.${f}` });
      numeric.push(name);
    }
  }
  return { table: reading.table, identify, numeric };
}

/** A muscle's columns in a wide table, by index (-1: none). */
export interface WideColumns {
  readonly muscle: string;
  readonly fascicle: number;
  readonly pennation: number;
  readonly quality: number;
  readonly activation: number;
  /** The column names, for messages. */
  readonly names: { readonly fascicle: string; readonly pennation: string; readonly quality: string; readonly activation: string };
}

/** How to read the rows of one table file. */
export interface TablePlan {
  readonly kind: TableLayoutKind;
  readonly delimiter: Delimiter;
  readonly decimal: DecimalMark;
  readonly headerLine: number;
  readonly header: readonly string[];
  /** Each field's column index (-1: the file has none). */
  readonly index: Readonly<Record<TableField, number>>;
  /** Each field's column name, as the file has it. */
  readonly names: Readonly<Record<TableField, string>>;
  readonly wide: readonly WideColumns[];
  /** Seconds per time unit, and the offset added after conversion. */
  readonly timeScale: number;
  readonly timeOffsetS: number;
  /** Millimetres per length unit, degrees per angle unit. */
  readonly lengthScale: number;
  readonly angleScale: number;
  readonly units: { readonly length: LengthUnit; readonly angle: AngleUnit; readonly time: TimeUnit };
  readonly values: TableReading['values'];
  readonly own: boolean;
}

export type PlanResult = { readonly ok: true; readonly plan: TablePlan } | { readonly ok: false; readonly problem: string };

/** The plan for a file whose header row was found (see findTableLayout). */
export function planTable(layout: TableLayout, reading: TableReading): PlanResult {
  const header = layout.header;
  const index = {} as Record<TableField, number>;
  const names = {} as Record<TableField, string>;
  for (const f of TABLE_FIELDS) {
    const c = reading.columns[f];
    names[f] = c?.name ?? OWN_COLUMN[f];
    index[f] = c === undefined ? -1 : header.indexOf(c.name);
  }
  if (reading.kind !== 'events' && (index.event >= 0) !== (index.side >= 0)) {
    const lacks = index.event >= 0 ? names.side : names.event;
    return {
      ok: false,
      problem:
        `the header row (line ${layout.headerLine}) has ${index.event >= 0 ? `an event column ("${names.event}") but no side` : `a side column ("${names.side}") but no event`} column ("${lacks}"): ` +
        'a gait event needs both; add the column, or name it in the mapping ("fields": {"event": …, "side": …})',
    };
  }
  const wide: WideColumns[] = reading.wide.map((m) => ({
    muscle: m.muscle,
    fascicle: header.indexOf(m.fascicle),
    pennation: m.pennation === undefined ? -1 : header.indexOf(m.pennation),
    quality: m.quality === undefined ? -1 : header.indexOf(m.quality),
    activation: m.activation === undefined ? -1 : header.indexOf(m.activation),
    names: { fascicle: m.fascicle, pennation: m.pennation ?? '', quality: m.quality ?? '', activation: m.activation ?? '' },
  }));
  return {
    ok: true,
    plan: {
      kind: reading.kind,
      delimiter: layout.delimiter,
      decimal: layout.decimal,
      headerLine: layout.headerLine,
      header,
      index,
      names,
      wide,
      timeScale: S_PER[reading.timeUnit],
      timeOffsetS: reading.timeOffsetS,
      lengthScale: MM_PER[reading.lengthUnit],
      angleScale: DEG_PER[reading.angleUnit],
      units: { length: reading.lengthUnit, angle: reading.angleUnit, time: reading.timeUnit },
      values: reading.values,
      own: reading.own,
    },
  };
}
