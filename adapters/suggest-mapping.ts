/**
 * A mapping skeleton for a file whose columns are not ours, filled with the columns found, for a person
 * to correct and save: a guess from the header row's names and the first row's cells, never used to read
 * the file by itself. Muscles' sides are left out: only the person knows them.
 */
import type { DecimalMark, Delimiter } from './device-mapping.ts';
import type { GuessedTable } from './table-layout.ts';
import { DECIMAL_MARKS } from './device-mapping.ts';
import { isTableNumber } from './table-cells.ts';

const TIME = /^(t|time|timestamp|zeit|tiempo|temps)\b|time|^t[\s_([]/i;
const FASCICLE = /fasc|length|len\b|\bfl\b|_fl|fl_/i;
const PENNATION = /penn|angle|\bpa\b|_pa\b/i;
const QUALITY = /qual|conf|score/i;
const EVENT = /event|gait|phase/i;
const SIDE = /side|foot|leg/i;
const MARKER = /marker|note|comment/i;

function unitOf<U extends string>(name: string, units: readonly (readonly [RegExp, U])[]): U | undefined {
  for (const [pattern, unit] of units) if (pattern.test(name)) return unit;
  return undefined;
}

const TIME_UNITS = [
  [/µs|\bus\b|_us\b|micro/i, 'us'],
  [/\bms\b|_ms\b|milli/i, 'ms'],
  [/\(s\)|\[s\]|_s\b|\bsec/i, 's'],
] as const;
const LENGTH_UNITS = [
  [/\bmm\b|_mm\b/i, 'mm'],
  [/\bcm\b|_cm\b/i, 'cm'],
  [/\(m\)|\[m\]|_m\b/i, 'm'],
] as const;
const ANGLE_UNITS = [
  [/rad/i, 'rad'],
  [/deg|°/i, 'deg'],
] as const;

function numeric(cell: string): boolean {
  return DECIMAL_MARKS.some((m) => isTableNumber(cell, m));
}

/** A muscle's name from the start of its columns' names: "LG fascicle (cm)" → "lg". */
function muscleKey(column: string): string {
  const first = column.split(/[\s_([-]+/).find((w) => w.length > 0 && !FASCICLE.test(w) && !PENNATION.test(w) && !QUALITY.test(w)) ?? column;
  return first.toLowerCase().replace(/[^a-z0-9]+/g, '_').replace(/^_|_$/g, '') || 'muscle';
}

export interface MappingSkeleton {
  readonly format: 'lengthwise-mapping';
  readonly version: 1;
  readonly device: string;
  readonly table: { readonly delimiter: Delimiter; readonly decimal: DecimalMark; readonly skip_lines: number };
  readonly fields: Readonly<Record<string, string>>;
  readonly units: Readonly<Record<string, string>>;
  readonly muscles?: Readonly<Record<string, Readonly<Record<string, string>>>>;
}

/** A mapping skeleton for a table of unknown columns (see guessTableLayout). */
export function suggestTableMapping(table: GuessedTable): MappingSkeleton {
  const header = table.header;
  const cellOf = (name: string): string => table.firstRow[header.indexOf(name)] ?? '';
  const time = header.find((h) => TIME.test(h)) ?? (header[0] as string);
  const rest = header.filter((h) => h !== time);
  const fields: Record<string, string> = { t: time };
  const units: Record<string, string> = {};
  const timeUnit = unitOf(time, TIME_UNITS);
  if (timeUnit !== undefined) units['time'] = timeUnit;
  const event = rest.find((h) => EVENT.test(h) && !numeric(cellOf(h)));
  const side = rest.find((h) => SIDE.test(h) && !numeric(cellOf(h)));
  if (event !== undefined && side !== undefined) {
    fields['event'] = event;
    fields['side'] = side;
  }
  const marker = rest.find((h) => MARKER.test(h));
  if (marker !== undefined) fields['marker'] = marker;
  const taken = new Set([time, event, side, marker]);
  const textColumn = rest.find((h) => !taken.has(h) && cellOf(h) !== '' && !numeric(cellOf(h)));
  const numbers = rest.filter((h) => !taken.has(h) && h !== textColumn);
  const unitsFrom = (columns: readonly string[]): void => {
    for (const c of columns) {
      const length = FASCICLE.test(c) ? unitOf(c, LENGTH_UNITS) : undefined;
      if (length !== undefined) units['length'] ??= length;
      const angle = PENNATION.test(c) ? unitOf(c, ANGLE_UNITS) : undefined;
      if (angle !== undefined) units['angle'] ??= angle;
    }
  };
  const skeleton = {
    format: 'lengthwise-mapping' as const,
    version: 1 as const,
    device: 'EDIT: what made this file',
    table: { delimiter: table.delimiter, decimal: table.decimal, skip_lines: table.headerLine - 1 },
  };
  if (textColumn !== undefined) {
    // A row per sample: one column names the muscle.
    fields['muscle'] = textColumn;
    const fascicle = numbers.find((h) => FASCICLE.test(h)) ?? numbers[0];
    if (fascicle !== undefined) fields['fascicle'] = fascicle;
    const pennation = numbers.find((h) => h !== fascicle && PENNATION.test(h));
    if (pennation !== undefined) fields['pennation'] = pennation;
    const quality = numbers.find((h) => h !== fascicle && QUALITY.test(h));
    if (quality !== undefined) fields['quality'] = quality;
    unitsFrom(numbers);
    return { ...skeleton, fields, units };
  }
  // A row per time: each muscle's columns start with its name.
  const groups = new Map<string, string[]>();
  for (const h of numbers) {
    const key = muscleKey(h);
    groups.set(key, [...(groups.get(key) ?? []), h]);
  }
  const muscles: Record<string, Record<string, string>> = {};
  for (const [key, columns] of groups) {
    const fascicle = columns.find((h) => FASCICLE.test(h)) ?? columns.find((h) => !PENNATION.test(h) && !QUALITY.test(h));
    if (fascicle === undefined) continue;
    const m: Record<string, string> = { fascicle };
    const pennation = columns.find((h) => h !== fascicle && PENNATION.test(h));
    if (pennation !== undefined) m['pennation'] = pennation;
    const quality = columns.find((h) => h !== fascicle && QUALITY.test(h));
    if (quality !== undefined) m['quality'] = quality;
    muscles[key] = m;
  }
  unitsFrom(numbers);
  return { ...skeleton, fields, units, muscles };
}
