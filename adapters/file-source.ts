/**
 * A recorded file (NDJSON, or a table: our own CSV columns or a lab's, through a mapping) → batches of
 * frames, in file order. One Batch per line batch of the reader. An NDJSON line gives exactly one frame;
 * a table row gives its frames (a wide row one sample per muscle), and the lines above its header row
 * (notes) give none. Blank lines are skipped and not counted (line numbers still count them). Nothing is
 * paced here: see paceReplay.
 *
 * A table's layout (header row, delimiter, decimal mark) is found from its first LAYOUT_LINES non-blank
 * lines, which are held until then: the one buffer here, bounded by that count.
 */
import { Observable } from 'rxjs';
import type { Batch, Frame } from '../src/trial/records.ts';
import { eventsDeviceMapping, type DeviceMapping } from './device-mapping.ts';
import { createMappedNdjsonReader } from './mapped-ndjson.ts';
import { createNdjsonReader } from './ndjson.ts';
import { makeRejection, tooLongRejection } from './parse-record.ts';
import { DEFAULT_MAX_LINE_BYTES, readLineBytes, type LineReader, type ReadLinesOptions } from './read-lines.ts';
import { findTableLayout, LAYOUT_LINES, type FirstLine, type TableLayout } from './table-layout.ts';
import { layoutQuery, planTable, tableReading, type TablePlan, type TableRole } from './table-plan.ts';
import { createTableReader, type RowReader, type TableReaderOptions } from './table-reader.ts';

export type FileFormat = 'ndjson' | 'csv';

/** How a file is being read, said once it is known (for `inspect`). */
export type SourceLayout =
  | { readonly format: 'ndjson'; readonly mapped: boolean }
  | { readonly format: 'csv'; readonly layout: TableLayout; readonly plan: TablePlan };

export interface FileSourceOptions extends ReadLinesOptions, TableReaderOptions {
  /**
   * 'auto': a table (csv) when the name ends in .csv, .tsv or .tab, or the first line starts with time_s;
   * NDJSON when the first line starts with { or [; otherwise a table when a mapping is given, else NDJSON.
   * @default 'auto'
   */
  readonly format?: FileFormat | 'auto';
  /** A device's own names, units and table layout; null: our own. */
  readonly mapping?: DeviceMapping | null;
  /** 'events': the file given with --events (gait events and markers, read through the mapping's "events"). @default 'trial' */
  readonly role?: TableRole;
  /** Told how the file is read, once that is known (before the first batch). */
  readonly onLayout?: (layout: SourceLayout) => void;
}

/** The file as a whole cannot be read as its format (e.g. a table without the columns it needs). */
export class SourceFormatError extends Error {
  override readonly name = 'SourceFormatError';
  readonly path: string;
  readonly line: number;

  constructor(path: string, line: number, problem: string) {
    super(`${path} line ${line}: ${problem}`);
    this.path = path;
    this.line = line;
  }
}

