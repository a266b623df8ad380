/** NDJSON lines of the lengthwise-stream format → frames: one JSON object a line, each line one frame. */
import { makeSample, type Frame } from '../src/trial/records.ts';
import { textAt } from './csv.ts';
import { parseJsonText } from './parse-record.ts';
import type { LineReader } from './read-lines.ts';

/** Muscle names are few: a parser keeps the names it has seen and matches them in place, without a substring. */
const RECENT_NAMES = 16;

/** Exact powers of ten as doubles (10^0 … 10^15). */
const POW10 = Array.from({ length: 16 }, (_, k) => Number(`1e${k}`));

/**
 * Reads a JSON number at text[i] in its plain form (optional minus, an integer part without leading
 * zeros, an optional fraction; no exponent; at most 15 digits): its end, with its value in out[0]; -1 for
 * anything else, which is left to JSON.parse. With at most 15 digits the digits form an exact integer
 * and 10^k is exact, so one division gives the correctly rounded double, the same as JSON.parse (Clinger
 * WD 1990, How to read floating point numbers accurately, Proc. ACM PLDI '90, 92–101: the "fast path";
 * citation from memory). The value goes to `out`, not back as a result, so no number object is made.
 */
function readJsonNumber(text: string, i: number, out: Float64Array): number {
  let j = i;
  let c = text.charCodeAt(j);
  const negative = c === 45;
  if (negative) c = text.charCodeAt(++j);
  let m = 0;
  let digits = 0;
  if (c === 48) {
    digits = 1;
    c = text.charCodeAt(++j);
  } else if (c >= 49 && c <= 57) {
    do {
      m = m * 10 + (c - 48);
      digits++;
      c = text.charCodeAt(++j);
    } while (c >= 48 && c <= 57);
  } else return -1;
  let fraction = 0;
  if (c === 46) {
    c = text.charCodeAt(++j);
    while (c >= 48 && c <= 57) {
      m = m * 10 + (c - 48);
      fraction++;
      c = text.charCodeAt(++j);
    }
    if (fraction === 0) return -1;
  }
  if (digits + fraction > 15) return -1;
  const value = fraction === 0 ? m : m / (POW10[fraction] as number);
  out[0] = negative ? -value : value;
  return j;
}

/** Where parseNdjsonLine reads its numbers into. */
const shared = new Float64Array(1);

/** A fresh copy of a short piece of the line, so a kept name does not pin the whole chunk it came from. */
function ownCopy(s: string): string {
  return s.length < 13 ? s : Buffer.from(s, 'utf16le').toString('utf16le');
}

/**
 * The common sample line as a writer prints it — `{"t":…,"muscle":"…","fascicle_mm":…` then optionally
 * `,"pennation_deg":…` and `,"quality":…`, then `}`, no spaces, plain decimals of at most 15 digits, a
 * name without escapes, every value in range — read in place without JSON.parse. It gives exactly what
 * JSON.parse and the record checks give for such a line; anything else gives null and is read the careful
 * way. `names` holds the names seen so far (shared by one parser's lines), or null for no reuse.
 */
function quickSampleLine(text: string, line: number, names: string[] | null, num: Float64Array): Frame | null {
  const n = text.length;
  if (text.charCodeAt(n - 1) !== 125 || !textAt(text, 0, '{"t":')) return null;
  let e = readJsonNumber(text, 5, num);
  if (e < 0 || !textAt(text, e, ',"muscle":"')) return null;
  const tS = num[0] as number;
  const nameStart = e + 11;
  let k = nameStart;
  for (; k < n; k++) {
    const c = text.charCodeAt(k);
    if (c === 34) break;
    if (c === 92 || c < 32) return null;
  }
  if (k === nameStart || k >= n || !textAt(text, k + 1, ',"fascicle_mm":')) return null;
  let i = k + 16;
  e = readJsonNumber(text, i, num);
  if (e < 0) return null;
  const fascicleMm = num[0] as number;
  if (!(fascicleMm > 0)) return null;
  i = e;
  let pennationDeg = Number.NaN;
  if (textAt(text, i, ',"pennation_deg":')) {
    e = readJsonNumber(text, i + 17, num);
    if (e < 0) return null;
    pennationDeg = num[0] as number;
    if (!(pennationDeg >= 0 && pennationDeg <= 90)) return null;
    i = e;
  }
  let quality = 1;
  if (textAt(text, i, ',"quality":')) {
    e = readJsonNumber(text, i + 11, num);
    if (e < 0) return null;
    quality = num[0] as number;
    if (!(quality >= 0 && quality <= 1)) return null;
    i = e;
  }
  if (i !== n - 1) return null;
  let muscle: string | null = null;
  const length = k - nameStart;
  if (names !== null) {
    for (let r = 0; r < names.length; r++) {
      const name = names[r] as string;
      if (name.length === length && textAt(text, nameStart, name)) {
        muscle = name;
        break;
      }
    }
  }
  if (muscle === null) {
    muscle = ownCopy(text.slice(nameStart, k));
    if (names !== null && names.length < RECENT_NAMES) names.push(muscle);
  }
  return makeSample(tS, muscle, fascicleMm, pennationDeg, quality, line);
}

/** A muscle name seen by a parser, with its bytes for matching in place. */
interface KnownName {
  readonly name: string;
  readonly bytes: Buffer;
}

