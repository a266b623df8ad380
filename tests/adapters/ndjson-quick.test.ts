import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { createNdjsonParser, createNdjsonReader, parseNdjsonLine } from '../../adapters/ndjson.ts';
import { parseJsonText } from '../../adapters/parse-record.ts';
import type { Sample } from '../../src/trial/records.ts';

/** Numbers as a writer or a person might type them: plain, exponents, leading zeros, signs, too many digits. */
const numberText = fc.oneof(
  fc.double({ noNaN: true, noDefaultInfinity: true, min: -200, max: 200 }).map(String),
  fc.integer({ min: -5, max: 120 }).map(String),
  fc.constantFrom('0', '-0', '0.5', '00.5', '1.', '.5', '+1', '1e2', '1E-2', '0.0000000000000001', '123456789012345678', '1.2.3', '-', '', '"4"', 'null', '1e400', '90', '90.0001', '1', '1.0001'),
);
const nameText = fc.oneof(
  fc.constantFrom('calf', 'thigh', '', 'a\\"b', 'tab\there', 'é', '__proto__', 'a much longer muscle name than thirteen'),
  fc.string({ maxLength: 8 }),
);

/** Sample-like lines: our three fields in order, pennation and quality or not, then one of these tails before the closing brace. */
function sampleLikeLine(tails: readonly string[]): fc.Arbitrary<string> {
  return fc
    .tuple(numberText, nameText, numberText, fc.option(numberText), fc.option(numberText), fc.constantFrom(...tails))
    .map(([t, muscle, f, p, q, tail]) => {
      let s = `{"t":${t},"muscle":"${muscle}","fascicle_mm":${f}`;
      if (p !== null) s += `,"pennation_deg":${p}`;
      if (q !== null) s += `,"quality":${q}`;
      return `${s}${tail}}`;
    });
}

describe('createNdjsonParser', () => {
  it('gives the same frame as the careful reading for sample-like lines, typed or odd', () => {
    const line = sampleLikeLine(['', ' ', '}', ',"x":1', ',"quality":0.5']);
    fc.assert(
      fc.property(line, (text) => {
        expect(createNdjsonParser()(text, 7)).toEqual(parseJsonText(text, 7));
        expect(parseNdjsonLine(text, 7)).toEqual(parseJsonText(text, 7));
      }),
      { numRuns: 5000 },
    );
  });

  it('reads a line from its UTF-8 bytes, anywhere in a buffer, exactly as from its text', () => {
    const line = sampleLikeLine(['', ' ', '}', ',"x":1']);
    fc.assert(
      fc.property(fc.oneof(line, fc.string({ maxLength: 60 })), fc.string({ maxLength: 5 }), fc.string({ maxLength: 5 }), (text, before, after) => {
        const head = Buffer.from(before);
        const bytes = Buffer.concat([head, Buffer.from(text), Buffer.from(after)]);
        const fromBytes = createNdjsonReader().bytes(bytes, head.length, head.length + Buffer.byteLength(text), 4);
        expect(fromBytes).toEqual(createNdjsonReader().text(text, 4));
      }),
      { numRuns: 5000 },
    );
  });

  it('gives the samples of one muscle read from bytes one shared name string', () => {
    const reader = createNdjsonReader();
    const a = reader.bytes(Buffer.from('{"t":0,"muscle":"calf","fascicle_mm":50}'), 0, 40, 1) as Sample;
    const b = reader.bytes(Buffer.from('x{"t":1,"muscle":"calf","fascicle_mm":51}'), 1, 41, 2) as Sample;
    expect([a.kind, b.kind, b.tS, b.fascicleMm]).toEqual(['sample', 'sample', 1, 51]);
    expect(Object.is(a.muscle, b.muscle)).toBe(true);
  });

  it('gives the same frame as the careful reading for any text', () => {
    const parse = createNdjsonParser();
    fc.assert(
      fc.property(fc.string({ maxLength: 120 }), (text) => {
        expect(parse(text, 1)).toEqual(parseJsonText(text, 1));
      }),
      { numRuns: 3000 },
    );
  });

  it('reads exact values, the same doubles as JSON.parse', () => {
    const text = '{"t":0.1,"muscle":"calf","fascicle_mm":52.345,"pennation_deg":18.27,"quality":0.953}';
    const s = createNdjsonParser()(text, 3) as Sample;
    const o = JSON.parse(text) as Record<string, number>;
    expect([s.tS, s.fascicleMm, s.pennationDeg, s.quality]).toEqual([o['t'], o['fascicle_mm'], o['pennation_deg'], o['quality']]);
  });

  it('gives the samples of one muscle one shared name string, not a piece of each line', () => {
    const parse = createNdjsonParser();
    const a = parse('{"t":0,"muscle":"gastrocnemius medialis","fascicle_mm":50}', 1) as Sample;
    const b = parse('{"t":0.01,"muscle":"gastrocnemius medialis","fascicle_mm":50.1}', 2) as Sample;
    expect(a.muscle).toBe('gastrocnemius medialis');
    expect(Object.is(a.muscle, b.muscle)).toBe(true);
  });

  it('rejects out-of-range and malformed samples with the careful reading’s reasons', () => {
    const parse = createNdjsonParser();
    expect(parse('{"t":0,"muscle":"calf","fascicle_mm":-3}', 1)).toMatchObject({ kind: 'rejection', reason: 'out_of_range' });
    expect(parse('{"t":0,"muscle":"calf","fascicle_mm":4', 1)).toMatchObject({ kind: 'rejection', reason: 'not_json' });
    expect(parse('{"t":0,"muscle":"","fascicle_mm":4}', 1)).toMatchObject({ kind: 'rejection', reason: 'schema' });
    expect(parse('{"t":0,"muscle":"calf","fascicle_mm":4,"quality":1.5}', 1)).toMatchObject({ kind: 'rejection', reason: 'out_of_range' });
  });
});
