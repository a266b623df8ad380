/**
 * The fast paths of the table reader: the common valid rows read in place, from their text or their
 * UTF-8 bytes, without cutting cells or making strings — a row per sample in a long table with our words
 * (our own CSV among them), and a row per time in a wide table. Each gives exactly the frames of the
 * careful reading (table-rows.ts) for the rows it reads, and null (or false) for any other row, which is
 * then read carefully; property tests hold the two together.
 */
import { GAIT_EVENT_NAMES, makeSample, SIDES, type Frame } from '../src/trial/records.ts';
import { FixedWords, readPlainDecimal, readPlainDecimalBytes, type NameTable } from './lexing.ts';
import { MAX_PENNATION_DEG, MAX_QUALITY, MIN_PENNATION_DEG, MIN_QUALITY } from './parse-record.ts';
import type { TablePlan } from './table-plan.ts';

/** The gait events and sides, read in place from a cell. */
const EVENTS = new FixedWords(GAIT_EVENT_NAMES);
const SIDE_WORDS = new FixedWords(SIDES);

function hasWords(words: Readonly<Record<string, string>>): boolean {
  for (const _ in words) return true;
  return false;
}

/** Boundary of a cell of the current row; 0 for an absent column or a cell the row left off. */
function at(bounds: Int32Array, n: number, column: number): number {
  return column >= 0 && column < n ? (bounds[column] as number) : 0;
}

/** Whether the current row has a cell in `column` that is not empty. */
function filled(starts: Int32Array, ends: Int32Array, n: number, column: number): boolean {
  return at(ends, n, column) > at(starts, n, column);
}

/** The quick readings for one table file, or none where its plan has no fast path. */
export class QuickRows {
  /** A long table whose words are ours (no word mapping): the per-sample fast path applies. */
  readonly long: boolean;
  /** A wide table: the per-time fast path applies. */
  readonly wide: boolean;
  private readonly plan: TablePlan;
  private readonly names: NameTable;
  private readonly delimiter: number;
  private readonly point: number;
  private readonly cellCount: number;
  /** Where numbers are read into (no number object per cell). */
  private readonly num = new Float64Array(1);
  /** The current row's time (s), once read (see time). */
  private readonly timeS = new Float64Array(1);
  /** The current sample's fascicle length (mm), pennation (degrees) and quality, once read (see sampleValues). */
  private readonly values = new Float64Array(3);
  /** Cell boundaries of the current row: cell i is [starts[i], ends[i]). */
  private readonly starts: Int32Array;
  private readonly ends: Int32Array;
  /** The samples of the wide row being read, pushed only once the whole row has been read quickly. */
  private readonly pending: Frame[] = [];

  constructor(plan: TablePlan, names: NameTable) {
    this.plan = plan;
    this.names = names;
    this.delimiter = plan.delimiter.charCodeAt(0);
    this.point = plan.decimal.charCodeAt(0);
    this.cellCount = plan.header.length;
    this.starts = new Int32Array(this.cellCount);
    this.ends = new Int32Array(this.cellCount);
    const v = plan.values;
    // A table with activation columns is read the careful way (activation is rare, and read only there).
    this.long = plan.kind === 'long' && !hasWords(v.event) && !hasWords(v.side) && !hasWords(v.muscle) && plan.index.activation < 0;
    this.wide = plan.kind === 'wide' && plan.wide.every((m) => m.activation < 0);
  }

  /** The cells of a text row without quotes, as boundaries; -1 when it has more cells than the header row. */
  private splitText(text: string): number {
    const { starts, ends, cellCount, delimiter } = this;
    const d = String.fromCharCode(delimiter);
    let n = 0;
    let pos = 0;
    for (;;) {
      const next = text.indexOf(d, pos);
      if (n === cellCount) return -1;
      starts[n] = pos;
      ends[n] = next < 0 ? text.length : next;
      n++;
      if (next < 0) return n;
      pos = next + 1;
    }
  }

  /** The cells of a byte row of ASCII characters without quotes; -1 otherwise, or when it has more cells than the header row. */
  private splitBytes(b: Buffer, s: number, e: number): number {
    const { starts, ends, cellCount, delimiter } = this;
    let n = 0;
    let pos = s;
    let k = s;
    for (;;) {
      for (; k < e; k++) {
        const ch = b[k] as number;
        if (ch === delimiter) break;
        if (ch === 34 || ch >= 128) return -1;
      }
      if (n === cellCount) return -1;
      starts[n] = pos;
      ends[n] = k;
      n++;
      if (k >= e) return n;
      k++;
      pos = k;
    }
  }

  /** A long row from its text: the frame, or null to read it carefully. */
  longText(text: string, line: number): Frame | null {
    if (text.indexOf('"') >= 0) return null;
    const n = this.splitText(text);
    return n < 0 ? null : this.longRow(text, n, line);
  }

  /** longText on the row's bytes b[s, e): the same frame, or null to read its text. */
  longBytes(b: Buffer, s: number, e: number, line: number): Frame | null {
    const n = this.splitBytes(b, s, e);
    return n < 0 ? null : this.longRow(b, n, line);
  }

  /** A number cell of the current row, from its text or its bytes, into num[0]: false when it is not a plain decimal. */
  private decimal(row: string | Buffer, n: number, column: number): boolean {
    const { starts, ends, num, point } = this;
    return typeof row === 'string'
      ? readPlainDecimal(row, at(starts, n, column), at(ends, n, column), num, point)
      : readPlainDecimalBytes(row, at(starts, n, column), at(ends, n, column), num, point);
  }

