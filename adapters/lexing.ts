/**
 * The pieces the fast line parsers (ndjson.ts, csv.ts) share, from text and from UTF-8 bytes alike:
 * reading decimals in place, comparing fixed text in place, keeping muscle names, and copying short
 * strings so they do not pin the chunk they were cut from. Each parser keeps only its own grammar.
 *
 * The decimal readers do not allocate: a function that returns a double boxes it when it is not inlined,
 * so they put the value in `out[0]` and return where they stopped or whether they read.
 */

/**
 * Most digits a fast decimal reading takes. With at most 15 digits the digits form an exact integer
 * below 2^53, and 10^k for k ≤ 22 is an exact double, so one division gives the correctly rounded
 * double, the same as Number() and JSON.parse (Clinger WD 1990, How to read floating point numbers
 * accurately, Proc. ACM PLDI '90, 92–101: the "fast path"; citation from memory).
 */
export const EXACT_DIGITS = 15;

/** Exact powers of ten as doubles, 10^0 … 10^EXACT_DIGITS. */
const POW10 = Array.from({ length: EXACT_DIGITS + 1 }, (_, k) => Number(`1e${k}`));

/** Puts ±m / 10^fraction in out[0]: exact for the digit counts the readers take (see EXACT_DIGITS). */
function putExact(out: Float64Array, m: number, fraction: number, negative: boolean): void {
  const value = fraction === 0 ? m : m / (POW10[fraction] as number);
  out[0] = negative ? -value : value;
}

/**
 * Reads a JSON number at text[i] in its plain form (RFC 8259 §6 without the exponent: an optional minus,
 * an integer part without leading zeros, an optional fraction of at least one digit; at most
 * EXACT_DIGITS digits): its end, with its value in out[0]; -1 for anything else (left to JSON.parse).
 * The caller checks what follows the end.
 */
export function readJsonNumber(text: string, i: number, out: Float64Array): number {
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
  if (digits + fraction > EXACT_DIGITS) return -1;
  putExact(out, m, fraction, negative);
  return j;
}

/** readJsonNumber on bytes b[i, end): the same numbers, the same end, the same -1. */
export function readJsonNumberBytes(b: Buffer, i: number, end: number, out: Float64Array): number {
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
  if (digits + fraction > EXACT_DIGITS) return -1;
  putExact(out, m, fraction, negative);
  return j;
}

/**
 * A plain decimal filling text[start, end) (an optional sign, digits with at most one point anywhere —
 * "5", "5.", ".5" —, at least one and at most EXACT_DIGITS digits; no spaces, no exponent): true with its
 * value in out[0], the same double as Number() of that text; false (out untouched) for anything else,
 * which the caller then reads the careful way. `point` is the decimal mark's character code (46 ".",
 * or 44 "," for tables written with decimal commas: "52,3" then reads as Number("52.3")).
 */
export function readPlainDecimal(text: string, start: number, end: number, out: Float64Array, point = 46): boolean {
  let i = start;
  let negative = false;
  const first = text.charCodeAt(i);
  if (first === 45) {
    negative = true;
    i++;
  } else if (first === 43) i++;
  let m = 0;
  let digits = 0;
  let fraction = 0;
  let seen = false;
  for (; i < end; i++) {
    const c = text.charCodeAt(i);
    if (c >= 48 && c <= 57) {
      m = m * 10 + (c - 48);
      digits++;
      if (seen) fraction++;
    } else if (c === point && !seen) seen = true;
    else return false;
  }
  if (digits === 0 || digits > EXACT_DIGITS) return false;
  putExact(out, m, fraction, negative);
  return true;
}

/** readPlainDecimal on bytes b[start, end): the same values, the same refusals. */
export function readPlainDecimalBytes(b: Buffer, start: number, end: number, out: Float64Array, point = 46): boolean {
  let i = start;
  let negative = false;
  const first = i < end ? (b[i] as number) : -1;
  if (first === 45) {
    negative = true;
    i++;
  } else if (first === 43) i++;
  let m = 0;
  let digits = 0;
  let fraction = 0;
  let seen = false;
  for (; i < end; i++) {
    const c = b[i] as number;
    if (c >= 48 && c <= 57) {
      m = m * 10 + (c - 48);
      digits++;
      if (seen) fraction++;
    } else if (c === point && !seen) seen = true;
    else return false;
  }
  if (digits === 0 || digits > EXACT_DIGITS) return false;
  putExact(out, m, fraction, negative);
  return true;
}

const scratch = new Float64Array(1);

/** readPlainDecimal as a value: the number, or NaN where readPlainDecimal refuses. */
export function plainDecimalAt(text: string, start: number, end: number): number {
  return readPlainDecimal(text, start, end, scratch) ? (scratch[0] as number) : Number.NaN;
}

