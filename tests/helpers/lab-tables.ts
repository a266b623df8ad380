/**
 * A lengthwise-stream trial rewritten as invented lab set-ups would export it, by an independent CSV writer
 * (csv-stringify): a long table (a row per sample, ";" and decimal commas, centimetres, radians and
 * milliseconds, notes above the header row, CRLF line endings, a byte-order mark), and a wide table (a row
 * per time, a column per muscle, tabs) with the gait events in a file of their own on another clock. The
 * mappings that read them back are written beside them.
 */
import { writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { stringify } from 'csv-stringify/sync';
import { writeMappingFile } from './mapping-file.ts';
import { trialLines } from './trial-lines.ts';

interface Parsed {
  readonly t: number;
  readonly muscle?: string;
  readonly fascicle_mm?: number;
  readonly pennation_deg?: number;
  readonly quality?: number;
  readonly event?: string;
  readonly side?: string;
}

/** A number as a table with decimal commas writes it. */
function comma(x: number): string {
  return String(x).replace('.', ',');
}

/** Fixed decimals, without a float's tail (toFixed, then back to the shortest text). */
function fixed(x: number, digits: number): number {
  return Number(x.toFixed(digits));
}

export interface LabTables {
  readonly long: string;
  readonly longMapping: string;
  readonly wide: string;
  readonly events: string;
  readonly wideMapping: string;
}

/** The events file's clock runs this far ahead of the samples' (seconds). */
export const EVENTS_CLOCK_AHEAD_S = 1.25;

export async function labTables(trial: string, dir: string): Promise<LabTables> {
  // Lines that are not JSON are the trial's own bad lines; a lab export has none of that kind.
  const records = (await trialLines(trial)).flatMap(({ record }) => {
    const r = record as Partial<Parsed> | null;
    return r !== null && typeof r.t === 'number' && (typeof r.muscle === 'string' || typeof r.event === 'string') ? [r as Parsed] : [];
  });
  const muscles = [...new Set(records.flatMap((r) => (r.muscle !== undefined ? [r.muscle] : [])))];
  const sides = { calf: 'left', thigh: 'right' } as const;

  const longRows = records.map((r) =>
    r.muscle !== undefined
      ? [comma(fixed(r.t * 1000, 3)), r.muscle, comma(fixed((r.fascicle_mm ?? 0) / 10, 5)), r.pennation_deg === undefined ? '' : comma(fixed((r.pennation_deg * Math.PI) / 180, 8)), r.quality === undefined ? '' : comma(r.quality), '', '']
      : [comma(fixed(r.t * 1000, 3)), '', '', '', '', r.event === 'foot_strike' ? 'HS' : r.event === 'toe_off' ? 'TO' : (r.event ?? ''), r.side === 'left' ? 'L' : r.side === 'right' ? 'R' : (r.side ?? '')],
  );
  const notes = 'Invented gait lab, treadmill station 2\r\nExported 2026-12-02; units in the column names\r\n\r\n';
  const long = join(dir, 'lab-long.csv');
  await writeFile(
    long,
    `\uFEFF${notes}${stringify([['Time (ms)', 'Site', 'Fascicle (cm)', 'Pennation (rad)', 'Conf', 'Gait', 'Foot'], ...longRows], { delimiter: ';', record_delimiter: '\r\n' })}`,
  );
  const longMapping = await writeMappingFile(join(dir, 'lab-long.json'), {
    fields: { t: 'Time (ms)', muscle: 'Site', fascicle: 'Fascicle (cm)', pennation: 'Pennation (rad)', quality: 'Conf', event: 'Gait', side: 'Foot' },
    units: { length: 'cm', angle: 'rad', time: 'ms' },
    muscles: { calf: { side: sides.calf }, thigh: { side: sides.thigh } },
    values: { event: { HS: 'foot_strike', TO: 'toe_off' }, side: { L: 'left', R: 'right' } },
  });

  // Wide: one row per time, the muscles' cells side by side (a muscle without a sample at a time leaves its cells empty).
  const byTime = new Map<number, Map<string, Parsed>>();
  for (const r of records) {
    if (r.muscle === undefined) continue;
    let row = byTime.get(r.t);
    if (row === undefined) byTime.set(r.t, (row = new Map()));
    if (!row.has(r.muscle)) row.set(r.muscle, r);
  }
  const header = ['time_s', ...muscles.flatMap((m) => [`${m} fascicle (mm)`, `${m} pennation (deg)`])];
  const wideRows = [...byTime.entries()].map(([t, row]) => [
    String(t),
    ...muscles.flatMap((m) => {
      const r = row.get(m);
      return r === undefined ? ['', ''] : [String(r.fascicle_mm), r.pennation_deg === undefined ? '' : String(r.pennation_deg)];
    }),
  ]);
  const wide = join(dir, 'lab-wide.tsv');
  await writeFile(wide, stringify([header, ...wideRows], { delimiter: '\t' }));
  const events = join(dir, 'footswitch.tsv');
  const eventRows = records
    .filter((r) => r.event !== undefined)
    .map((r) => [String(fixed(r.t + EVENTS_CLOCK_AHEAD_S, 6)), r.event === 'foot_strike' ? 'HS' : r.event === 'toe_off' ? 'TO' : (r.event ?? ''), r.side === 'left' ? 'L' : 'R']);
  await writeFile(events, stringify([['time', 'kind', 'foot'], ...eventRows], { delimiter: '\t' }));
  const wideMapping = await writeMappingFile(join(dir, 'lab-wide.json'), {
    muscles: Object.fromEntries(muscles.map((m) => [m, { side: sides[m as keyof typeof sides], fascicle: `${m} fascicle (mm)`, pennation: `${m} pennation (deg)` }])),
    events: {
      table: { delimiter: '\t' },
      fields: { t: 'time', event: 'kind', side: 'foot' },
      units: { time: 's' },
      time_offset_s: -EVENTS_CLOCK_AHEAD_S,
      values: { event: { HS: 'foot_strike', TO: 'toe_off' }, side: { L: 'left', R: 'right' } },
    },
  });
  return { long, longMapping, wide, events, wideMapping };
}