  /** The row's time cell in seconds into timeS[0]: false when it is not a plain decimal or not finite once converted. */
  private time(row: string | Buffer, n: number): boolean {
    const plan = this.plan;
    if (!this.decimal(row, n, plan.index.t)) return false;
    const tS = (this.num[0] as number) * plan.timeScale + plan.timeOffsetS;
    this.timeS[0] = tS;
    return tS - tS === 0;
  }

  /**
   * A sample's cells (fascicle length, then pennation and quality when their cells are filled) into
   * `values` in our units (pennation NaN and quality 1 where their cells are empty): false when a cell is
   * not a plain decimal or its value is not a valid sample's.
   */
  private sampleValues(row: string | Buffer, n: number, fascicle: number, pennation: number, quality: number): boolean {
    const { starts, ends, num, plan, values } = this;
    if (!this.decimal(row, n, fascicle)) return false;
    const fascicleMm = (num[0] as number) * plan.lengthScale;
    if (!(fascicleMm > 0) || fascicleMm === Infinity) return false;
    values[0] = fascicleMm;
    values[1] = Number.NaN;
    if (filled(starts, ends, n, pennation)) {
      if (!this.decimal(row, n, pennation)) return false;
      const pennationDeg = (num[0] as number) * plan.angleScale;
      if (!(pennationDeg >= MIN_PENNATION_DEG && pennationDeg <= MAX_PENNATION_DEG)) return false;
      values[1] = pennationDeg;
    }
    values[2] = 1;
    if (filled(starts, ends, n, quality)) {
      if (!this.decimal(row, n, quality)) return false;
      const q = num[0] as number;
      if (!(q >= MIN_QUALITY && q <= MAX_QUALITY)) return false;
      values[2] = q;
    }
    return true;
  }

  /** A long row of n cells, its text or its bytes (then all ASCII): the frame, or null to read it carefully. */
  private longRow(row: string | Buffer, n: number, line: number): Frame | null {
    const { starts, ends, plan, values } = this;
    const index = plan.index;
    if (!this.time(row, n)) return null;
    const tS = this.timeS[0] as number;
    const mStart = at(starts, n, index.muscle);
    const mEnd = at(ends, n, index.muscle);
    if (filled(starts, ends, n, index.marker)) return null;
    if (filled(starts, ends, n, index.event)) {
      if (mEnd > mStart || filled(starts, ends, n, index.fascicle) || filled(starts, ends, n, index.pennation) || filled(starts, ends, n, index.quality)) return null;
      const evStart = at(starts, n, index.event);
      const evEnd = at(ends, n, index.event);
      const sideStart = at(starts, n, index.side);
      const sideEnd = at(ends, n, index.side);
      const event = typeof row === 'string' ? EVENTS.inText(row, evStart, evEnd) : EVENTS.inBytes(row, evStart, evEnd);
      const side = typeof row === 'string' ? SIDE_WORDS.inText(row, sideStart, sideEnd) : SIDE_WORDS.inBytes(row, sideStart, sideEnd);
      if (event === null || side === null) return null;
      return { kind: 'event', tS, event, side, line };
    }
    if (mEnd <= mStart) return null;
    // A name with spaces around it is read carefully (bytes are all ASCII here, so only the first test can hold for them).
    const m0 = typeof row === 'string' ? row.charCodeAt(mStart) : (row[mStart] as number);
    const m1 = typeof row === 'string' ? row.charCodeAt(mEnd - 1) : (row[mEnd - 1] as number);
    if (m0 <= 32 || m1 <= 32 || m0 === 0xa0 || m1 === 0xa0 || m0 >= 0x1680 || m1 >= 0x1680) return null;
    if (filled(starts, ends, n, index.side)) return null;
    if (!this.sampleValues(row, n, index.fascicle, index.pennation, index.quality)) return null;
    const muscle = typeof row === 'string' ? this.names.inText(row, mStart, mEnd) : this.names.inAsciiBytes(row, mStart, mEnd);
    return makeSample(tS, muscle, values[0] as number, values[1] as number, values[2] as number, line);
  }

  /**
   * A wide row from its bytes b[s, e): its samples pushed to `out` and true; or false, with nothing
   * pushed, to read it carefully (a cell that is not a plain number, an event or marker cell, quotes).
   */
  wideBytes(b: Buffer, s: number, e: number, line: number, out: Frame[]): boolean {
    const n = this.splitBytes(b, s, e);
    if (n < 0) return false;
    const { starts, ends, plan, pending, values } = this;
    const index = plan.index;
    if (filled(starts, ends, n, index.event) || filled(starts, ends, n, index.marker)) return false;
    if (!this.time(b, n)) return false;
    const tS = this.timeS[0] as number;
    pending.length = 0;
    const muscles = plan.wide;
    for (let k = 0; k < muscles.length; k++) {
      const m = muscles[k] as (typeof muscles)[number];
      if (!filled(starts, ends, n, m.fascicle)) continue;
      if (!this.sampleValues(b, n, m.fascicle, m.pennation, m.quality)) return false;
      pending.push(makeSample(tS, m.muscle, values[0] as number, values[1] as number, values[2] as number, line));
    }
    for (let k = 0; k < pending.length; k++) out.push(pending[k] as Frame);
    return true;
  }
}