/** The format the file name, its first non-blank line and the mapping point to. */
export function detectFormat(path: string, firstLine: string, mapping: DeviceMapping | null = null): FileFormat {
  if (/\.(csv|tsv|tab)$/i.test(path)) return 'csv';
  if (/^\s*"?time_s/.test(firstLine)) return 'csv';
  if (/^\s*[{[]/.test(firstLine)) return 'ndjson';
  return mapping !== null ? 'csv' : 'ndjson';
}

/** An events file holds gait events and markers: a sample (or a disconnection) is rejected. */
function eventsOnly(reader: LineReader): LineReader {
  const only = (frame: Frame): Frame => {
    if (frame.kind !== 'sample' && frame.kind !== 'disconnection') return frame;
    return makeRejection('schema', `line is a ${frame.kind}: an events file holds gait events and markers only; give samples in the trial file`, frame.line, '');
  };
  return {
    text: (t, line) => only(reader.text(t, line)),
    bytes: (b, s, e, line) => only(reader.bytes(b, s, e, line)),
  };
}

/** The NDJSON reader for a role and mapping; a problem when the mapping cannot read NDJSON. */
function ndjsonReader(role: TableRole, mapping: DeviceMapping | null): LineReader | string {
  if (role === 'events') {
    const m = eventsDeviceMapping(mapping);
    return eventsOnly(m === null ? createNdjsonReader() : createMappedNdjsonReader(m));
  }
  if (mapping === null) return createNdjsonReader();
  if (mapping.layout === 'wide') {
    return 'the mapping names a fascicle column per muscle (a table with a row per time), and this file is NDJSON: give the table, or a mapping without "fascicle" in "muscles"';
  }
  return createMappedNdjsonReader(mapping);
}

/** The table reader for a file whose first lines are `first`; a problem (with its line) when its layout cannot be told. */
function tableReader(first: readonly FirstLine[], role: TableRole, mapping: DeviceMapping | null, options: TableReaderOptions): { plan: TablePlan; layout: TableLayout; reader: RowReader } | { line: number; problem: string } {
  const reading = tableReading(mapping, role);
  const found = findTableLayout(first, layoutQuery(reading));
  if (!found.ok) return found;
  const plan = planTable(found.layout, reading);
  if (!plan.ok) return { line: found.layout.headerLine, problem: plan.problem };
  return { plan: plan.plan, layout: found.layout, reader: createTableReader(plan.plan, options) };
}

/**
 * Reads single lines of a file whose layout is known (told by onLayout as its start was read), for a look
 * at lines elsewhere in it, such as its last rows; the line numbers are the caller's.
 */
export function layoutLineReader(layout: SourceLayout, mapping: DeviceMapping | null, role: TableRole = 'trial'): (text: string, line: number, out: Frame[]) => void {
  if (layout.format === 'csv') {
    const rows = createTableReader(layout.plan);
    return (text, line, out) => rows.text(text, line, out);
  }
  const reader = ndjsonReader(role, mapping);
  if (typeof reader === 'string') return () => undefined;
  return (text, line, out) => {
    out.push(reader.text(text, line));
  };
}

interface HeldLine extends FirstLine {
  /** The line's length in bytes when over the cap (its text is then an excerpt), else 0. */
  readonly over: number;
}

/**
 * Reads and parses a file. Errors with a LineReadError (file missing or unreadable) or a
 * SourceFormatError (a table whose layout cannot be told, or without the columns it needs); bad lines
 * are Rejection frames.
 */
export function fileSource(path: string, options: FileSourceOptions = {}): Observable<Batch> {
  const maxLineBytes = options.maxLineBytes ?? DEFAULT_MAX_LINE_BYTES;
  const format = options.format ?? 'auto';
  const mapping = options.mapping ?? null;
  const role = options.role ?? 'trial';
  return new Observable<Batch>((subscriber) => {
    let lines: LineReader | null = null;
    let rows: RowReader | null = null;
    let headerLine = 0;
    // A table's first lines, held until its layout is known.
    let held: HeldLine[] | null = null;

    const fail = (line: number, problem: string): void => {
      subscriber.error(new SourceFormatError(path, line, problem));
    };

    /** One table line, text or over-long, once the layout is known. */
    const tableText = (text: string, line: number, over: number, out: Frame[]): void => {
      if (line < headerLine) return;
      if (line === headerLine) {
        out.push({ kind: 'header', muscles: Object.create(null) as Record<string, never>, line });
        return;
      }
      if (over > 0) out.push(tooLongRejection(line, over, maxLineBytes, text));
      else (rows as RowReader).text(text, line, out);
    };

    /** Decides a table's layout from the lines held; false once it has failed (and said so). */
    const settleTable = (out: Frame[]): boolean => {
      const first = held ?? [];
      held = null;
      const table = tableReader(first, role, mapping, options);
      if (!('reader' in table)) {
        fail(table.line, table.problem);
        return false;
      }
      rows = table.reader;
      headerLine = table.layout.headerLine;
      options.onLayout?.({ format: 'csv', layout: table.layout, plan: table.plan });
      for (const h of first) tableText(h.text, h.line, h.over, out);
      return true;
    };

    /** Chooses the reader on the file's first line; false once it has failed. */
    const choose = (text: string, line: number): boolean => {
      const chosen = format === 'auto' ? detectFormat(path, text, mapping) : format;
      if (chosen === 'csv') {
        held = [];
        return true;
      }
      const reader = ndjsonReader(role, mapping);
      if (typeof reader === 'string') {
        fail(line, reader);
        return false;
      }
      lines = reader;
      options.onLayout?.({ format: 'ndjson', mapped: role === 'events' ? mapping?.events != null : mapping !== null });
      return true;
    };

    const subscription = readLineBytes(path, options).subscribe({
      next: (batch) => {
        const { texts, lineNumbers, overLongBytes, buffers, starts, ends } = batch;
        const out: Frame[] = [];
        for (let i = 0; i < texts.length; i++) {
          const line = lineNumbers[i] as number;
          const over = overLongBytes[i] as number;
          let text = texts[i] as string | null;
          if (lines === null && rows === null && held === null) {
            text ??= (buffers[i] as Buffer).toString('utf8', starts[i], ends[i]);
            if (!choose(text, line)) return;
          }
          if (held !== null) {
            held.push({ text: text ?? (buffers[i] as Buffer).toString('utf8', starts[i], ends[i]), line, over });
            if (held.length >= LAYOUT_LINES && !settleTable(out)) return;
            continue;
          }
          if (lines !== null) {
            if (over > 0) out.push(tooLongRejection(line, over, maxLineBytes, text as string));
            else if (text !== null) out.push(lines.text(text, line));
            else out.push(lines.bytes(buffers[i] as Buffer, starts[i] as number, ends[i] as number, line));
            continue;
          }
          if (text !== null || over > 0) tableText(text as string, line, over, out);
          else (rows as RowReader).bytes(buffers[i] as Buffer, starts[i] as number, ends[i] as number, line, out);
        }
        if (out.length > 0) subscriber.next(out);
      },
      error: (error: unknown) => subscriber.error(error),
      complete: () => {
        if (held !== null) {
          const out: Frame[] = [];
          if (!settleTable(out)) return;
          if (out.length > 0) subscriber.next(out);
        }
        subscriber.complete();
      },
    });
    return () => subscription.unsubscribe();
  });
}
