/**
 * Our own CSV variant of lengthwise-stream: a table with a row per sample or gait event, its header row
 * naming the columns in any order:
 *   time_s, muscle, fascicle_mm (required), pennation_deg, quality, marker (optional), event, side (optional, together).
 * Unknown columns are ignored. It is read as any table is (table-reader.ts), with our column names and
 * units, and its header row found as any table's (table-layout.ts): a file of ours may use ";" with
 * decimal commas, or have notes above its header row. The common rows are read from their bytes.
 */
import type { Frame } from '../src/trial/records.ts';
import { makeRejection } from './parse-record.ts';
import { findTableLayout } from './table-layout.ts';
import { layoutQuery, OWN_COLUMN, planTable, tableReading, type TablePlan } from './table-plan.ts';
import { createTableReader, type TableReaderOptions } from './table-reader.ts';

export const CSV_COLUMNS = [OWN_COLUMN.t, OWN_COLUMN.muscle, OWN_COLUMN.fascicle, OWN_COLUMN.pennation, OWN_COLUMN.quality, OWN_COLUMN.event, OWN_COLUMN.side] as const;

/** The plan for a table in our own columns whose header row is `header`; the reason when it is not one. */
export function ownCsvPlan(header: string, line = 1): { readonly ok: true; readonly plan: TablePlan } | { readonly ok: false; readonly problem: string } {
  const reading = tableReading(null, 'trial');
  const found = findTableLayout([{ text: header, line }], { ...layoutQuery(reading), table: { skipLines: line - 1 } });
  if (!found.ok) return found;
  return planTable(found.layout, reading);
}

/**
 * Our own CSV read line by line, the first line given being its header row: each line → its frames (a
 * Header frame for the header row). Until a header row with our columns is given, every line is rejected.
 * Files go through fileSource, which also finds a header row below notes; this is for reading rows alone.
 */
export function createCsvParser(options: TableReaderOptions = {}): (text: string, line: number) => Frame[] {
  let read: ((text: string, line: number, out: Frame[]) => void) | null = null;
  let problem = '';
  return (text, line) => {
    const out: Frame[] = [];
    if (read === null && problem === '') {
      const plan = ownCsvPlan(text, line);
      if (plan.ok) {
        read = createTableReader(plan.plan, options).text;
        return [{ kind: 'header', muscles: Object.create(null) as Record<string, never>, line }];
      }
      problem = plan.problem;
    }
    if (read === null) return [makeRejection('schema', `no valid CSV header row has been read, so this row cannot be read: ${problem}`, line, text)];
    read(text, line, out);
    return out;
  };
}
