import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { createCsvParser, ownCsvPlan } from '../../adapters/csv.ts';
import type { Frame } from '../../src/trial/records.ts';
import type { RejectReason } from '../../src/trial/reasons.ts';
import { csvTrial } from './invented-trial.ts';
import { itRejectsEach } from './rejection-table.ts';
import { csvRow as row, OWN_HEADER as HEADER, ownColumnRows, ownHeaders } from './own-csv-rows.ts';

function parseRows(rows: readonly string[], quick = true): Frame[] {
  const parse = createCsvParser({ quick });
  return rows.flatMap((row, i) => parse(row, i + 1));
}

function reasonOf(row: string, header = HEADER): RejectReason | Frame['kind'] {
  const frame = parseRows([header, row])[1] as Frame;
  return frame.kind === 'rejection' ? frame.reason : frame.kind;
}

function kinds(frames: readonly Frame[]): string[] {
  return frames.map((f) => (f.kind === 'rejection' ? f.reason : f.kind));
}

describe('ownCsvPlan', () => {
  it('learns the columns in any order and ignores unknown ones', () => {
    const result = ownCsvPlan('side,probe,fascicle_mm,event,time_s,muscle');
    expect(result.ok && result.plan.index).toEqual({ t: 4, muscle: 5, fascicle: 2, pennation: -1, quality: -1, activation: -1, event: 3, side: 0, marker: -1 });
  });

  it('names every missing required column in one message, with the columns the row has', () => {
    const result = ownCsvPlan('time_s,pennation_deg');
    expect(!result.ok && result.problem).toBe(
      'the header row (line 1) lacks columns "muscle" (our own column), "fascicle_mm" (our own column); it has "time_s", "pennation_deg". ' +
        'Add the missing column or fix its name in the file or the mapping',
    );
  });

  it('suggests the nearest column the row has for a misspelled one', () => {
    const result = ownCsvPlan('time_s,muscle,fasicle_mm');
    expect(!result.ok && result.problem).toContain('"fascicle_mm" (our own column); did you mean "fasicle_mm"?');
  });

  it('needs event and side together', () => {
    expect(ownCsvPlan('time_s,muscle,fascicle_mm,event')).toMatchObject({ ok: false, problem: expect.stringContaining('an event column ("event") but no side') });
    expect(ownCsvPlan('time_s,muscle,fascicle_mm').ok).toBe(true);
  });

  it('refuses a column named twice', () => {
    expect(ownCsvPlan('time_s,muscle,fascicle_mm,muscle')).toMatchObject({ ok: false, problem: expect.stringContaining('names column "muscle" twice') });
  });
});

