/**
 * A recorded trial file (NDJSON or CSV lengthwise-stream) → batches of frames, in file order.
 * One Batch per line batch of the reader; every non-blank line gives exactly one frame (blank lines are
 * skipped and not counted; line numbers still count them). Nothing is paced here: see paceReplay.
 */
import { defer, map, type Observable } from 'rxjs';
import type { Batch, Frame } from '../src/trial/records.ts';
import { createCsvReader, parseCsvHeaderRow } from './csv.ts';
import type { DeviceMapping } from './device-mapping.ts';
import { createMappedNdjsonReader } from './mapped-ndjson.ts';
import { createNdjsonReader } from './ndjson.ts';
import { tooLongRejection } from './parse-record.ts';
import { DEFAULT_MAX_LINE_BYTES, readLineBytes, type LineReader, type ReadLinesOptions } from './read-lines.ts';

export type FileFormat = 'ndjson' | 'csv';

export interface FileSourceOptions extends ReadLinesOptions {
  /**
   * 'auto': CSV when the name ends in .csv or the first line starts with time_s, else NDJSON.
   * @default 'auto'
   */
  readonly format?: FileFormat | 'auto';
  /** NDJSON lines in a device's own names and units; a CSV file with a mapping is refused. */
  readonly mapping?: DeviceMapping | null;
}

/** The file as a whole cannot be read as its format (e.g. a CSV header row without a required column). */
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

/** The format the first non-blank line and the file name point to. */
export function detectFormat(path: string, firstLine: string): FileFormat {
  if (path.toLowerCase().endsWith('.csv')) return 'csv';
  return /^\s*"?time_s/.test(firstLine) ? 'csv' : 'ndjson';
}

/**
 * Reads and parses a trial file. Errors with a LineReadError (file missing or unreadable) or a
 * SourceFormatError (a CSV file whose header row lacks a required column); bad lines are Rejection frames.
 */
export function fileSource(path: string, options: FileSourceOptions = {}): Observable<Batch> {
  const maxLineBytes = options.maxLineBytes ?? DEFAULT_MAX_LINE_BYTES;
  const format = options.format ?? 'auto';
  const mapping = options.mapping ?? null;
  return defer(() => {
    let reader: LineReader | null = null;

    const choose = (text: string, line: number): LineReader => {
      const chosen = format === 'auto' ? detectFormat(path, text) : format;
      if (chosen === 'ndjson') return mapping === null ? createNdjsonReader() : createMappedNdjsonReader(mapping);
      if (mapping !== null) {
        throw new SourceFormatError(path, line, 'a device mapping applies to NDJSON files, and this file is CSV (lengthwise-stream columns): read it without --mapping');
      }
      const header = parseCsvHeaderRow(text);
      if (!header.ok) throw new SourceFormatError(path, line, header.message);
      return createCsvReader();
    };

    // Lines come as text, or (the common ones) as bytes the readers read without decoding.
    return readLineBytes(path, options).pipe(
      map((lines): Batch => {
        const { texts, lineNumbers, overLongBytes, buffers, starts, ends } = lines;
        const n = texts.length;
        const batch: Batch = new Array<Frame>(n);
        for (let i = 0; i < n; i++) {
          const line = lineNumbers[i] as number;
          const over = overLongBytes[i] as number;
          const text = texts[i] as string | null;
          if (over > 0) {
            batch[i] = tooLongRejection(line, over, maxLineBytes, text as string);
            continue;
          }
          if (text !== null) {
            reader ??= choose(text, line);
            batch[i] = reader.text(text, line);
            continue;
          }
          const bytes = buffers[i] as Buffer;
          const start = starts[i] as number;
          const end = ends[i] as number;
          reader ??= choose(bytes.toString('utf8', start, end), line);
          batch[i] = reader.bytes(bytes, start, end, line);
        }
        return batch;
      }),
    );
  });
}
