/**
 * The CSV variant of lengthwise-stream → frames, one frame per non-blank line.
 *
 * The first line is the header row; it names the columns, in any order:
 *   time_s, muscle, fascicle_mm (required), pennation_deg, quality (optional), event, side (optional, together).
 * Unknown columns are ignored. Quoting follows RFC 4180 ("a, b" is one cell; "" inside quotes is a quote),
 * except that a cell cannot span lines. A sample row leaves event and side empty; an event row leaves
 * muscle, fascicle_mm, pennation_deg and quality empty. Cells may have spaces around them. A row with
 * fewer cells than the header has its missing cells empty. The header row gives a Header frame (no
 * muscles declared); a header row seen again later (files joined end to end) gives another Header frame.
 */
import { GAIT_EVENT_NAMES, makeSample, SIDES, type Frame, type Header } from '../src/trial/records.ts';
import { FixedWords, NameTable, readPlainDecimal, readPlainDecimalBytes } from './lexing.ts';
import { FIELD_RULE, makeRejection, MAX_PENNATION_DEG, MAX_QUALITY, MIN_PENNATION_DEG, MIN_QUALITY } from './parse-record.ts';
import type { LineReader } from './read-lines.ts';

export const CSV_COLUMNS = ['time_s', 'muscle', 'fascicle_mm', 'pennation_deg', 'quality', 'event', 'side', 'activation'] as const;
export type CsvColumn = (typeof CSV_COLUMNS)[number];
const REQUIRED: readonly CsvColumn[] = ['time_s', 'muscle', 'fascicle_mm'];

/** Where each known column sits in a row (-1: absent), and how many cells the header row has. */
export interface CsvColumns {
  readonly index: Readonly<Record<CsvColumn, number>>;
  readonly cellCount: number;
}

export type CsvHeaderResult = { readonly ok: true; readonly columns: CsvColumns } | { readonly ok: false; readonly message: string };

const HEADER_EXAMPLE = CSV_COLUMNS.join(',');

/**
 * Splits one CSV row into cells (RFC 4180 quoting). null when the quoting is broken: a quote inside an
 * unquoted cell, text after a closing quote, or a quote left open at the end of the line.
 */
export function splitCsvRow(text: string): string[] | null {
  if (text.indexOf('"') < 0) return text.split(',');
  const cells: string[] = [];
  let i = 0;
  const n = text.length;
  for (;;) {
    // Spaces before an opening quote are allowed (and dropped).
    let j = i;
    while (j < n && text.charCodeAt(j) === 32) j++;
    if (j < n && text.charCodeAt(j) === 34) {
      let cell = '';
      let k = j + 1;
      for (;;) {
        const q = text.indexOf('"', k);
        if (q < 0) return null;
        cell += text.slice(k, q);
        if (text.charCodeAt(q + 1) === 34) {
          cell += '"';
          k = q + 2;
          continue;
        }
        k = q + 1;
        break;
      }
      while (k < n && text.charCodeAt(k) === 32) k++;
      cells.push(cell);
      if (k >= n) return cells;
      if (text.charCodeAt(k) !== 44) return null;
      i = k + 1;
      if (i === n) {
        cells.push('');
        return cells;
      }
      continue;
    }
    const comma = text.indexOf(',', i);
    const cell = comma < 0 ? text.slice(i) : text.slice(i, comma);
    if (cell.indexOf('"') >= 0) return null;
    cells.push(cell);
    if (comma < 0) return cells;
    i = comma + 1;
    if (i === n) {
      cells.push('');
      return cells;
    }
  }
}

function trimCell(cell: string): string {
  const n = cell.length;
  if (n === 0) return cell;
  return cell.charCodeAt(0) === 32 || cell.charCodeAt(n - 1) === 32 || cell.charCodeAt(0) === 9 || cell.charCodeAt(n - 1) === 9
    ? cell.trim()
    : cell;
}

const DECIMAL = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;

/** A decimal number cell → its value (1e400 → Infinity); NaN when the cell is not a decimal number. */
export function csvNumber(cell: string): number {
  return DECIMAL.test(cell) ? Number(cell) : Number.NaN;
}

