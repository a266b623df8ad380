/** NDJSON lines of the lengthwise-stream format → frames: one JSON object a line, each line one frame. */
import { makeSample, type Frame } from '../src/records.ts';
import { textAt } from './csv.ts';
import { parseJsonText } from './parse-record.ts';

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

/**
 * One NDJSON line (line ending removed) → one frame: a record, or a Rejection that says what failed.
 * Never throws. Blank lines are the reader's business (readLines skips them); here a blank line is not_json.
 */
export function parseNdjsonLine(text: string, line: number): Frame {
  return quickSampleLine(text, line, null, shared) ?? parseJsonText(text, line);
}

/**
 * A line parser like parseNdjsonLine for the lines of one file: the same frames, but it keeps the muscle
 * names it has seen, so samples of one muscle share one name string and no name is cut out per line.
 */
export function createNdjsonParser(): (text: string, line: number) => Frame {
  const names: string[] = [];
  const num = new Float64Array(1);
  return (text, line) => quickSampleLine(text, line, names, num) ?? parseJsonText(text, line);
}
