/**
 * The cells of one table row, and the numbers in them. The general reading splits a row with csv-parse
 * (any of our delimiters, RFC 4180 quoting: "a; b" is one cell, "" inside quotes is a quote); a row with
 * no quote character is split in place, which gives the same cells (tests/adapters/table-cells.test.ts
 * holds the two to that). Cells may have white space around them, which is dropped. A cell cannot span
 * lines: a row is one line of the file.
 */
import { parse, type Options } from 'csv-parse/sync';
import type { DecimalMark, Delimiter } from './device-mapping.ts';

export type CellsResult = { readonly ok: true; readonly cells: string[] } | { readonly ok: false; readonly problem: string };

const parseOptions = new Map<Delimiter, Options>();

function optionsFor(delimiter: Delimiter): Options {
  let options = parseOptions.get(delimiter);
  if (options === undefined) {
    options = {
      delimiter,
      quote: '"',
      escape: '"',
      // Only "\n" ends a record, and a line has none: one line is one row, whatever "\r" it holds.
      record_delimiter: '\n',
      trim: true,
      relax_column_count: true,
      skip_empty_lines: false,
    };
    parseOptions.set(delimiter, options);
  }
  return options;
}

/** The cells of one row, read by csv-parse; the problem (broken quoting) when it cannot be read. */
export function parseCells(text: string, delimiter: Delimiter): CellsResult {
  try {
    const records = parse(text, optionsFor(delimiter)) as string[][];
    return { ok: true, cells: records[0] ?? [''] };
  } catch (error) {
    return { ok: false, problem: (error as Error).message };
  }
}

/** The cells of a row with no quote character: split at the delimiter, white space around each dropped. */
export function plainCells(text: string, delimiter: Delimiter): string[] {
  const cells = text.split(delimiter);
  for (let i = 0; i < cells.length; i++) cells[i] = (cells[i] as string).trim();
  return cells;
}

/** The cells of one row: in place when it has no quote character, else by csv-parse. */
export function rowCells(text: string, delimiter: Delimiter): CellsResult {
  return text.indexOf('"') < 0 ? { ok: true, cells: plainCells(text, delimiter) } : parseCells(text, delimiter);
}

const DECIMAL = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;

/**
 * A decimal number cell → its value (1e400 → Infinity); NaN when the cell is not a decimal number with
 * the given mark. With a decimal comma, "52,3" is 52.3, and a cell with a point is not a number (it
 * could be a thousands separator).
 */
export function tableNumber(cell: string, decimal: DecimalMark = '.'): number {
  if (decimal === '.') return DECIMAL.test(cell) ? Number(cell) : Number.NaN;
  if (cell.indexOf('.') >= 0) return Number.NaN;
  const point = cell.replace(',', '.');
  return DECIMAL.test(point) ? Number(point) : Number.NaN;
}

/** True when the cell is a decimal number with the given mark. */
export function isTableNumber(cell: string, decimal: DecimalMark): boolean {
  return !Number.isNaN(tableNumber(cell, decimal));
}
