import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parseDeviceMapping, type DeviceMapping } from '../../adapters/device-mapping.ts';
import { findTableLayout } from '../../adapters/table-layout.ts';
import { layoutQuery, planTable, tableReading, type TablePlan, type TableRole } from '../../adapters/table-plan.ts';
import { createTableReader } from '../../adapters/table-reader.ts';
import type { Frame, Sample } from '../../src/trial/records.ts';
import { csvRow as row, OWN_HEADER as HEADER, ownColumnRows, ownHeaders } from './own-csv-rows.ts';

function mapping(value: Record<string, unknown>): DeviceMapping {
  const r = parseDeviceMapping({ format: 'lengthwise-mapping', version: 1, ...value });
  if (!r.ok) throw new Error(r.problems.join('\n'));
  return r.mapping;
}

/** The plan for a table whose first lines are `lines` (header row among them). */
function planOf(lines: readonly string[], m: DeviceMapping | null, role: TableRole = 'trial'): TablePlan {
  const reading = tableReading(m, role);
  const found = findTableLayout(
    lines.map((text, i) => ({ text, line: i + 1 })),
    layoutQuery(reading),
  );
  if (!found.ok) throw new Error(found.problem);
  const plan = planTable(found.layout, reading);
  if (!plan.ok) throw new Error(plan.problem);
  return plan.plan;
}

function read(plan: TablePlan, rows: readonly string[], quick = true, firstLine = 2): Frame[] {
  const reader = createTableReader(plan, { quick });
  const out: Frame[] = [];
  rows.forEach((r, i) => reader.text(r, firstLine + i, out));
  return out;
}

const WIDE = mapping({
  table: { delimiter: ';', decimal: ',' },
  fields: { t: 'Time (ms)' },
  units: { length: 'cm', angle: 'rad', time: 'ms' },
  time_offset_s: 1,
  muscles: {
    lat_gastroc: { side: 'left', fascicle: 'LG fascicle (cm)', pennation: 'LG pennation (rad)', quality: 'LG conf' },
    vastus_lat: { side: 'right', fascicle: 'VL fascicle (cm)' },
  },
});
const WIDE_HEADER = 'Time (ms);LG fascicle (cm);LG pennation (rad);LG conf;VL fascicle (cm)';

