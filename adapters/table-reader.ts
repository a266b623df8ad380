/**
 * The rows of one table file after its header row → frames. The common rows go the quick way
 * (table-quick.ts); every other row is split into cells (table-cells.ts: csv-parse when it has quotes)
 * and read carefully (table-rows.ts). Never throws. The columns are the header row's, and never change:
 * the same header row again (files joined end to end) is a Header frame, any other header-like row a
 * rejection.
 */
import type { Frame } from '../src/trial/records.ts';
import { NameTable } from './lexing.ts';
import { makeRejection } from './parse-record.ts';
import { parseCells, rowCells } from './table-cells.ts';
import type { TablePlan } from './table-plan.ts';
import { QuickRows } from './table-quick.ts';
import { readRow, type RowContext } from './table-rows.ts';

/** Reads the rows of one file, given as text or as UTF-8 bytes (see readLineBytes), into `out`. */
export interface RowReader {
  text(text: string, line: number, out: Frame[]): void;
  /** The row b[start, end), line ending excluded: the same frames as text() of its UTF-8 decoding. */
  bytes(b: Buffer, start: number, end: number, line: number, out: Frame[]): void;
}

export interface TableReaderOptions {
  /**
   * Read the common valid rows the quick way before the careful reading, and split rows without quotes
   * in place. Off only to test that both readings agree (every row then goes through csv-parse). @default true
   */
  readonly quick?: boolean;
}

export function createTableReader(plan: TablePlan, options: TableReaderOptions = {}): RowReader {
  const quick = options.quick ?? true;
  const names = new NameTable();
  const ctx: RowContext = { plan, names };
  const fast = new QuickRows(plan, names);

  const careful = (text: string, line: number, out: Frame[]): void => {
    const cells = quick ? rowCells(text, plan.delimiter) : parseCells(text, plan.delimiter);
    if (!cells.ok) {
      out.push(
        makeRejection(
          'not_json',
          'row has broken quoting: a quoted cell must end with a quote followed by the delimiter or the end of the line, ' +
            `quotes inside a cell are doubled (""), and a cell cannot span lines; fix the quoting (${cells.problem})`,
          line,
          text,
        ),
      );
      return;
    }
    readRow(ctx, cells.cells, line, text, out);
  };

  const text = (t: string, line: number, out: Frame[]): void => {
    if (quick && fast.long) {
      const frame = fast.longText(t, line);
      if (frame !== null) {
        out.push(frame);
        return;
      }
    }
    careful(t, line, out);
  };

  return {
    text,
    bytes: (b, start, end, line, out) => {
      if (quick) {
        if (fast.long) {
          const frame = fast.longBytes(b, start, end, line);
          if (frame !== null) {
            out.push(frame);
            return;
          }
        } else if (fast.wide && fast.wideBytes(b, start, end, line, out)) return;
      }
      text(b.toString('utf8', start, end), line, out);
    },
  };
}
