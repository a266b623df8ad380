/** NDJSON lines of the lengthwise-stream format → frames: one JSON object a line, each line one frame. */
import { makeSample, type Frame } from '../src/trial/records.ts';
import { bytesAt, freshCopy, readJsonNumber, readJsonNumberBytes, textAt, NameTable } from './lexing.ts';
import { MAX_PENNATION_DEG, MAX_QUALITY, MIN_PENNATION_DEG, MIN_QUALITY, parseJsonText } from './parse-record.ts';
import type { LineReader } from './read-lines.ts';

/** The keys of the common sample line, in the order a writer prints them, each with what precedes it. */
const T_KEY = '{"t":';
const MUSCLE_KEY = ',"muscle":"';
const FASCICLE_KEY = ',"fascicle_mm":';
const PENNATION_KEY = ',"pennation_deg":';
const QUALITY_KEY = ',"quality":';

/** Where parseNdjsonLine reads its numbers into. */
const shared = new Float64Array(1);

/**
 * An optional field of the common sample line at text[i]: `key` (what precedes the number included) and
 * a plain number from min to max. Its end, with the number in num[0]; i, with `absent` in num[0], when
 * the key is not there; -1 when the key is there but not such a number.
 */
function optionalNumber(text: string, i: number, key: string, min: number, max: number, absent: number, num: Float64Array): number {
  if (!textAt(text, i, key)) {
    num[0] = absent;
    return i;
  }
  const e = readJsonNumber(text, i + key.length, num);
  const value = num[0] as number;
  return e >= 0 && value >= min && value <= max ? e : -1;
}

/**
 * The common sample line as a writer prints it — `{"t":…,"muscle":"…","fascicle_mm":…` then optionally
 * `,"pennation_deg":…` and `,"quality":…`, then `}`, no spaces, plain decimals of at most 15 digits, a
 * name without escapes, every value in range — read in place without JSON.parse. It gives exactly what
 * JSON.parse and the record checks give for such a line; anything else gives null and is read the careful
 * way. `names` holds the names seen so far (shared by one parser's lines), or null for no reuse.
 */
function quickSampleLine(text: string, line: number, names: NameTable | null, num: Float64Array): Frame | null {
  const n = text.length;
  if (text.charCodeAt(n - 1) !== 125 || !textAt(text, 0, T_KEY)) return null;
  let e = readJsonNumber(text, T_KEY.length, num);
  if (e < 0 || !textAt(text, e, MUSCLE_KEY)) return null;
  const tS = num[0] as number;
  const nameStart = e + MUSCLE_KEY.length;
  let k = nameStart;
  for (; k < n; k++) {
    const c = text.charCodeAt(k);
    if (c === 34) break;
    if (c === 92 || c < 32) return null;
  }
  if (k === nameStart || k >= n || !textAt(text, k + 1, FASCICLE_KEY)) return null;
  let i = k + 1 + FASCICLE_KEY.length;
  e = readJsonNumber(text, i, num);
  if (e < 0) return null;
  const fascicleMm = num[0] as number;
  if (!(fascicleMm > 0)) return null;
  i = optionalNumber(text, e, PENNATION_KEY, MIN_PENNATION_DEG, MAX_PENNATION_DEG, Number.NaN, num);
  if (i < 0) return null;
  const pennationDeg = num[0] as number;
  i = optionalNumber(text, i, QUALITY_KEY, MIN_QUALITY, MAX_QUALITY, 1, num);
  if (i < 0) return null;
  const quality = num[0] as number;
  if (i !== n - 1) return null;
  const muscle = names === null ? freshCopy(text.slice(nameStart, k)) : names.inText(text, nameStart, k);
  return makeSample(tS, muscle, fascicleMm, pennationDeg, quality, line);
}

const T_BYTES = Buffer.from(T_KEY);
const MUSCLE_BYTES = Buffer.from(MUSCLE_KEY);
const FASCICLE_BYTES = Buffer.from(FASCICLE_KEY);
const PENNATION_BYTES = Buffer.from(PENNATION_KEY);
const QUALITY_BYTES = Buffer.from(QUALITY_KEY);

/** optionalNumber on bytes b[i, end): the same end, number and -1. */
function optionalNumberBytes(b: Buffer, i: number, end: number, key: Buffer, min: number, max: number, absent: number, num: Float64Array): number {
  if (!bytesAt(b, i, end, key)) {
    num[0] = absent;
    return i;
  }
  const e = readJsonNumberBytes(b, i + key.length, end, num);
  const value = num[0] as number;
  return e >= 0 && value >= min && value <= max ? e : -1;
}

/**
 * quickSampleLine on the line's UTF-8 bytes b[start, end), for names of ASCII characters: the sample
 * quickSampleLine gives for the decoded line, as its muscle name with its time, fascicle length,
 * pennation and quality in num[1..4]; or null (then decode and read the text). The caller makes the
 * Sample: kept out of this long function, makeSample stays small enough to be inlined where it is called.
 */
function quickSampleBytes(b: Buffer, start: number, end: number, names: NameTable, num: Float64Array): string | null {
  if (b[end - 1] !== 125 || !bytesAt(b, start, end, T_BYTES)) return null;
  let e = readJsonNumberBytes(b, start + T_KEY.length, end, num);
  if (e < 0 || !bytesAt(b, e, end, MUSCLE_BYTES)) return null;
  const tS = num[0] as number;
  const nameStart = e + MUSCLE_KEY.length;
  let k = nameStart;
  for (; k < end; k++) {
    const c = b[k] as number;
    if (c === 34) break;
    if (c === 92 || c < 32 || c > 127) return null;
  }
  if (k === nameStart || k >= end || !bytesAt(b, k + 1, end, FASCICLE_BYTES)) return null;
  let i = k + 1 + FASCICLE_KEY.length;
  e = readJsonNumberBytes(b, i, end, num);
  if (e < 0) return null;
  const fascicleMm = num[0] as number;
  if (!(fascicleMm > 0)) return null;
  i = optionalNumberBytes(b, e, end, PENNATION_BYTES, MIN_PENNATION_DEG, MAX_PENNATION_DEG, Number.NaN, num);
  if (i < 0) return null;
  const pennationDeg = num[0] as number;
  i = optionalNumberBytes(b, i, end, QUALITY_BYTES, MIN_QUALITY, MAX_QUALITY, 1, num);
  if (i < 0) return null;
  const quality = num[0] as number;
  if (i !== end - 1) return null;
  const muscle = names.inAsciiBytes(b, nameStart, k);
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
  const names = new NameTable();
  const num = new Float64Array(5);
  const text = (t: string, line: number): Frame => quickSampleLine(t, line, names, num) ?? parseJsonText(t, line);
  return {
    text,
    bytes: (b, start, end, line) => {
      const muscle = quickSampleBytes(b, start, end, names, num);
      if (muscle === null) return text(b.toString('utf8', start, end), line);
      return makeSample(num[1] as number, muscle, num[2] as number, num[3] as number, num[4] as number, line);
    },
  };
}

/** createNdjsonReader's text reading, as a plain line parser. */
export function createNdjsonParser(): (text: string, line: number) => Frame {
  return createNdjsonReader().text;
}