/** Learns the columns from a header row. */
export function parseCsvHeaderRow(text: string): CsvHeaderResult {
  const raw = splitCsvRow(text.charCodeAt(0) === 0xfeff ? text.slice(1) : text);
  if (raw === null) return { ok: false, message: `the CSV header row has broken quoting; accepted: ${HEADER_EXAMPLE}` };
  const index: Record<CsvColumn, number> = {
    time_s: -1,
    muscle: -1,
    fascicle_mm: -1,
    pennation_deg: -1,
    quality: -1,
    event: -1,
    side: -1,
    activation: -1,
  };
  for (let i = 0; i < raw.length; i++) {
    const name = trimCell(raw[i] ?? '');
    if (!(CSV_COLUMNS as readonly string[]).includes(name)) continue;
    const column = name as CsvColumn;
    if (index[column] >= 0) {
      return { ok: false, message: `the CSV header row names column ${column} twice; name each column once (accepted: ${HEADER_EXAMPLE})` };
    }
    index[column] = i;
  }
  const missing = REQUIRED.filter((c) => index[c] < 0);
  if (index.event >= 0 && index.side < 0) missing.push('side');
  if (index.side >= 0 && index.event < 0) missing.push('event');
  if (missing.length > 0) {
    return {
      ok: false,
      message:
        `the CSV header row lacks column${missing.length > 1 ? 's' : ''} ${missing.join(', ')}: ` +
        `the first line must name the columns, e.g. ${HEADER_EXAMPLE} (any order; pennation_deg, quality, ` +
        'and event with side, may be left out; other columns are ignored); add the missing column or fix its name',
    };
  }
  return { ok: true, columns: { index, cellCount: raw.length } };
}

/** The gait events and sides, read in place from a cell. */
const EVENTS = new FixedWords(GAIT_EVENT_NAMES);
const SIDE_WORDS = new FixedWords(SIDES);

/** Boundary of a cell of the current row; 0 for an absent column or a cell the row left off. */
function at(bounds: Int32Array, n: number, column: number): number {
  return column >= 0 && column < n ? (bounds[column] as number) : 0;
}

export interface CsvParserOptions {
  /**
   * Read the common valid rows by quick in-place checks before the careful reading. Off only to test
   * that both readings agree. @default true
   */
  readonly quick?: boolean;
}

/**
 * A CSV line parser that learns the columns from the header row (the first line it is given).
 * Each call → one frame. Never throws. Until a valid header row is read, every line is rejected.
 */
export function createCsvParser(options: CsvParserOptions = {}): (text: string, line: number) => Frame {
  return createCsvReader(options).text;
}

/**
 * createCsvParser's reading for the lines of one file, given as text or as UTF-8 bytes (see
 * readLineBytes): the common rows are read from their bytes without decoding them, with the same frames.
 */
