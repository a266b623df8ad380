/**
 * A text file → batches of lines, streamed with fs streams so a file larger than memory works.
 *
 * Lines end at "\n" ("\r\n" too: the "\r" is removed); the last line may have no line ending; a UTF-8
 * byte-order mark at the start of the file is removed. Blank lines (empty or only whitespace) are
 * skipped and not delivered, but they are counted in the line numbers, so numbers match an editor.
 * A line longer than maxLineBytes is delivered as a short excerpt with its length in bytes, and is
 * never held whole in memory: at most one chunk plus maxLineBytes are buffered at any time.
 */
import { createReadStream } from 'node:fs';
import { Observable } from 'rxjs';
import type { Frame } from '../src/trial/records.ts';
import { EXCERPT_BYTES, EXCERPT_CHARS, MAX_LINE_BYTES } from './limits.ts';

export interface ReadLinesOptions {
  /** Longest line delivered whole, in bytes (line ending excluded). @default 1048576 (1 MiB) */
  readonly maxLineBytes?: number;
  /** Lines per batch (the last batch may be shorter). @default 1024 */
  readonly batchLines?: number;
  /** Bytes read from the file at a time. @default 262144 (256 KiB) */
  readonly chunkBytes?: number;
  /**
   * While it last gave true, reading stops (the chunk in hand is still delivered): lets a slower
   * consumer, such as a paced replay, keep a large file from being read into memory ahead of time.
   */
  readonly pause$?: Observable<boolean>;
}

/** Consecutive non-blank lines of a file, as parallel arrays (one entry per line). */
export interface LineBatch {
  /** Each line's text without its line ending; for a line over the cap, only its start (an excerpt). */
  readonly texts: readonly string[];
  /** Each line's 1-based number in the file (blank lines are counted). */
  readonly lineNumbers: readonly number[];
  /** Each line's length in bytes when it was over the cap (its text is then an excerpt), else 0. */
  readonly overLongBytes: readonly number[];
}

/**
 * Like LineBatch, but a line may come as bytes instead of text: when texts[i] is null, the line is
 * buffers[i] from starts[i] to ends[i] (line ending excluded). Only lines that are surely not blank, not
 * over the cap and not the first line of the file come as bytes; decoding them as UTF-8 gives exactly
 * the text readLines would give. A parser that can read such a line from its bytes skips decoding it.
 */
export interface LineBytesBatch {
  readonly texts: readonly (string | null)[];
  readonly lineNumbers: readonly number[];
  readonly overLongBytes: readonly number[];
  readonly buffers: readonly (Buffer | null)[];
  readonly starts: readonly number[];
  readonly ends: readonly number[];
}

/** Reads the lines of one file, given as text or as UTF-8 bytes (see readLineBytes). */
export interface LineReader {
  text(text: string, line: number): Frame;
  /** The line b[start, end), line ending excluded: the same frame as text() of its UTF-8 decoding. */
  bytes(b: Buffer, start: number, end: number, line: number): Frame;
}

/** The file could not be opened or read. */
export class LineReadError extends Error {
  override readonly name = 'LineReadError';
  readonly path: string;
  /** The system's error code (ENOENT, EACCES, EISDIR, …), or 'EUNKNOWN'. */
  readonly code: string;

  constructor(path: string, code: string, cause: unknown) {
    super(`cannot read ${path} (${code}${hint(code)}): check that the path is right and that the file is readable`, { cause });
    this.path = path;
    this.code = code;
  }
}

function hint(code: string): string {
  switch (code) {
    case 'ENOENT':
      return ': no such file';
    case 'EACCES':
    case 'EPERM':
      return ': permission denied';
    case 'EISDIR':
      return ': it is a directory, give a file';
    default:
      return '';
  }
}

export const DEFAULT_MAX_LINE_BYTES = MAX_LINE_BYTES;
export const DEFAULT_BATCH_LINES = 1024;
const DEFAULT_CHUNK_BYTES = 256 * 1024;

function positiveInteger(name: string, value: number): number {
  if (!Number.isInteger(value) || value < 1) {
    throw new RangeError(`readLines: ${name} is ${value}: must be a whole number ≥ 1`);
  }
  return value;
}

