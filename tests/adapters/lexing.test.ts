/**
 * The shared lexing of the fast parsers, held against the language's own definitions: Number() of a
 * string (ECMA-262, StringToNumber), JSON.parse and the number grammar of RFC 8259 §6 (Bray T 2017,
 * The JavaScript Object Notation (JSON) Data Interchange Format, IETF RFC 8259), and
 * String.prototype.startsWith (ECMA-262).
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  EXACT_DIGITS,
  FixedWords,
  MAX_KEPT_NAMES,
  NameTable,
  RECENT_NAMES,
  bytesAt,
  freshCopy,
  plainDecimalAt,
  readJsonNumber,
  readJsonNumberBytes,
  readPlainDecimal,
  readPlainDecimalBytes,
  textAt,
} from '../../adapters/lexing.ts';

const digits = (max: number): fc.Arbitrary<string> => fc.stringMatching(new RegExp(`^[0-9]{0,${max}}$`));

/** Text around a piece, so readers are tried away from the start and end of their buffer. */
const junk = fc.string({ maxLength: 4 });

/** `text` between `before` and `after` as UTF-8 bytes, with where it starts and stops in them. */
function inBuffer(before: string, text: string, after: string): { readonly b: Buffer; readonly start: number; readonly stop: number } {
  const start = Buffer.byteLength(before);
  return { b: Buffer.from(before + text + after), start, stop: start + Buffer.byteLength(text) };
}

/**
 * For each of `texts` or any short string, put between junk: `check` reads it from its text into one slot
 * and from its bytes into the other.
 */
function eachTextInBuffer(
  texts: fc.Arbitrary<string>,
  check: (placed: { readonly before: string; readonly text: string; readonly after: string; readonly b: Buffer; readonly start: number; readonly stop: number }, fromText: Float64Array, fromBytes: Float64Array) => void,
): void {
  fc.assert(
    fc.property(junk, fc.oneof(texts, fc.string({ maxLength: 8 })), junk, (before, text, after) => {
      check({ before, text, after, ...inBuffer(before, text, after) }, new Float64Array(1), new Float64Array(1));
    }),
    { numRuns: 3000 },
  );
}

/** Decimal text as a writer or a person might type it: signs, points at either end, too many digits. */
const decimalText = fc
  .tuple(fc.constantFrom('', '-', '+'), digits(10), fc.boolean(), digits(10))
  .map(([sign, whole, point, fraction]) => `${sign}${whole}${point ? '.' : ''}${point ? fraction : ''}`);

/** RFC 8259 §6: number = [ minus ] int [ frac ] [ exp ]; int = zero / ( digit1-9 *DIGIT ); frac = "." 1*DIGIT. */
const RFC8259_NUMBER = /^-?(?:0|[1-9][0-9]*)(?:\.[0-9]+)?(?:[eE][+-]?[0-9]+)?$/;
const RFC8259_PLAIN = /^-?(?:0|[1-9][0-9]*)(?:\.[0-9]+)?$/;

/** JSON-number-like text: valid ones (with and without exponents) and near misses. */
const jsonNumberText = fc.oneof(
  fc
    .tuple(fc.constantFrom('', '-'), fc.oneof(fc.constant('0'), fc.stringMatching(/^[1-9][0-9]{0,12}$/)), fc.option(fc.stringMatching(/^[0-9]{1,10}$/)))
    .map(([sign, whole, fraction]) => `${sign}${whole}${fraction === null ? '' : `.${fraction}`}`),
  fc.double({ noNaN: true, noDefaultInfinity: true }).map(String),
  fc.constantFrom('-', '-0', '00', '01', '1.', '.5', '+1', '1e2', '1E-2', '-.5', '0.0', '999999999999999', '9999999999999999', '0.00000000000001'),
);