/** readJsonNumber on bytes: the same numbers, the same end, the same -1. */
function readJsonNumberBytes(b: Buffer, i: number, end: number, out: Float64Array): number {
  let j = i;
  let c = j < end ? (b[j] as number) : -1;
  const negative = c === 45;
  if (negative) c = ++j < end ? (b[j] as number) : -1;
  let m = 0;
  let digits = 0;
  if (c === 48) {
    digits = 1;
    c = ++j < end ? (b[j] as number) : -1;
  } else if (c >= 49 && c <= 57) {
    do {
      m = m * 10 + (c - 48);
      digits++;
      c = ++j < end ? (b[j] as number) : -1;
    } while (c >= 48 && c <= 57);
  } else return -1;
  let fraction = 0;
  if (c === 46) {
    c = ++j < end ? (b[j] as number) : -1;
    while (c >= 48 && c <= 57) {
      m = m * 10 + (c - 48);
      fraction++;
      c = ++j < end ? (b[j] as number) : -1;
    }
    if (fraction === 0) return -1;
  }
  if (digits + fraction > 15) return -1;
  const value = fraction === 0 ? m : m / (POW10[fraction] as number);
  out[0] = negative ? -value : value;
  return j;
}

function bytesAt(b: Buffer, at: number, end: number, piece: Buffer): boolean {
  const n = piece.length;
  if (at + n > end) return false;
  for (let k = 0; k < n; k++) if (b[at + k] !== piece[k]) return false;
  return true;
}

const T_KEY = Buffer.from('{"t":');
const MUSCLE_KEY = Buffer.from(',"muscle":"');
const FASCICLE_KEY = Buffer.from(',"fascicle_mm":');
const PENNATION_KEY = Buffer.from(',"pennation_deg":');
const QUALITY_KEY = Buffer.from(',"quality":');

/**
 * quickSampleLine on the line's UTF-8 bytes b[start, end), for names of ASCII characters: the sample
 * quickSampleLine gives for the decoded line, as its muscle name with its time, fascicle length,
 * pennation and quality in num[1..4]; or null (then decode and read the text). The caller makes the
 * Sample: kept out of this long function, makeSample stays small enough to be inlined where it is called.
 */
function quickSampleBytes(b: Buffer, start: number, end: number, names: KnownName[], num: Float64Array): string | null {
  if (b[end - 1] !== 125 || !bytesAt(b, start, end, T_KEY)) return null;
  let e = readJsonNumberBytes(b, start + 5, end, num);
  if (e < 0 || !bytesAt(b, e, end, MUSCLE_KEY)) return null;
  const tS = num[0] as number;
  const nameStart = e + 11;
  let k = nameStart;
  for (; k < end; k++) {
    const c = b[k] as number;
    if (c === 34) break;
    if (c === 92 || c < 32 || c > 127) return null;
  }
  if (k === nameStart || k >= end || !bytesAt(b, k + 1, end, FASCICLE_KEY)) return null;
  let i = k + 16;
  e = readJsonNumberBytes(b, i, end, num);
  if (e < 0) return null;
  const fascicleMm = num[0] as number;
  if (!(fascicleMm > 0)) return null;
  i = e;
  let pennationDeg = Number.NaN;
  if (bytesAt(b, i, end, PENNATION_KEY)) {
    e = readJsonNumberBytes(b, i + 17, end, num);
    if (e < 0) return null;
    pennationDeg = num[0] as number;
    if (!(pennationDeg >= 0 && pennationDeg <= 90)) return null;
    i = e;
  }
  let quality = 1;
  if (bytesAt(b, i, end, QUALITY_KEY)) {
    e = readJsonNumberBytes(b, i + 11, end, num);
    if (e < 0) return null;
    quality = num[0] as number;
    if (!(quality >= 0 && quality <= 1)) return null;
    i = e;
  }
  if (i !== end - 1) return null;
  const length = k - nameStart;
  let muscle: string | null = null;
  for (let r = 0; r < names.length; r++) {
    const known = names[r] as KnownName;
    if (known.bytes.length === length && bytesAt(b, nameStart, k, known.bytes)) {
      muscle = known.name;
      break;
    }
  }
  if (muscle === null) {
    // ASCII only (checked above), so latin1 and UTF-8 give the same text; toString makes a fresh string.
    muscle = b.toString('latin1', nameStart, k);
    if (names.length < RECENT_NAMES) names.push({ name: muscle, bytes: Buffer.from(muscle, 'latin1') });
  }
  num[1] = tS;
  num[2] = fascicleMm;
  num[3] = pennationDeg;
  num[4] = quality;
  return muscle;
}

/**
 * One NDJSON line (line ending removed) → one frame: a record, or a Rejection that says what failed.
 * Never throws. Blank lines are the reader's business (readLines skips them); here a blank line is not_json.
 */
export function parseNdjsonLine(text: string, line: number): Frame {
  return quickSampleLine(text, line, null, shared) ?? parseJsonText(text, line);
}

/**
 * A line reader like parseNdjsonLine for the lines of one file: the same frames, but it keeps the muscle
 * names it has seen, so samples of one muscle share one name string and no name is cut out per line,
 * and it reads the common sample lines from their bytes without decoding them.
 */
export function createNdjsonReader(): LineReader {
  const names: string[] = [];
  const known: KnownName[] = [];
  const num = new Float64Array(5);
  const text = (t: string, line: number): Frame => quickSampleLine(t, line, names, num) ?? parseJsonText(t, line);
  return {
    text,
    bytes: (b, start, end, line) => {
      const muscle = quickSampleBytes(b, start, end, known, num);
      if (muscle === null) return text(b.toString('utf8', start, end), line);
      return makeSample(num[1] as number, muscle, num[2] as number, num[3] as number, num[4] as number, line);
    },
  };
}

/** createNdjsonReader's text reading, as a plain line parser. */
export function createNdjsonParser(): (text: string, line: number) => Frame {
  return createNdjsonReader().text;
}