describe('createCsvParser', () => {
  it('gives a Header frame for the header row and one frame per row', () => {
    const frames = parseRows(csvTrial(2));
    expect(kinds(frames)).toEqual(['header', 'event', 'sample', 'sample']);
    expect(frames[0]).toEqual({ kind: 'header', muscles: {}, line: 1 });
    expect(frames[1]).toEqual({ kind: 'event', tS: 0, event: 'foot_strike', side: 'left', line: 2 });
    expect(frames[3]).toMatchObject({ kind: 'sample', tS: 0.01, muscle: 'calf', pennationDeg: 20, quality: 0.9, line: 4 });
  });

  it('reads columns in any order, with unknown columns ignored and optional ones left out', () => {
    const frames = parseRows(['probe,fascicle_mm,muscle,time_s', row(['A', '51.5', 'calf, medial', '0.5'])]);
    expect(frames[1]).toMatchObject({ kind: 'sample', tS: 0.5, muscle: 'calf, medial', fascicleMm: 51.5, quality: 1 });
    expect(frames[1]?.kind === 'sample' && Number.isNaN(frames[1].pennationDeg)).toBe(true);
  });

  it('accepts spaces around cells and a row with its trailing empty cells left off', () => {
    expect(parseRows([HEADER, ' 0.1 , calf , 50 ,  , 0.5'])[1]).toMatchObject({ kind: 'sample', tS: 0.1, muscle: 'calf', fascicleMm: 50, quality: 0.5 });
  });

  it('reads a marker column: a row with only a marker is a marker', () => {
    const frames = parseRows(['time_s,muscle,fascicle_mm,marker', '1.5,,,treadmill at 1.2 m/s', '1.6,calf,50,']);
    expect(frames.slice(1)).toEqual([{ kind: 'marker', tS: 1.5, marker: 'treadmill at 1.2 m/s', line: 2 }, expect.objectContaining({ kind: 'sample', tS: 1.6 })]);
  });

  it('skips and counts the same header row again (files joined end to end) as another Header frame', () => {
    expect(kinds(parseRows([HEADER, '0,calf,50,,,,', HEADER, '1,calf,50,,,,']))).toEqual(['header', 'sample', 'header', 'sample']);
  });

  it('rejects a bare time_s line mid-file and goes on reading the rows after it in the same columns', () => {
    const frames = parseRows(['time_s,muscle,fascicle_mm,pennation_deg', '0,calf,50,20', 'time_s', '0.01,calf,51,21']);
    expect(kinds(frames)).toEqual(['header', 'sample', 'schema', 'sample']);
    expect(frames[2]).toMatchObject({ line: 3, field: 'time_s', message: expect.stringContaining('a header row unlike the one on line 1') });
    expect(frames[3]).toMatchObject({ kind: 'sample', tS: 0.01, fascicleMm: 51, pennationDeg: 21 });
  });

  it('rejects a mid-file header row with two columns swapped, and keeps reading later rows in the first columns', () => {
    const frames = parseRows(['time_s,muscle,fascicle_mm,pennation_deg', '0,calf,50,20', 'time_s,muscle,pennation_deg,fascicle_mm', '0.02,calf,52,22']);
    expect(kinds(frames)).toEqual(['header', 'sample', 'schema', 'sample']);
    expect(frames[3]).toMatchObject({ kind: 'sample', fascicleMm: 52, pennationDeg: 22 });
  });

  itRejectsEach(reasonOf, [
    ['fascicle 0', 'out_of_range', '0,calf,0,,,,'],
    ['fascicle negative', 'out_of_range', '0,calf,-3,,,,'],
    ['fascicle 1e400', 'out_of_range', '0,calf,1e400,,,,'],
    ['pennation 95', 'out_of_range', '0,calf,50,95,,,'],
    ['quality 1.5', 'out_of_range', '0,calf,50,,1.5,,'],
    ['time 1e400', 'out_of_range', '1e400,calf,50,,,,'],
    ['event time -1e400', 'out_of_range', '-1e400,,,,,toe_off,left'],
    ['time as text', 'schema', 'soon,calf,50,,,,'],
    ['empty time', 'schema', ',calf,50,,,,'],
    ['fascicle as text', 'schema', '0,calf,fifty,,,,'],
    ['missing fascicle', 'schema', '0,calf,,,,,'],
    ['missing muscle', 'schema', '0,,50,,,,'],
    ['pennation as text', 'schema', '0,calf,50,steep,,,'],
    ['an event with a bad side', 'schema', '0,,,,,toe_off,up'],
    ['an event row with sample cells', 'schema', '0,calf,50,,,foot_strike,left'],
    ['a side with no event', 'schema', '0,,,,,,left'],
  ]);

  it('rejects unknown events as unknown_event', () => {
    expect(reasonOf('0,,,,,heel_off,left')).toBe('unknown_event');
  });

  it('rejects broken quoting and too many cells as not_json, saying how to fix it', () => {
    expect(reasonOf('0,"calf,50,,,,')).toBe('not_json');
    const frame = parseRows([HEADER, '0,calf,50,,,,,extra'])[1];
    expect(frame).toMatchObject({ kind: 'rejection', reason: 'not_json' });
    expect(frame?.kind === 'rejection' && frame.message).toContain('row has 8 cells but the header row has 7');
  });

  it('says what failed, what is accepted and how to fix it, and names the column', () => {
    const frame = parseRows([HEADER, '0,calf,-3,,,,'])[1];
    expect(frame).toMatchObject({
      message: 'fascicle_mm is -3: must be a finite number > 0 (millimetres); if your device sends metres, use a device mapping',
      field: 'fascicle_mm',
    });
  });

  it('says that a decimal comma is not read with the decimal point', () => {
    const frame = parseRows([HEADER, '0,calf,"52,3",,,,'])[1];
    expect(frame?.kind === 'rejection' && frame.message).toContain('not a decimal number with "." as its decimal mark');
  });

  it('rejects every row when the first line is not a header row of our columns, without throwing', () => {
    const frames = parseRows(['time_s,muscle', '0,calf', HEADER, '0,calf,50']);
    expect(kinds(frames)).toEqual(['schema', 'schema', 'schema', 'schema']);
    expect(frames[1]?.kind === 'rejection' && frames[1].message).toContain('no valid CSV header row has been read');
  });

  it('keeps one string per muscle name', () => {
    const frames = parseRows([HEADER, '0,a muscle with a long name,50', '1,a muscle with a long name,51']);
    const [a, b] = [frames[1], frames[2]];
    expect(a?.kind === 'sample' && b?.kind === 'sample' && a.muscle === b.muscle).toBe(true);
  });

  it('gives the same frames with or without the quick checks (csv-parse on every row), for near-valid rows', () => {
    const number = fc.oneof(
      fc.constantFrom('', '0', '-0', '1', '90', '90.0001', '0.5', '1.5', '-3', '52.25', '1e400', '1e2', ' 7', '.5', '5.', '+2', '0x10', 'x', '52,3'),
      fc.double({ noNaN: true }).map(String),
      fc.integer({ min: -100, max: 100 }).map(String),
    );
    const text = fc.constantFrom('', 'calf', ' calf', 'calf ', 'a, b', 'say "hi"', 'time_s', 'foot_strike', 'toe_off', 'heel_off', 'left', 'right', 'up', '\u00a0calf');
    const rows = ownColumnRows(number, text, 2);
    const headers = ownHeaders('time_s,muscle,fascicle_mm,marker');
    fc.assert(
      fc.property(headers, fc.array(rows, { minLength: 1, maxLength: 5 }), (header, rs) => {
        const quick = createCsvParser();
        const careful = createCsvParser({ quick: false });
        [header, ...rs].forEach((r, i) => {
          expect(quick(r, i + 1)).toEqual(careful(r, i + 1));
        });
      }),
      { numRuns: 3000 },
    );
  });

  it('gives at least one frame for any row and never throws', () => {
    const parse = createCsvParser();
    parse(HEADER, 1);
    const cell = fc.oneof(fc.string({ maxLength: 6 }), fc.constantFrom('0', '1e400', '-1', '95', 'foot_strike', 'left', '"', '""'));
    fc.assert(
      fc.property(fc.oneof(fc.string({ maxLength: 80 }), fc.array(cell, { maxLength: 9 }).map((cells) => cells.join(','))), (r) => {
        expect(parse(r, 2).length).toBeGreaterThan(0);
      }),
      { numRuns: 3000 },
    );
  });
});