export function createCsvReader(options: CsvParserOptions = {}): LineReader {
  const quick = options.quick ?? true;
  let columns: CsvColumns | null = null;
  let headerTried = false;
  // Muscle names: one shared string per name, matched in place in the row before any substring is made.
  const names = new NameTable();

  /** Where quickRow's numbers are read into (no number object per cell). */
  const num = new Float64Array(1);
  // Cell boundaries of the current row: cell i is text[starts[i], ends[i]).
  let starts = new Int32Array(0);
  let ends = new Int32Array(0);

  /** The common valid rows (no quotes, no spaces, plain decimals), read without substrings; null: read carefully. */
  const quickRow = (text: string, line: number, c: CsvColumns): Frame | null => {
    const cellCount = c.cellCount;
    let n = 0;
    let pos = 0;
    for (;;) {
      const comma = text.indexOf(',', pos);
      if (n === cellCount) return null;
      starts[n] = pos;
      ends[n] = comma < 0 ? text.length : comma;
      n++;
      if (comma < 0) break;
      pos = comma + 1;
    }
    const index = c.index;
    // No closures here: a function made per row costs more than the row (tsx names every function).
    const tCol = index.time_s;
    if (!readPlainDecimal(text, at(starts, n, tCol), at(ends, n, tCol), num)) return null;
    const tS = num[0] as number;
    const mCol = index.muscle;
    const fCol = index.fascicle_mm;
    const pCol = index.pennation_deg;
    const qCol = index.quality;
    const evCol = index.event;
    const mStart = at(starts, n, mCol);
    const mEnd = at(ends, n, mCol);
    if (evCol >= 0 && at(ends, n, evCol) > at(starts, n, evCol)) {
      if (mEnd > mStart || at(ends, n, fCol) > at(starts, n, fCol) || at(ends, n, pCol) > at(starts, n, pCol) || at(ends, n, qCol) > at(starts, n, qCol)) return null;
      const event = EVENTS.inText(text, at(starts, n, evCol), at(ends, n, evCol));
      const side = SIDE_WORDS.inText(text, at(starts, n, index.side), at(ends, n, index.side));
      if (event === null || side === null) return null;
      return { kind: 'event', tS, event, side, line };
    }
    if (mEnd <= mStart) return null;
    const m0 = text.charCodeAt(mStart);
    const m1 = text.charCodeAt(mEnd - 1);
    if (m0 === 32 || m0 === 9 || m1 === 32 || m1 === 9) return null;
    const sideCol = index.side;
    if (sideCol >= 0 && at(ends, n, sideCol) > at(starts, n, sideCol)) return null;
    if (!readPlainDecimal(text, at(starts, n, fCol), at(ends, n, fCol), num)) return null;
    const fascicleMm = num[0] as number;
    if (!(fascicleMm > 0)) return null;
    let pennationDeg = Number.NaN;
    if (at(ends, n, pCol) > at(starts, n, pCol)) {
      if (!readPlainDecimal(text, at(starts, n, pCol), at(ends, n, pCol), num)) return null;
      pennationDeg = num[0] as number;
      if (!(pennationDeg >= MIN_PENNATION_DEG && pennationDeg <= MAX_PENNATION_DEG)) return null;
    }
    let quality = 1;
    if (at(ends, n, qCol) > at(starts, n, qCol)) {
      if (!readPlainDecimal(text, at(starts, n, qCol), at(ends, n, qCol), num)) return null;
      quality = num[0] as number;
      if (!(quality >= MIN_QUALITY && quality <= MAX_QUALITY)) return null;
    }
    return makeSample(tS, names.inText(text, mStart, mEnd), fascicleMm, pennationDeg, quality, line);
  };

  /** quickRow on the row's bytes b[s, e), for rows of ASCII characters without quotes; null: read the text. */
  const quickRowBytes = (b: Buffer, s: number, e: number, line: number, c: CsvColumns): Frame | null => {
    const cellCount = c.cellCount;
    let n = 0;
    let pos = s;
    let k = s;
    for (;;) {
      let ch = -1;
      for (; k < e; k++) {
        ch = b[k] as number;
        if (ch === 44) break;
        if (ch === 34 || ch >= 128) return null;
      }
      if (n === cellCount) return null;
      starts[n] = pos;
      ends[n] = k;
      n++;
      if (k >= e) break;
      k++;
      pos = k;
    }
    const index = c.index;
    const tCol = index.time_s;
    if (!readPlainDecimalBytes(b, at(starts, n, tCol), at(ends, n, tCol), num)) return null;
    const tS = num[0] as number;
    const mCol = index.muscle;
    const fCol = index.fascicle_mm;
    const pCol = index.pennation_deg;
    const qCol = index.quality;
    const evCol = index.event;
    const mStart = at(starts, n, mCol);
    const mEnd = at(ends, n, mCol);
    if (evCol >= 0 && at(ends, n, evCol) > at(starts, n, evCol)) {
      if (mEnd > mStart || at(ends, n, fCol) > at(starts, n, fCol) || at(ends, n, pCol) > at(starts, n, pCol) || at(ends, n, qCol) > at(starts, n, qCol)) return null;
      const event = EVENTS.inBytes(b, at(starts, n, evCol), at(ends, n, evCol));
      const side = SIDE_WORDS.inBytes(b, at(starts, n, index.side), at(ends, n, index.side));
      if (event === null || side === null) return null;
      return { kind: 'event', tS, event, side, line };
    }
    if (mEnd <= mStart) return null;
    const m0 = b[mStart] as number;
    const m1 = b[mEnd - 1] as number;
    if (m0 === 32 || m0 === 9 || m1 === 32 || m1 === 9) return null;
    const sideCol = index.side;
    if (sideCol >= 0 && at(ends, n, sideCol) > at(starts, n, sideCol)) return null;
    if (!readPlainDecimalBytes(b, at(starts, n, fCol), at(ends, n, fCol), num)) return null;
    const fascicleMm = num[0] as number;
    if (!(fascicleMm > 0)) return null;
    let pennationDeg = Number.NaN;
    if (at(ends, n, pCol) > at(starts, n, pCol)) {
      if (!readPlainDecimalBytes(b, at(starts, n, pCol), at(ends, n, pCol), num)) return null;
      pennationDeg = num[0] as number;
      if (!(pennationDeg >= MIN_PENNATION_DEG && pennationDeg <= MAX_PENNATION_DEG)) return null;
    }
    let quality = 1;
    if (at(ends, n, qCol) > at(starts, n, qCol)) {
      if (!readPlainDecimalBytes(b, at(starts, n, qCol), at(ends, n, qCol), num)) return null;
      quality = num[0] as number;
      if (!(quality >= MIN_QUALITY && quality <= MAX_QUALITY)) return null;
    }
    return makeSample(tS, names.inAsciiBytes(b, mStart, mEnd), fascicleMm, pennationDeg, quality, line);
  };

  const headerRow = (text: string, line: number): Frame => {
    headerTried = true;
    const result = parseCsvHeaderRow(text);
    if (!result.ok) {
      columns = null;
      return makeRejection('schema', result.message, line, text);
    }
    columns = result.columns;
    starts = new Int32Array(columns.cellCount);
    ends = new Int32Array(columns.cellCount);
    const header: Header = { kind: 'header', muscles: Object.create(null) as Header['muscles'], line };
    return header;
  };

  /** The careful reading of a row: every rule checked one by one, with the message of the first that fails. */
  const carefulRow = (text: string, line: number, c: CsvColumns): Frame => {
    const cells = splitCsvRow(text);
    if (cells === null) {
      return makeRejection(
        'not_json',
        'row has broken CSV quoting: a quoted cell must end with a quote followed by a comma or the end of the line, ' +
          'quotes inside a cell are doubled (""), and a cell cannot span lines; fix the quoting',
        line,
        text,
      );
    }
    const { index, cellCount } = c;
    if (cells.length > cellCount) {
      return makeRejection(
        'not_json',
        `row has ${cells.length} cells but the header row has ${cellCount}: quote cells that contain commas ("a, b"), ` +
          'or add the extra column to the header row',
        line,
        text,
      );
    }
    const timeCell = trimCell(cells[index.time_s] ?? '');
    const tS = csvNumber(timeCell);
    if (tS !== tS) {
      if (timeCell === 'time_s') return headerRow(text, line);
      return makeRejection('schema', `time_s ${cellProblem(timeCell)}: ${FIELD_RULE['t']}`, line, text);
    }
    if (tS - tS !== 0) return makeRejection('out_of_range', `time_s is ${timeCell}: ${FIELD_RULE['t']}`, line, text);

    const eventCell = index.event < 0 ? '' : trimCell(cells[index.event] ?? '');
    const muscleCell = trimCell(cells[index.muscle] ?? '');
    const fascicleCell = trimCell(cells[index.fascicle_mm] ?? '');
    const pennationCell = index.pennation_deg < 0 ? '' : trimCell(cells[index.pennation_deg] ?? '');
    const qualityCell = index.quality < 0 ? '' : trimCell(cells[index.quality] ?? '');
    const activationCell = index.activation < 0 ? '' : trimCell(cells[index.activation] ?? '');

    if (eventCell.length > 0) {
      if (muscleCell.length > 0 || fascicleCell.length > 0 || pennationCell.length > 0 || qualityCell.length > 0 || activationCell.length > 0) {
        return makeRejection(
          'schema',
          'row has both an event and sample cells: a row is either a sample (muscle, fascicle_mm, pennation_deg, quality, activation) ' +
            'or a gait event (event, side); put them on two rows and leave the other cells empty',
          line,
          text,
        );
      }
      if (eventCell !== 'foot_strike' && eventCell !== 'toe_off') {
        return makeRejection(
          'unknown_event',
          `event is ${JSON.stringify(eventCell.slice(0, 40))}: the gait events are foot_strike and toe_off; ` +
            'leave other device events out of the CSV, or use NDJSON, where they can be markers',
          line,
          text,
        );
      }
      const side = trimCell(cells[index.side] ?? '');
      if (side !== 'left' && side !== 'right') {
        const shown = side.length === 0 ? 'is empty' : `is ${JSON.stringify(side.slice(0, 40))}`;
        return makeRejection('schema', `side ${shown}: ${FIELD_RULE['side']}`, line, text);
      }
      return { kind: 'event', tS, event: eventCell, side, line };
    }

    if (muscleCell.length === 0) {
      const sideCell = index.side < 0 ? '' : trimCell(cells[index.side] ?? '');
      const what = fascicleCell.length === 0 && sideCell.length > 0 ? 'event is empty but side is given' : 'muscle is empty';
      return makeRejection(
        'schema',
        `${what}: a sample row needs muscle and fascicle_mm, an event row needs event and side`,
        line,
        text,
      );
    }
    const fascicleMm = csvNumber(fascicleCell);
    if (!(fascicleMm > 0) || fascicleMm === Infinity) {
      const reason = fascicleMm === fascicleMm ? 'out_of_range' : 'schema';
      return makeRejection(reason, `fascicle_mm ${cellProblem(fascicleCell)}: ${FIELD_RULE['fascicle_mm']}`, line, text);
    }
    let pennationDeg = Number.NaN;
    if (pennationCell.length > 0) {
      pennationDeg = csvNumber(pennationCell);
      if (!(pennationDeg >= MIN_PENNATION_DEG && pennationDeg <= MAX_PENNATION_DEG)) {
        const reason = pennationDeg === pennationDeg ? 'out_of_range' : 'schema';
        return makeRejection(reason, `pennation_deg ${cellProblem(pennationCell)}: ${FIELD_RULE['pennation_deg']}`, line, text);
      }
    }
    let quality = 1;
    if (qualityCell.length > 0) {
      quality = csvNumber(qualityCell);
      if (!(quality >= MIN_QUALITY && quality <= MAX_QUALITY)) {
        const reason = quality === quality ? 'out_of_range' : 'schema';
        return makeRejection(reason, `quality ${cellProblem(qualityCell)}: ${FIELD_RULE['quality']}`, line, text);
      }
    }
    let activation = Number.NaN;
    if (activationCell.length > 0) {
      activation = csvNumber(activationCell);
      if (!(activation >= 0 && activation <= 1)) {
        const reason = activation === activation ? 'out_of_range' : 'schema';
        return makeRejection(reason, `activation ${cellProblem(activationCell)}: ${FIELD_RULE['activation']}`, line, text);
      }
    }
    return makeSample(tS, names.intern(muscleCell), fascicleMm, pennationDeg, quality, line, activation);
  };

  const readText = (text: string, line: number): Frame => {
    if (columns === null) {
      if (headerTried && text.indexOf('time_s') < 0) {
        return makeRejection(
          'schema',
          `no valid CSV header row has been read, so this row cannot be read; the first line must name the columns, e.g. ${HEADER_EXAMPLE}`,
          line,
          text,
        );
      }
      return headerRow(text, line);
    }
    // The quick readings know the original columns only: a file with activations is read carefully.
    if (quick && columns.index.activation < 0 && text.indexOf('"') < 0) {
      const frame = quickRow(text, line, columns);
      if (frame !== null) return frame;
    }
    return carefulRow(text, line, columns);
  };
  return {
    text: readText,
    bytes: (b, start, end, line) => {
      if (quick && columns !== null && columns.index.activation < 0) {
        const frame = quickRowBytes(b, start, end, line, columns);
        if (frame !== null) return frame;
      }
      return readText(b.toString('utf8', start, end), line);
    },
  };
}

function cellProblem(cell: string): string {
  if (cell.length === 0) return 'is empty';
  const shown = JSON.stringify(cell.length > 40 ? `${cell.slice(0, 40)}…` : cell);
  return DECIMAL.test(cell) ? `is ${cell}` : `is ${shown}, not a decimal number`;
}