function isBlank(text: string): boolean {
  if (text.length === 0) return true;
  const first = text.charCodeAt(0);
  // Only a line that starts with whitespace can be all whitespace: the common line pays one comparison.
  return (first <= 32 || first === 0xa0 || first === 0xfeff || first === 0x2028) && text.trim().length === 0;
}

/** Streams a file as batches of lines; errors with a LineReadError when the file cannot be read. */
export function readLines(path: string, options: ReadLinesOptions = {}): Observable<LineBatch> {
  return lineSource(path, options, false) as Observable<LineBatch>;
}

/**
 * readLines, with the common lines left as bytes of the chunk they were read in (see LineBytesBatch):
 * the same lines, line numbers and batches, without decoding the lines a byte parser reads.
 */
export function readLineBytes(path: string, options: ReadLinesOptions = {}): Observable<LineBytesBatch> {
  return lineSource(path, options, true) as Observable<LineBytesBatch>;
}

function lineSource(path: string, options: ReadLinesOptions, keepBytes: boolean): Observable<LineBatch | LineBytesBatch> {
  const maxLineBytes = positiveInteger('maxLineBytes', options.maxLineBytes ?? DEFAULT_MAX_LINE_BYTES);
  const batchLines = positiveInteger('batchLines', options.batchLines ?? DEFAULT_BATCH_LINES);
  const chunkBytes = positiveInteger('chunkBytes', options.chunkBytes ?? DEFAULT_CHUNK_BYTES);

  // A line kept as bytes must be short enough that its text could not be over the cap even if every
  // byte decoded to a 3-byte replacement character (the text reading measures the decoded text).
  const maxByteLine = Math.floor(maxLineBytes / 3);
  return new Observable<LineBatch | LineBytesBatch>((subscriber) => {
    const stream = createReadStream(path, { highWaterMark: chunkBytes });
    let lineNumber = 0;
    // The unfinished last line of the chunks so far, as byte pieces (never more than maxLineBytes in all).
    let carry: Buffer[] = [];
    let carryBytes = 0;
    // An over-long line being skipped: its excerpt and its bytes so far.
    let skipping = false;
    let skipExcerpt = '';
    let skipBytes = 0;

    let texts: (string | null)[] = [];
    let lineNumbers: number[] = [];
    let overLongBytes: number[] = [];
    let buffers: (Buffer | null)[] = [];
    let starts: number[] = [];
    let ends: number[] = [];

    const flush = (): void => {
      if (texts.length === 0) return;
      const batch: LineBatch | LineBytesBatch = keepBytes
        ? { texts, lineNumbers, overLongBytes, buffers, starts, ends }
        : { texts: texts as string[], lineNumbers, overLongBytes };
      texts = [];
      lineNumbers = [];
      overLongBytes = [];
      if (keepBytes) {
        buffers = [];
        starts = [];
        ends = [];
      }
      subscriber.next(batch);
    };
    const deliver = (text: string, bytes: number): void => {
      texts.push(text);
      lineNumbers.push(lineNumber);
      overLongBytes.push(bytes);
      if (keepBytes) {
        buffers.push(null);
        starts.push(0);
        ends.push(0);
      }
      if (texts.length >= batchLines) flush();
    };
    const deliverRange = (chunk: Buffer, start: number, end: number): void => {
      texts.push(null);
      lineNumbers.push(lineNumber);
      overLongBytes.push(0);
      buffers.push(chunk);
      starts.push(start);
      ends.push(end);
      if (texts.length >= batchLines) flush();
    };
    /** The lines of chunk[pos, last) (last is a line ending), the common ones kept as bytes. */
    const deliverChunkLines = (chunk: Buffer, pos: number, last: number): void => {
      let start = pos;
      for (;;) {
        const nl = start === last ? last : chunk.indexOf(10, start);
        lineNumber++;
        let end = nl;
        if (end > start && chunk[end - 1] === 13) end--;
        const first = chunk[start] as number;
        // Printable ASCII first: not blank, not a byte-order mark; line 1 always goes the text way.
        if (end > start && first > 32 && first < 127 && end - start <= maxByteLine && lineNumber > 1) deliverRange(chunk, start, end);
        else deliverText(chunk.toString('utf8', start, nl));
        if (nl === last) break;
        start = nl + 1;
      }
    };
    const deliverText = (text: string): void => {
      let t = text.charCodeAt(text.length - 1) === 13 ? text.slice(0, -1) : text;
      if (lineNumber === 1 && t.charCodeAt(0) === 0xfeff) t = t.slice(1);
      if (isBlank(t)) return;
      // A UTF-8 character takes at most 3 bytes per UTF-16 unit, so short strings need no byte count.
      if (t.length * 3 > maxLineBytes) {
        const bytes = Buffer.byteLength(t, 'utf8');
        if (bytes > maxLineBytes) {
          deliver(t.slice(0, EXCERPT_CHARS), bytes);
          return;
        }
      }
      deliver(t, 0);
    };
    const deliverBytes = (bytes: Buffer): void => {
      const end = bytes.length > 0 && bytes[bytes.length - 1] === 13 ? bytes.length - 1 : bytes.length;
      if (end > maxLineBytes) {
        deliver(bytes.toString('utf8', 0, EXCERPT_BYTES).slice(0, EXCERPT_CHARS), end);
        return;
      }
      deliverText(bytes.toString('utf8', 0, end));
    };
    const startSkipping = (pieces: readonly Buffer[], bytes: number): void => {
      skipping = true;
      skipExcerpt = Buffer.concat(pieces as Buffer[]).toString('utf8', 0, EXCERPT_BYTES).slice(0, EXCERPT_CHARS);
      skipBytes = bytes;
      carry = [];
      carryBytes = 0;
    };

    const onChunk = (chunk: Buffer): void => {
      let pos = 0;
      if (skipping || carryBytes > 0) {
        const nl = chunk.indexOf(10, pos);
        if (nl < 0) {
          const rest = chunk.subarray(pos);
          if (skipping) skipBytes += rest.length;
          else if (carryBytes + rest.length > maxLineBytes) startSkipping([...carry, rest], carryBytes + rest.length);
          else {
            carry.push(rest);
            carryBytes += rest.length;
          }
          return;
        }
        lineNumber++;
        if (skipping) {
          let bytes = skipBytes + (nl - pos);
          if (nl > pos ? chunk[nl - 1] === 13 : false) bytes--;
          skipping = false;
          deliver(skipExcerpt, bytes);
        } else {
          carry.push(chunk.subarray(pos, nl));
          const whole = Buffer.concat(carry);
          carry = [];
          carryBytes = 0;
          deliverBytes(whole);
        }
        pos = nl + 1;
        if (subscriber.closed) return;
      }
      const last = chunk.lastIndexOf(10);
      if (last >= pos && keepBytes) {
        deliverChunkLines(chunk, pos, last);
        pos = last + 1;
        if (subscriber.closed) return;
      } else if (last >= pos) {
        const text = chunk.toString('utf8', pos, last);
        let start = 0;
        for (;;) {
          const nl = text.indexOf('\n', start);
          lineNumber++;
          if (nl < 0) {
            deliverText(start === 0 ? text : text.slice(start));
            break;
          }
          deliverText(text.slice(start, nl));
          start = nl + 1;
        }
        pos = last + 1;
        if (subscriber.closed) return;
      }
      if (pos < chunk.length) {
        const rest = chunk.subarray(pos);
        if (rest.length > maxLineBytes) startSkipping([rest], rest.length);
        else {
          carry.push(rest);
          carryBytes += rest.length;
        }
      }
    };

    stream.on('data', (chunk) => {
      onChunk(typeof chunk === 'string' ? Buffer.from(chunk) : chunk);
    });
    stream.on('end', () => {
      if (skipping) {
        lineNumber++;
        skipping = false;
        deliver(skipExcerpt, skipBytes);
      } else if (carryBytes > 0) {
        lineNumber++;
        const whole = Buffer.concat(carry);
        carry = [];
        carryBytes = 0;
        deliverBytes(whole);
      }
      flush();
      subscriber.complete();
    });
    stream.on('error', (error: NodeJS.ErrnoException) => {
      subscriber.error(new LineReadError(path, error.code ?? 'EUNKNOWN', error));
    });

    const pauseSubscription = options.pause$?.subscribe((paused) => {
      if (paused) stream.pause();
      else stream.resume();
    });

    return () => {
      pauseSubscription?.unsubscribe();
      stream.destroy();
    };
  });
}
