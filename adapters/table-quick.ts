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
    if (n < 0) return null;
    const { starts, ends, num, plan, point } = this;
    const index = plan.index;
    const tCol = index.t;
    if (!readPlainDecimal(text, at(starts, n, tCol), at(ends, n, tCol), num, point)) return null;
    const tS = (num[0] as number) * plan.timeScale + plan.timeOffsetS;
    if (tS - tS !== 0) return null;
    const mCol = index.muscle;
    const fCol = index.fascicle;
    const pCol = index.pennation;
    const qCol = index.quality;
    const evCol = index.event;
    const mStart = at(starts, n, mCol);
    const mEnd = at(ends, n, mCol);
    if (at(ends, n, index.marker) > at(starts, n, index.marker)) return null;
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
    if (m0 <= 32 || m1 <= 32 || m0 === 0xa0 || m1 === 0xa0 || m0 >= 0x1680 || m1 >= 0x1680) return null;
    const sideCol = index.side;
    if (sideCol >= 0 && at(ends, n, sideCol) > at(starts, n, sideCol)) return null;
    if (!readPlainDecimal(text, at(starts, n, fCol), at(ends, n, fCol), num, point)) return null;
    const fascicleMm = (num[0] as number) * plan.lengthScale;
    if (!(fascicleMm > 0) || fascicleMm === Infinity) return null;
    let pennationDeg = Number.NaN;
    if (at(ends, n, pCol) > at(starts, n, pCol)) {
      if (!readPlainDecimal(text, at(starts, n, pCol), at(ends, n, pCol), num, point)) return null;
      pennationDeg = (num[0] as number) * plan.angleScale;
      if (!(pennationDeg >= MIN_PENNATION_DEG && pennationDeg <= MAX_PENNATION_DEG)) return null;
    }
    let quality = 1;
    if (at(ends, n, qCol) > at(starts, n, qCol)) {
      if (!readPlainDecimal(text, at(starts, n, qCol), at(ends, n, qCol), num, point)) return null;
      quality = num[0] as number;
      if (!(quality >= MIN_QUALITY && quality <= MAX_QUALITY)) return null;
    }
    return makeSample(tS, this.names.inText(text, mStart, mEnd), fascicleMm, pennationDeg, quality, line);
  }

  /** longText on the row's bytes b[s, e): the same frame, or null to read its text. */
  longBytes(b: Buffer, s: number, e: number, line: number): Frame | null {
    const n = this.splitBytes(b, s, e);
    if (n < 0) return null;
    const { starts, ends, num, plan, point } = this;
    const index = plan.index;
    const tCol = index.t;
    if (!readPlainDecimalBytes(b, at(starts, n, tCol), at(ends, n, tCol), num, point)) return null;
    const tS = (num[0] as number) * plan.timeScale + plan.timeOffsetS;
    if (tS - tS !== 0) return null;
    const mCol = index.muscle;
    const fCol = index.fascicle;
    const pCol = index.pennation;
    const qCol = index.quality;
    const evCol = index.event;
    const mStart = at(starts, n, mCol);
    const mEnd = at(ends, n, mCol);
    if (at(ends, n, index.marker) > at(starts, n, index.marker)) return null;
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
    if (m0 <= 32 || m1 <= 32) return null;
    const sideCol = index.side;
    if (sideCol >= 0 && at(ends, n, sideCol) > at(starts, n, sideCol)) return null;
    if (!readPlainDecimalBytes(b, at(starts, n, fCol), at(ends, n, fCol), num, point)) return null;
    const fascicleMm = (num[0] as number) * plan.lengthScale;
    if (!(fascicleMm > 0) || fascicleMm === Infinity) return null;
    let pennationDeg = Number.NaN;
    if (at(ends, n, pCol) > at(starts, n, pCol)) {
      if (!readPlainDecimalBytes(b, at(starts, n, pCol), at(ends, n, pCol), num, point)) return null;
      pennationDeg = (num[0] as number) * plan.angleScale;
      if (!(pennationDeg >= MIN_PENNATION_DEG && pennationDeg <= MAX_PENNATION_DEG)) return null;
    }
    let quality = 1;
    if (at(ends, n, qCol) > at(starts, n, qCol)) {
      if (!readPlainDecimalBytes(b, at(starts, n, qCol), at(ends, n, qCol), num, point)) return null;
      quality = num[0] as number;
      if (!(quality >= MIN_QUALITY && quality <= MAX_QUALITY)) return null;
    }
    return makeSample(tS, this.names.inAsciiBytes(b, mStart, mEnd), fascicleMm, pennationDeg, quality, line);
  }

  /**
   * A wide row from its bytes b[s, e): its samples pushed to `out` and true; or false, with nothing
   * pushed, to read it carefully (a cell that is not a plain number, an event or marker cell, quotes).
   */
  wideBytes(b: Buffer, s: number, e: number, line: number, out: Frame[]): boolean {
    const n = this.splitBytes(b, s, e);
    if (n < 0) return false;
    const { starts, ends, num, plan, point, pending } = this;
    const index = plan.index;
    if (at(ends, n, index.event) > at(starts, n, index.event) || at(ends, n, index.marker) > at(starts, n, index.marker)) return false;
    const tCol = index.t;
    if (!readPlainDecimalBytes(b, at(starts, n, tCol), at(ends, n, tCol), num, point)) return false;
    const tS = (num[0] as number) * plan.timeScale + plan.timeOffsetS;
    if (tS - tS !== 0) return false;
    pending.length = 0;
    const muscles = plan.wide;
    for (let k = 0; k < muscles.length; k++) {
      const m = muscles[k] as (typeof muscles)[number];
      const fStart = at(starts, n, m.fascicle);
      const fEnd = at(ends, n, m.fascicle);
      if (fEnd <= fStart) continue;
      if (!readPlainDecimalBytes(b, fStart, fEnd, num, point)) return false;
      const fascicleMm = (num[0] as number) * plan.lengthScale;
      if (!(fascicleMm > 0) || fascicleMm === Infinity) return false;
      let pennationDeg = Number.NaN;
      const pStart = at(starts, n, m.pennation);
      const pEnd = at(ends, n, m.pennation);
      if (pEnd > pStart) {
        if (!readPlainDecimalBytes(b, pStart, pEnd, num, point)) return false;
        pennationDeg = (num[0] as number) * plan.angleScale;
        if (!(pennationDeg >= MIN_PENNATION_DEG && pennationDeg <= MAX_PENNATION_DEG)) return false;
      }
      let quality = 1;
      const qStart = at(starts, n, m.quality);
      const qEnd = at(ends, n, m.quality);
      if (qEnd > qStart) {
        if (!readPlainDecimalBytes(b, qStart, qEnd, num, point)) return false;
        quality = num[0] as number;
        if (!(quality >= MIN_QUALITY && quality <= MAX_QUALITY)) return false;
      }
      pending.push(makeSample(tS, m.muscle, fascicleMm, pennationDeg, quality, line));
    }
    for (let k = 0; k < pending.length; k++) out.push(pending[k] as Frame);
    return true;
  }
}
