/**
 * The study's tables as CSV text, one column per field of their rows (src/output/study-rows.ts), in the
 * order the rows declare them: groups.csv, comparisons.csv, cycles.csv. RFC 4180 quoting, CRLF line ends,
 * an unknown figure an empty field.
 */
import type { ComparisonRow, CycleRow, GroupRow } from '../output/study-rows.ts';
import { csvText, type Cell } from './study-csv.ts';

/** Every key of a row, each once, in the CSV's order (the compiler holds the list to the row's keys). */
type AllKeys<R> = readonly (keyof R & string)[] & { readonly length: number };

function columnsOf<R>() {
  return <const K extends readonly (keyof R & string)[]>(keys: K & ([keyof R] extends [K[number]] ? unknown : never)): AllKeys<R> => keys;
}

export const GROUP_COLUMNS = columnsOf<GroupRow>()(['condition', 'muscle', 'figure', 'n_subjects', 'mean', 'sd', 'ci95_low', 'ci95_high']);
export const COMPARISON_COLUMNS = columnsOf<ComparisonRow>()(['muscle', 'figure', 'condition_a', 'condition_b', 'n_pairs', 'mean_diff', 'ci95_low', 'ci95_high', 't', 'p', 'dz']);
export const CYCLE_COLUMNS = columnsOf<CycleRow>()(['subject', 'condition', 'trial', 'muscle', 'percent', 'sl_um']);

function table<R extends object>(columns: AllKeys<R>, rows: readonly R[]): string {
  return csvText(
    columns,
    rows.map((row) => columns.map((c) => row[c] as Cell)),
  );
}

export const groupsCsv = (rows: readonly GroupRow[]): string => table(GROUP_COLUMNS, rows);
export const comparisonsCsv = (rows: readonly ComparisonRow[]): string => table(COMPARISON_COLUMNS, rows);
export const cyclesCsv = (rows: readonly CycleRow[]): string => table(CYCLE_COLUMNS, rows);