/**
 * True when `piece` appears in `text` at index `at`: text.startsWith(piece, at), written out, because
 * the built-in with a start index costs several times more than this loop for the short pieces a
 * parser compares (measured with bench/profile-summary.ts --lines).
 */
export function textAt(text: string, at: number, piece: string): boolean {
  const n = piece.length;
  if (at < 0 || at + n > text.length) return false;
  for (let k = 0; k < n; k++) if (text.charCodeAt(at + k) !== piece.charCodeAt(k)) return false;
  return true;
}

/** textAt on bytes: true when `piece` appears in b at `at` and ends by `end`. */
export function bytesAt(b: Buffer, at: number, end: number, piece: Buffer): boolean {
  const n = piece.length;
  if (at < 0 || at + n > end) return false;
  for (let k = 0; k < n; k++) if (b[at + k] !== piece[k]) return false;
  return true;
}

/**
 * Shorter strings than this are copied when cut from another one; longer cuts keep a pointer into the
 * whole string they were cut from (V8's sliced strings; from memory).
 */
const SLICE_MIN_CHARS = 13;

/** A fresh copy of a piece cut from a longer string, so keeping it does not keep the whole string alive. */
export function freshCopy(s: string): string {
  return s.length < SLICE_MIN_CHARS ? s : Buffer.from(s, 'utf16le').toString('utf16le');
}

/** Names matched in place, before any substring is made: muscle names are few. */
export const RECENT_NAMES = 16;
/** Most names kept as one shared string each; later new names are still read, only not kept. */
export const MAX_KEPT_NAMES = 4096;

/** A name kept by a NameTable, with its UTF-8 bytes for matching in place. */
interface KeptName {
  readonly name: string;
  readonly bytes: Buffer;
}

/**
 * The muscle names one parser has seen: each name is kept as one fresh string, so the samples of one
 * muscle share it (less memory, cheap comparisons later) and none pins the chunk it was read from. The
 * few most used are matched in the line itself, text or bytes, without cutting a substring.
 */
export class NameTable {
  private readonly recent: KeptName[] = [];
  private readonly kept = new Map<string, string>();

  /** The kept string equal to `name` (a fresh copy of it the first time). */
  intern(name: string): string {
    const known = this.kept.get(name);
    if (known !== undefined) return known;
    const own = freshCopy(name);
    if (this.kept.size < MAX_KEPT_NAMES) this.kept.set(own, own);
    return own;
  }

  /** The name text[start, end), kept. */
  inText(text: string, start: number, end: number): string {
    const length = end - start;
    const recent = this.recent;
    for (let k = 0; k < recent.length; k++) {
      const name = (recent[k] as KeptName).name;
      if (name.length === length && textAt(text, start, name)) return name;
    }
    return this.remember(this.intern(text.slice(start, end)));
  }

  /** The name b[start, end), kept; the bytes must all be ASCII (below 128). */
  inAsciiBytes(b: Buffer, start: number, end: number): string {
    const length = end - start;
    const recent = this.recent;
    for (let k = 0; k < recent.length; k++) {
      const known = recent[k] as KeptName;
      if (known.bytes.length === length && bytesAt(b, start, end, known.bytes)) return known.name;
    }
    // ASCII only, so latin1 gives the text UTF-8 would.
    return this.remember(this.intern(b.toString('latin1', start, end)));
  }

  private remember(name: string): string {
    if (this.recent.length < RECENT_NAMES) this.recent.push({ name, bytes: Buffer.from(name, 'utf8') });
    return name;
  }
}

/** A few fixed words (event names, sides) recognised in place, in text or in UTF-8 bytes. */
export class FixedWords<W extends string> {
  private readonly words: readonly W[];
  private readonly bytes: readonly Buffer[];

  constructor(words: readonly W[]) {
    this.words = words;
    this.bytes = words.map((w) => Buffer.from(w, 'utf8'));
  }

  /** The word that text[start, end) is, or null. */
  inText(text: string, start: number, end: number): W | null {
    const length = end - start;
    for (let k = 0; k < this.words.length; k++) {
      const word = this.words[k] as W;
      if (word.length === length && textAt(text, start, word)) return word;
    }
    return null;
  }

  /** The word that b[start, end) is, or null. */
  inBytes(b: Buffer, start: number, end: number): W | null {
    const length = end - start;
    for (let k = 0; k < this.bytes.length; k++) {
      const piece = this.bytes[k] as Buffer;
      if (piece.length === length && bytesAt(b, start, end, piece)) return this.words[k] as W;
    }
    return null;
  }
}