// Unit factors: 1 cm = 10 mm, 1 ms = 1e-3 s, 1 rad = 180/π degrees (BIPM 2019, The International System of
// Units, SI Brochure 9th edition; table numbers not at hand).
describe('a wide table (a row per time, columns per muscle)', () => {
  it('gives one sample per muscle with a fascicle cell, in mm, degrees and seconds on the samples clock', () => {
    const plan = planOf([WIDE_HEADER], WIDE);
    const frames = read(plan, ['1500;5,23;0,3927;0,9;8,1', '1510;;;;8,2']);
    expect(frames).toHaveLength(3);
    const [lg, vl, vl2] = frames as Sample[];
    expect(lg).toMatchObject({ kind: 'sample', muscle: 'lat_gastroc', quality: 0.9, line: 2 });
    expect(lg?.tS).toBeCloseTo(2.5, 12);
    expect(lg?.fascicleMm).toBeCloseTo(52.3, 10);
    expect(lg?.pennationDeg).toBeCloseTo(22.5, 2);
    expect(vl).toMatchObject({ kind: 'sample', muscle: 'vastus_lat', quality: 1, line: 2 });
    expect(vl?.fascicleMm).toBeCloseTo(81, 10);
    expect(vl2).toMatchObject({ muscle: 'vastus_lat', line: 3 });
    expect(vl2?.tS).toBeCloseTo(2.51, 12);
  });

  it("rejects one muscle's bad cell and keeps the other muscle's sample of the same row", () => {
    const plan = planOf([WIDE_HEADER], WIDE);
    const frames = read(plan, ['1500;lost;;;8,1']);
    expect(frames.map((f) => f.kind)).toEqual(['rejection', 'sample']);
    expect(frames[0]).toMatchObject({
      reason: 'schema',
      field: 'LG fascicle (cm)',
      message: expect.stringContaining('column "LG fascicle (cm)" (lat_gastroc fascicle) is "lost", not a decimal number'),
    });
  });

  it('says when a number uses the other decimal mark', () => {
    const plan = planOf([WIDE_HEADER], WIDE);
    const frames = read(plan, ['1500;5.23;;;8,1']);
    expect(frames[0]).toMatchObject({ kind: 'rejection', message: expect.stringContaining('not a decimal number with "," as its decimal mark') });
  });

  it('gives nothing for a row whose fascicle cells are all empty, and rejects a row whose time is bad', () => {
    const plan = planOf([WIDE_HEADER], WIDE);
    expect(read(plan, ['1500;;;;'])).toEqual([]);
    expect(read(plan, ['soon;5,2;;;8,1'])).toMatchObject([{ kind: 'rejection', reason: 'schema', field: 'Time (ms)' }]);
  });

  it('reads the same frames the quick way, from text or bytes, as csv-parse and the careful reading give', () => {
    const number = fc.oneof(
      fc.constantFrom('', '0', '-0', '1', '90', '0,5', '0.5', '1,5', '-3', '52,25', '1e400', ' 7', ',5', '5,', '+2', 'x', '1570,8'),
      fc.double({ noNaN: true, min: -1e6, max: 1e6 }).map((x) => String(x).replace('.', ',')),
      fc.integer({ min: -100, max: 2000 }).map(String),
    );
    const plan = planOf([WIDE_HEADER], WIDE);
    fc.assert(
      fc.property(fc.array(fc.tuple(number, number, number, number, number, fc.integer({ min: 0, max: 2 })), { minLength: 1, maxLength: 5 }), (rows) => {
        const texts = rows.map(([t, f, p, q, v, drop]) => row([t, f, p, q, v].slice(0, 5 - drop), ';'));
        const careful = read(plan, texts, false);
        expect(read(plan, texts, true)).toEqual(careful);
        const reader = createTableReader(plan);
        const fromBytes: Frame[] = [];
        texts.forEach((t, i) => {
          const b = Buffer.from(`x${t}y`);
          reader.bytes(b, 1, b.length - 1, 2 + i, fromBytes);
        });
        expect(fromBytes).toEqual(careful);
      }),
      { numRuns: 3000 },
    );
  });
});

describe('a long table of our own columns, read from its bytes', () => {

  it('reads a row from its UTF-8 bytes, anywhere in a buffer, exactly as from its text', () => {
    const number = fc.oneof(fc.double({ noNaN: true, min: -100, max: 200 }).map(String), fc.constantFrom('', '0', '-0', '+1', '.5', '1.', '1e3', '1e400', '00012.5', '1234567890123456', ' 5', 'x'));
    const text = fc.constantFrom('', 'calf', ' calf', 'calf ', 'a, b', 'say "hi"', 'time_s', 'foot_strike', 'toe_off', 'heel_off', 'left', 'right', 'größe', '\t');
    const rows = ownColumnRows(number, text, 3);
    const headers = ownHeaders('time_s,muscle,fascicle_mm');
    fc.assert(
      fc.property(headers, fc.array(fc.oneof(rows, fc.string({ maxLength: 20 })), { minLength: 1, maxLength: 6 }), fc.string({ maxLength: 4 }), (header, rs, before) => {
        const plan = planOf([header], null);
        const fromText = createTableReader(plan);
        const fromBytes = createTableReader(plan);
        rs.forEach((r, i) => {
          const head = Buffer.from(before);
          const bytes = Buffer.concat([head, Buffer.from(r), Buffer.from(',x')]);
          const a: Frame[] = [];
          const b: Frame[] = [];
          fromBytes.bytes(bytes, head.length, head.length + Buffer.byteLength(r), i + 2, b);
          fromText.text(r, i + 2, a);
          expect(b).toEqual(a);
        });
      }),
      { numRuns: 3000 },
    );
  });

  it('gives the rows of one muscle, from text or bytes, one shared name string', () => {
    const reader = createTableReader(planOf([HEADER], null));
    const out: Frame[] = [];
    reader.text('0,soleus muscle long name,50,,,,', 2, out);
    reader.bytes(Buffer.from('0.01,soleus muscle long name,50.1,,,,'), 0, 37, 3, out);
    const [a, b] = out as Sample[];
    expect(b).toMatchObject({ kind: 'sample', tS: 0.01, fascicleMm: 50.1 });
    expect(Object.is(a?.muscle, b?.muscle)).toBe(true);
  });
});