describe('readPlainDecimal', () => {
  it('reads a plain decimal to the same double as Number() of its text, and refuses the rest', () => {
    fc.assert(
      fc.property(fc.oneof(decimalText, fc.string({ maxLength: 8 })), (text) => {
        const out = new Float64Array([12345]);
        const read = readPlainDecimal(text, 0, text.length, out);
        const plain = /^[+-]?(?:[0-9]+\.?[0-9]*|\.[0-9]+)$/.test(text) && text.replace(/[^0-9]/g, '').length <= EXACT_DIGITS;
        expect(read).toBe(plain);
        if (read) expect(Object.is(out[0], Number(text))).toBe(true);
        else expect(out[0]).toBe(12345);
      }),
      { numRuns: 5000 },
    );
  });

  it('reads from its UTF-8 bytes, anywhere in a buffer, exactly as from its text', () => {
    eachTextInBuffer(decimalText, ({ before, text, after, b, start, stop }, fromText, fromBytes) => {
      const readText = readPlainDecimal(`${before}${text}${after}`, before.length, before.length + text.length, fromText);
      const readBytes = readPlainDecimalBytes(b, start, stop, fromBytes);
      expect(readBytes).toBe(readText);
      if (readText) expect(Object.is(fromBytes[0], fromText[0])).toBe(true);
    });
  });

  it('reads the edges of the exact range, and signed zeros', () => {
    expect(plainDecimalAt('999999999999999', 0, 15)).toBe(999999999999999);
    expect(plainDecimalAt('0.00000000000001', 0, 16)).toBe(Number('0.00000000000001'));
    expect(Object.is(plainDecimalAt('-0', 0, 2), -0)).toBe(true);
    expect(Object.is(plainDecimalAt('+0.', 0, 3), 0)).toBe(true);
    expect(plainDecimalAt('x12.5y', 1, 5)).toBe(12.5);
    for (const refused of ['', '.', '+', '-.', '1e5', ' 1', '1 ', '1.2.3', '1234567890123456', '0x10', 'Infinity']) {
      expect(plainDecimalAt(refused, 0, refused.length)).toBeNaN();
    }
  });
});

describe('readJsonNumber', () => {
  it('reads only what RFC 8259 calls a number without exponent, to the same double as JSON.parse', () => {
    fc.assert(
      fc.property(fc.oneof(jsonNumberText, fc.string({ maxLength: 8 })), fc.constantFrom('', ',', '}', 'x', ' '), (number, next) => {
        const text = `${number}${next}`;
        const out = new Float64Array(1);
        const end = readJsonNumber(text, 0, out);
        if (end >= 0) {
          const read = text.slice(0, end);
          expect(read).toMatch(RFC8259_PLAIN);
          expect(Object.is(out[0], JSON.parse(read))).toBe(true);
          // It stops where the grammar's longest number at the start ends.
          expect(read).toBe(/^-?(?:0|[1-9][0-9]*)(?:\.[0-9]+)?/.exec(text)?.[0]);
        }
      }),
      { numRuns: 5000 },
    );
  });

  it('reads every plain RFC 8259 number of at most 15 digits whole', () => {
    fc.assert(
      fc.property(jsonNumberText, fc.constantFrom('', ',', '}'), (number, next) => {
        if (!RFC8259_PLAIN.test(number) || number.replace(/[^0-9]/g, '').length > EXACT_DIGITS) return;
        const out = new Float64Array(1);
        expect(readJsonNumber(`${number}${next}`, 0, out)).toBe(number.length);
        expect(Object.is(out[0], JSON.parse(number))).toBe(true);
      }),
      { numRuns: 5000 },
    );
  });

  it('refuses exponents, leading zeros and bare points, which JSON.parse then judges', () => {
    const out = new Float64Array(1);
    for (const refused of ['.5', '+1', '-', '1.', '-.5', '1234567890123456', 'x']) expect(readJsonNumber(refused, 0, out)).toBe(-1);
    expect(RFC8259_NUMBER.test('1e2')).toBe(true);
    expect(readJsonNumber('1e2', 0, out)).toBe(1); // the caller finds "e" where it expects a comma or "}"
    expect(readJsonNumber('01', 0, out)).toBe(1); // "0" then "1": the caller refuses the line
  });

  it('reads from its UTF-8 bytes, anywhere in a buffer, exactly as from its text', () => {
    eachTextInBuffer(jsonNumberText, ({ text, b, start, stop }, fromText, fromBytes) => {
      // The text reader sees the line end where the text ends; the bytes reader, at `stop`.
      const endText = readJsonNumber(text, 0, fromText);
      const endBytes = readJsonNumberBytes(b, start, stop, fromBytes);
      expect(endBytes < 0 ? -1 : endBytes - start).toBe(endText);
      if (endText >= 0) expect(Object.is(fromBytes[0], fromText[0])).toBe(true);
    });
  });
});

