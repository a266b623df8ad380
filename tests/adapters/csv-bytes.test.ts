import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { createCsvReader } from '../../adapters/csv.ts';
import type { Sample } from '../../src/trial/records.ts';

const HEADER = 'time_s,muscle,fascicle_mm,pennation_deg,quality,event,side';

describe('createCsvReader', () => {
  it('reads a row from its UTF-8 bytes, anywhere in a buffer, exactly as from its text', () => {
    const number = fc.oneof(fc.double({ noNaN: true, min: -100, max: 200 }).map(String), fc.constantFrom('', '0', '-0', '+1', '.5', '1.', '1e3', '1e400', '00012.5', '1234567890123456', ' 5', 'x'));
    const text = fc.constantFrom('', 'calf', ' calf', 'calf ', 'a, b', 'say "hi"', 'time_s', 'foot_strike', 'toe_off', 'heel_off', 'left', 'right', 'größe', '\t');
    const quote = (cell: string): string => (/[",]/.test(cell) ? `"${cell.replaceAll('"', '""')}"` : cell);
    const row = fc
      .tuple(number, text, number, number, number, text, text, fc.integer({ min: 0, max: 3 }))
      .map(([t, muscle, fascicle, pennation, quality, event, side, drop]) => {
        const cells = [t, muscle, fascicle, pennation, quality, event, side].map(quote);
        return cells.slice(0, cells.length - drop).join(',');
      });
    const headers = fc.constantFrom(HEADER, 'side,event,quality,pennation_deg,fascicle_mm,muscle,time_s', 'time_s,muscle,fascicle_mm,x,y,z,w', 'time_s,muscle,fascicle_mm');
    fc.assert(
      fc.property(headers, fc.array(fc.oneof(row, fc.string({ maxLength: 20 })), { minLength: 1, maxLength: 6 }), fc.string({ maxLength: 4 }), (header, rows, before) => {
        const fromText = createCsvReader();
        const fromBytes = createCsvReader();
        fromText.text(header, 1);
        fromBytes.text(header, 1);
        rows.forEach((r, i) => {
          const head = Buffer.from(before);
          const bytes = Buffer.concat([head, Buffer.from(r), Buffer.from(',x')]);
          expect(fromBytes.bytes(bytes, head.length, head.length + Buffer.byteLength(r), i + 2)).toEqual(fromText.text(r, i + 2));
        });
      }),
      { numRuns: 3000 },
    );
  });

  it('gives the rows of one muscle, from text or bytes, one shared name string', () => {
    const reader = createCsvReader();
    reader.text(HEADER, 1);
    const a = reader.text('0,soleus muscle long name,50,,,,', 2) as Sample;
    const b = reader.bytes(Buffer.from('0.01,soleus muscle long name,50.1,,,,'), 0, 37, 3) as Sample;
    expect(b).toMatchObject({ kind: 'sample', tS: 0.01, fascicleMm: 50.1 });
    expect(Object.is(a.muscle, b.muscle)).toBe(true);
  });
});