describe('a long table through a mapping', () => {
  const LONG = mapping({
    fields: { t: 'Time (ms)', muscle: 'site', fascicle: 'len (cm)', event: 'gait', side: 'foot' },
    units: { length: 'cm', time: 'ms' },
    values: { event: { HS: 'foot_strike', TO: 'toe_off' }, side: { L: 'left', R: 'right' }, muscle: { ch1: 'calf' } },
  });

  it("turns the file's words and units into ours", () => {
    const plan = planOf(['Time (ms)\tsite\tlen (cm)\tgait\tfoot', '1000\tch1\t5,2\t\t'], LONG);
    expect(plan).toMatchObject({ delimiter: '\t', decimal: ',' });
    expect(read(plan, ['1000\tch1\t5,2\t\t', '1010\t\t\tHS\tL', '1020\t\t\tFF\tL'])).toMatchObject([
      { kind: 'sample', muscle: 'calf', tS: 1, fascicleMm: 52 },
      { kind: 'event', event: 'foot_strike', side: 'left', tS: 1.01 },
      { kind: 'rejection', reason: 'unknown_event', field: 'gait' },
    ]);
  });

  it('gives the same frames the quick way as csv-parse and the careful reading give, for each delimiter', () => {
    for (const delimiter of [',', ';', '\t', '|']) {
      const m = mapping({ table: { delimiter, decimal: delimiter === ',' ? '.' : ',' }, fields: { t: 'T', muscle: 'M', fascicle: 'F', event: 'E', side: 'S' } });
      const plan = planOf([row(['T', 'M', 'F', 'E', 'S'], delimiter)], m);
      const cell = fc.constantFrom('', '1', '0,5', '0.5', 'calf', ' calf ', 'foot_strike', 'left', 'x"y', `a${delimiter}b`, '-2', '1e3');
      fc.assert(
        fc.property(fc.array(fc.array(cell, { minLength: 1, maxLength: 6 }), { minLength: 1, maxLength: 4 }), (rows) => {
          const texts = rows.map((r) => row(r, delimiter));
          expect(read(plan, texts, true)).toEqual(read(plan, texts, false));
        }),
        { numRuns: 500 },
      );
    }
  });
});

describe('activation columns (an optional 0–1 value per sample, e.g. a normalised EMG envelope)', () => {
  it('reads our own activation column, and leaves activation unknown (NaN) where the cell is empty', () => {
    const plan = planOf(['time_s,muscle,fascicle_mm,activation'], null);
    for (const quick of [true, false]) {
      const [a, b] = read(plan, ['0.01,calf,52.3,0.25', '0.02,calf,52.4,'], quick) as Sample[];
      expect(a?.activation).toBe(0.25);
      expect(b?.activation).toBeNaN();
    }
  });

  it('reads each muscle’s activation column of a wide table, with decimal commas', () => {
    const m = mapping({
      table: { delimiter: ';', decimal: ',' },
      muscles: { calf: { fascicle: 'calf (mm)', activation: 'calf EMG' }, thigh: { fascicle: 'thigh (mm)' } },
    });
    const plan = planOf(['time_s;calf (mm);calf EMG;thigh (mm)'], m);
    const [calf, thigh] = read(plan, [row(['0,01', '52,3', '0,4', '80,1'], ';')]) as Sample[];
    expect(calf?.activation).toBeCloseTo(0.4, 12);
    expect(thigh?.activation).toBeNaN();
  });

  it('rejects an activation outside 0–1 as out_of_range, naming its column', () => {
    const plan = planOf(['time_s,muscle,fascicle_mm,activation'], null);
    const [r] = read(plan, ['0.01,calf,52.3,1.5']);
    expect(r).toMatchObject({ kind: 'rejection', reason: 'out_of_range', field: 'activation' });
  });

  it('maps a device column to activation in a table with a row per sample', () => {
    const m = mapping({ fields: { t: 'time', muscle: 'site', fascicle: 'len', activation: 'env' } });
    const plan = planOf(['time,site,len,env'], m);
    const [s] = read(plan, ['0.5,calf,51,0.7']) as Sample[];
    expect(s?.activation).toBeCloseTo(0.7, 12);
  });
});
