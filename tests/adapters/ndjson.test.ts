import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parseNdjsonLine } from '../../adapters/ndjson.ts';
import { ndjsonTrial } from './invented-trial.ts';

describe('parseNdjsonLine', () => {
  it('reads each record kind of an invented trial', () => {
    const kinds = ndjsonTrial(3).map((text, i) => parseNdjsonLine(text, i + 1).kind);
    expect(kinds).toEqual(['header', 'event', 'sample', 'sample', 'sample']);
  });

  it('numbers the frame with the line given', () => {
    expect(parseNdjsonLine('{"t":0,"marker":"m"}', 42)).toMatchObject({ line: 42 });
    expect(parseNdjsonLine('nope', 43)).toMatchObject({ kind: 'rejection', reason: 'not_json', line: 43 });
  });

  it('reads a header seen again later as another header, not an error', () => {
    const header = ndjsonTrial(0)[0] ?? '';
    expect(parseNdjsonLine(header, 1).kind).toBe('header');
    expect(parseNdjsonLine(header, 5000).kind).toBe('header');
  });

  it('rejects a blank line as not_json (readers skip blank lines before this)', () => {
    expect(parseNdjsonLine('', 1)).toMatchObject({ reason: 'not_json' });
  });

  it('gives exactly one frame for any string and never throws', () => {
    fc.assert(
      fc.property(fc.string({ unit: 'grapheme', maxLength: 200 }), (text) => {
        expect(parseNdjsonLine(text, 1).kind).toBeTypeOf('string');
      }),
      { numRuns: 3000 },
    );
  });
});