describe('textAt and bytesAt', () => {
  it('say what String.prototype.startsWith says inside the text, and false outside it', () => {
    fc.assert(
      fc.property(fc.string({ maxLength: 12 }), fc.string({ maxLength: 4 }), fc.integer({ min: -3, max: 16 }), (text, piece, at) => {
        const inside = at >= 0 && at <= text.length;
        expect(textAt(text, at, piece)).toBe(inside && text.startsWith(piece, at));
      }),
      { numRuns: 3000 },
    );
  });

  it('agree on ASCII text and its bytes, and never look past the end they are given', () => {
    fc.assert(
      fc.property(fc.string({ maxLength: 12 }), fc.string({ maxLength: 4 }), fc.integer({ min: -3, max: 16 }), fc.nat(12), (text, piece, at, cut) => {
        const end = Math.min(cut, text.length);
        expect(bytesAt(Buffer.from(text, 'latin1'), at, end, Buffer.from(piece, 'latin1'))).toBe(textAt(text.slice(0, end), at, piece));
      }),
      { numRuns: 3000 },
    );
  });
});

describe('freshCopy', () => {
  it('gives the same text, short or long', () => {
    fc.assert(
      fc.property(fc.string({ maxLength: 40, unit: 'binary' }), (s) => {
        expect(freshCopy(s)).toBe(s);
      }),
    );
  });
});

describe('NameTable', () => {
  const ascii = fc.string({ minLength: 1, maxLength: 20 });

  it('gives each name, from text or from bytes, as its text, one shared string per name', () => {
    fc.assert(
      fc.property(fc.array(fc.tuple(fc.constantFrom('calf', 'thigh', 'a name longer than thirteen'), fc.boolean(), junk)), (reads) => {
        const table = new NameTable();
        const seen = new Map<string, string>();
        for (const [name, asBytes, before] of reads) {
          const line = `${before}${name},`;
          const got = asBytes
            ? table.inAsciiBytes(Buffer.from(line, 'latin1'), before.length, before.length + name.length)
            : table.inText(line, before.length, before.length + name.length);
          expect(got).toBe(name);
          const first = seen.get(name) ?? got;
          seen.set(name, first);
          expect(Object.is(got, first)).toBe(true);
        }
      }),
      { numRuns: 500 },
    );
  });

  it('still reads every name right past the names it matches in place and past the names it keeps', () => {
    const table = new NameTable();
    const count = MAX_KEPT_NAMES + RECENT_NAMES + 10;
    for (let i = 0; i < count; i++) {
      const name = `muscle ${i}`;
      const line = `x,${name},y`;
      expect(i % 2 === 0 ? table.inText(line, 2, 2 + name.length) : table.inAsciiBytes(Buffer.from(line), 2, 2 + name.length)).toBe(name);
    }
    expect(table.intern('muscle 3')).toBe('muscle 3');
  });

  it('never takes a name of other characters for the bytes of an ASCII one', () => {
    fc.assert(
      fc.property(fc.string({ minLength: 1, maxLength: 6, unit: 'binary' }), ascii, (other, name) => {
        const table = new NameTable();
        table.inText(other, 0, other.length);
        expect(table.inAsciiBytes(Buffer.from(name, 'latin1'), 0, name.length)).toBe(name);
      }),
      { numRuns: 2000 },
    );
  });
});

describe('FixedWords', () => {
  it('recognises exactly its words, in text and in bytes', () => {
    const words = new FixedWords(['foot_strike', 'toe_off'] as const);
    fc.assert(
      fc.property(junk, fc.oneof(fc.constantFrom('foot_strike', 'toe_off', 'toe_of', 'toe_offf', 'Toe_off', ''), fc.string({ maxLength: 11 })), junk, (before, cell, after) => {
        const line = `${before}${cell}${after}`;
        const expected = cell === 'foot_strike' || cell === 'toe_off' ? cell : null;
        expect(words.inText(line, before.length, before.length + cell.length)).toBe(expected);
        expect(words.inBytes(Buffer.from(line, 'latin1'), before.length, before.length + cell.length)).toBe(expected);
      }),
      { numRuns: 3000 },
    );
  });
});
