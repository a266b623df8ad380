import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { createCsvParser, csvNumber, parseCsvHeaderRow, splitCsvRow } from '../../adapters/csv.ts';
import type { Frame } from '../../src/trial/records.ts';
import type { RejectReason } from '../../src/trial/reasons.ts';
import { csvTrial } from './invented-trial.ts';

const HEADER = 'time_s,muscle,fascicle_mm,pennation_deg,quality,event,side';

function parseRows(rows: readonly string[]): Frame[] {
  const parse = createCsvParser();
  return rows.map((row, i) => parse(row, i + 1));
}

function reasonOf(row: string, header = HEADER): RejectReason | Frame['kind'] {
  const frame = parseRows([header, row])[1] as Frame;
  return frame.kind === 'rejection' ? frame.reason : frame.kind;
}

describe('splitCsvRow', () => {
  it('splits unquoted cells, keeping empty ones', () => {
    expect(splitCsvRow('a,,b,')).toEqual(['a', '', 'b', '']);
    expect(splitCsvRow('')).toEqual(['']);
  });

  it('reads quoted cells with commas and doubled quotes (RFC 4180)', () => {
    expect(splitCsvRow('1,"calf, medial","say ""hi""",')).toEqual(['1', 'calf, medial', 'say "hi"', '']);
    expect(splitCsvRow('"",x')).toEqual(['', 'x']);
    expect(splitCsvRow('x, "quoted" ,y')).toEqual(['x', 'quoted', 'y']);
  });

  it('gives null for broken quoting', () => {
    expect(splitCsvRow('"open')).toBeNull();
    expect(splitCsvRow('"closed"after,x')).toBeNull();
    expect(splitCsvRow('in"side,x')).toBeNull();
  });

  it('gives back any cells written with RFC 4180 quoting', () => {
    const cell = fc.string({ maxLength: 8 }).filter((c) => !c.includes('\n') && !c.includes('\r'));
    fc.assert(
      fc.property(fc.array(cell, { minLength: 1, maxLength: 6 }), (cells) => {
        const row = cells.map((c) => (/[",]/.test(c) || c.startsWith(' ') ? `"${c.replaceAll('"', '""')}"` : c)).join(',');
        expect(splitCsvRow(row)).toEqual(cells);
      }),
    );
  });
});

describe('csvNumber', () => {
  it('reads decimal numbers only', () => {
    expect(csvNumber('52.3')).toBe(52.3);
    expect(csvNumber('-1e-3')).toBe(-0.001);
    expect(csvNumber('.5')).toBe(0.5);
    expect(csvNumber('1e400')).toBe(Infinity);
    for (const bad of ['', ' ', '0x10', 'NaN', 'Infinity', '1,5', '1.2.3', 'e5']) expect(csvNumber(bad)).toBeNaN();
  });
});

describe('parseCsvHeaderRow', () => {
  it('learns the columns in any order and ignores unknown ones', () => {
    const result = parseCsvHeaderRow('side,probe,fascicle_mm,event,time_s,muscle');
    expect(result.ok && result.columns.index).toEqual({
      time_s: 4,
      muscle: 5,
      fascicle_mm: 2,
      pennation_deg: -1,
      quality: -1,
      event: 3,
      side: 0,
      activation: -1,
    });
  });

  it('reads an activation column (0–1) carefully and refuses a value outside it', () => {
    const parse = createCsvParser();
    parse('time_s,muscle,fascicle_mm,activation', 1);
    const sample = parse('0.01,calf,52.3,0.25', 2);
    expect(sample).toMatchObject({ kind: 'sample', fascicleMm: 52.3, activation: 0.25 });
    expect(parse('0.02,calf,52.4,', 3)).toMatchObject({ kind: 'sample', activation: Number.NaN });
    expect(parse('0.03,calf,52.5,1.4', 4)).toMatchObject({ kind: 'rejection', reason: 'out_of_range', message: expect.stringMatching(/^activation is 1.4: must be a number from 0 to 1/) });
  });

  it('names every missing required column in one message', () => {
    const result = parseCsvHeaderRow('time_s,pennation_deg');
    expect(result.ok).toBe(false);
    expect(!result.ok && result.message).toContain('lacks columns muscle, fascicle_mm');
    expect(!result.ok && result.message).toContain(HEADER);
  });

  it('needs event and side together', () => {
    expect(parseCsvHeaderRow('time_s,muscle,fascicle_mm,event').ok).toBe(false);
    expect(parseCsvHeaderRow('time_s,muscle,fascicle_mm').ok).toBe(true);
  });

  it('refuses a column named twice', () => {
    expect(parseCsvHeaderRow('time_s,muscle,fascicle_mm,muscle')).toMatchObject({ ok: false });
  });
});

describe('createCsvParser', () => {
  it('gives a Header frame for the header row and one frame per row', () => {
    const frames = parseRows(csvTrial(2));
    expect(frames.map((f) => f.kind)).toEqual(['header', 'event', 'sample', 'sample']);
    expect(frames[0]).toEqual({ kind: 'header', muscles: {}, line: 1 });
    expect(frames[1]).toEqual({ kind: 'event', tS: 0, event: 'foot_strike', side: 'left', line: 2 });
    expect(frames[3]).toMatchObject({ kind: 'sample', tS: 0.01, muscle: 'calf', pennationDeg: 20, quality: 0.9, line: 4 });
  });

  it('reads columns in any order, with unknown columns ignored and optional ones left out', () => {
    const frames = parseRows(['probe,fascicle_mm,muscle,time_s', 'A,51.5,"calf, medial",0.5']);
    expect(frames[1]).toMatchObject({ kind: 'sample', tS: 0.5, muscle: 'calf, medial', fascicleMm: 51.5, quality: 1 });
    expect(frames[1]?.kind === 'sample' && Number.isNaN(frames[1].pennationDeg)).toBe(true);
  });

  it('accepts spaces around cells and a row with its trailing empty cells left off', () => {
    expect(parseRows([HEADER, ' 0.1 , calf , 50 ,  , 0.5'])[1]).toMatchObject({ kind: 'sample', tS: 0.1, muscle: 'calf', fascicleMm: 50, quality: 0.5 });
  });

  it('reads a header row seen again later as another Header frame', () => {
    expect(parseRows([HEADER, '0,calf,50,,,,', HEADER, '1,calf,50,,,,']).map((f) => f.kind)).toEqual(['header', 'sample', 'header', 'sample']);
  });

  it.each([
    ['fascicle 0', '0,calf,0,,,,'],
    ['fascicle negative', '0,calf,-3,,,,'],
    ['fascicle 1e400', '0,calf,1e400,,,,'],
    ['pennation 95', '0,calf,50,95,,,'],
    ['quality 1.5', '0,calf,50,,1.5,,'],
    ['time 1e400', '1e400,calf,50,,,,'],
    ['event time -1e400', '-1e400,,,,,toe_off,left'],
  ])('rejects %s as out_of_range', (_name, row) => {
    expect(reasonOf(row)).toBe('out_of_range');
  });

  it.each([
    ['time as text', 'soon,calf,50,,,,'],
    ['empty time', ',calf,50,,,,'],
    ['fascicle as text', '0,calf,fifty,,,,'],
    ['missing fascicle', '0,calf,,,,,'],
    ['missing muscle', '0,,50,,,,'],
    ['pennation as text', '0,calf,50,steep,,,'],
    ['an event with a bad side', '0,,,,,toe_off,up'],
    ['an event row with sample cells', '0,calf,50,,,foot_strike,left'],
    ['a side with no event', '0,,,,,,left'],
  ])('rejects %s as schema', (_name, row) => {
    expect(reasonOf(row)).toBe('schema');
  });

  it('rejects unknown events as unknown_event', () => {
    expect(reasonOf('0,,,,,heel_off,left')).toBe('unknown_event');
  });

  it('rejects broken quoting and too many cells as not_json, saying how to fix it', () => {
    expect(reasonOf('0,"calf,50,,,,')).toBe('not_json');
    const frame = parseRows([HEADER, '0,calf,50,,,,,extra'])[1];
    expect(frame).toMatchObject({ kind: 'rejection', reason: 'not_json' });
    expect(frame?.kind === 'rejection' && frame.message).toContain('row has 8 cells but the header row has 7');
  });

  it('says what failed, what is accepted and how to fix it', () => {
    const frame = parseRows([HEADER, '0,calf,-3,,,,'])[1];
    expect(frame?.kind === 'rejection' && frame.message).toBe(
      'fascicle_mm is -3: must be a finite number > 0 (millimetres); if your device sends metres, use a device mapping',
    );
  });

  it('rejects every row until a valid header row, without throwing', () => {
    const frames = parseRows(['time_s,muscle', '0,calf', HEADER, '0,calf,50']);
    expect(frames.map((f) => (f.kind === 'rejection' ? f.reason : f.kind))).toEqual(['schema', 'schema', 'header', 'sample']);
    expect(frames[1]?.kind === 'rejection' && frames[1].message).toContain('no valid CSV header row has been read');
  });

  it('keeps one string per muscle name', () => {
    const frames = parseRows([HEADER, '0,a muscle with a long name,50', '1,a muscle with a long name,51']);
    const [a, b] = [frames[1], frames[2]];
    expect(a?.kind === 'sample' && b?.kind === 'sample' && a.muscle === b.muscle).toBe(true);
  });

  it('gives the same frame with or without the quick checks, for near-valid rows', () => {
    const number = fc.oneof(
      fc.constantFrom('', '0', '-0', '1', '90', '90.0001', '0.5', '1.5', '-3', '52.25', '1e400', '1e2', ' 7', '.5', '5.', '+2', '0x10', 'x'),
      fc.double({ noNaN: true }).map(String),
      fc.integer({ min: -100, max: 100 }).map(String),
    );
    const text = fc.constantFrom('', 'calf', ' calf', 'calf ', 'a, b', 'say "hi"', 'time_s', 'foot_strike', 'toe_off', 'heel_off', 'left', 'right', 'up');
    const quote = (cell: string): string => (/[",]/.test(cell) ? `"${cell.replaceAll('"', '""')}"` : cell);
    const row = fc
      .tuple(number, text, number, number, number, text, text, fc.integer({ min: 0, max: 2 }))
      .map(([t, muscle, fascicle, pennation, quality, event, side, drop]) => {
        const cells = [t, muscle, fascicle, pennation, quality, event, side].map(quote);
        return cells.slice(0, cells.length - drop).join(',');
      });
    const headers = fc.constantFrom(HEADER, 'side,event,quality,pennation_deg,fascicle_mm,muscle,time_s', 'time_s,muscle,fascicle_mm,x,y,z,w');
    fc.assert(
      fc.property(headers, fc.array(row, { minLength: 1, maxLength: 5 }), (header, rows) => {
        const quick = createCsvParser();
        const careful = createCsvParser({ quick: false });
        [header, ...rows].forEach((r, i) => {
          expect(quick(r, i + 1)).toEqual(careful(r, i + 1));
        });
      }),
      { numRuns: 3000 },
    );
  });

  it('gives exactly one frame for any row and never throws', () => {
    const parse = createCsvParser();
    parse(HEADER, 1);
    const cell = fc.oneof(fc.string({ maxLength: 6 }), fc.constantFrom('0', '1e400', '-1', '95', 'foot_strike', 'left', '"', '""'));
    fc.assert(
      fc.property(fc.oneof(fc.string({ maxLength: 80 }), fc.array(cell, { maxLength: 9 }).map((cells) => cells.join(','))), (row) => {
        expect(parse(row, 2).kind).toBeTypeOf('string');
      }),
      { numRuns: 3000 },
    );
  });
});
