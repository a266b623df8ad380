import { mkdtemp, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { stringify } from 'csv-stringify/sync';
import { beforeAll, describe, expect, it } from 'vitest';
import { labTables, type LabTables } from '../helpers/lab-tables.ts';
import { runLengthwise } from '../helpers/command-child.ts';
import { writeMappingFile } from '../helpers/mapping-file.ts';

const DEMO = join(import.meta.dirname, '..', '..', 'replays', 'demo-walk.ndjson');

let dir = '';
let tables: LabTables;
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lengthwise-inspect-'));
  tables = await labTables(DEMO, dir);
}, 30_000);

const close = (x: number): unknown => expect.closeTo(x, 9);

describe('lengthwise inspect', () => {
  it('says, as one JSON object, how a wide table under notes is read: layout, columns and conversions, sides, counts, spans and rejections', async () => {
    const path = join(dir, 'station.csv');
    const rows = [
      ['Time (ms)', 'LG fascicle (cm)', 'LG conf', 'VL fascicle (cm)'],
      ['0', '5,2', '0,9', '8,1'],
      ['10', '5,3', '0,9', '8,2'],
      ['20', 'lost', '0,9', '8,3'],
      ['30', '5,5', '1,5', ''],
    ];
    await writeFile(path, `Invented station export\r\nsubject invented-03\r\n${stringify(rows, { delimiter: ';', record_delimiter: '\r\n' })}`);
    const mapping = await writeMappingFile(join(dir, 'station.json'), {
      fields: { t: 'Time (ms)' },
      units: { length: 'cm', time: 'ms' },
      muscles: { lat_gastroc: { side: 'left', fascicle: 'LG fascicle (cm)', quality: 'LG conf' }, vastus_lat: { fascicle: 'VL fascicle (cm)' } },
    });
    const ran = await runLengthwise(['inspect', path, '--mapping', mapping, '--json']);
    expect(ran.code).toBe(0);
    expect(JSON.parse(ran.stdout)).toEqual({
      format: 'lengthwise-inspection',
      version: 1,
      file: path,
      readable: true,
      problem: null,
      layout: 'wide',
      table: { delimiter: ';', delimiter_from: 'found', decimal: ',', decimal_from: 'found', header_line: 3, columns: rows[0] },
      columns: [
        { field: 't', muscle: null, column: 'Time (ms)', conversion: 'ms → s: × 0.001' },
        { field: 'fascicle', muscle: 'lat_gastroc', column: 'LG fascicle (cm)', conversion: 'cm → mm: × 10' },
        { field: 'quality', muscle: 'lat_gastroc', column: 'LG conf', conversion: 'as is' },
        { field: 'fascicle', muscle: 'vastus_lat', column: 'VL fascicle (cm)', conversion: 'cm → mm: × 10' },
      ],
      muscles: {
        lat_gastroc: {
          side: 'left',
          side_source: 'mapping',
          samples: 2,
          first_s: 0,
          last_s: close(0.01),
          rate_hz: close(100),
          gaps: 0,
          longest_gap_s: close(0.01),
          fascicle_mm: { min: close(52), max: close(53), mean: close(52.5) },
          warnings: [],
        },
        vastus_lat: {
          side: null,
          side_source: null,
          samples: 3,
          first_s: 0,
          last_s: close(0.02),
          rate_hz: close(100),
          gaps: 0,
          longest_gap_s: close(0.01),
          fascicle_mm: { min: close(81), max: close(83), mean: close(82) },
          warnings: [expect.stringMatching(/^no side: /)],
        },
      },
      counts: { lines: 7, samples: 5, events: 0, markers: 0, headers: 1, rejected: 2, rejected_by_reason: { schema: 1, out_of_range: 1 } },
      first_rejections: [
        { line: 6, reason: 'schema', field: 'LG fascicle (cm)', message: expect.stringContaining('column "LG fascicle (cm)" (lat_gastroc fascicle) is "lost", not a decimal number') },
        { line: 7, reason: 'out_of_range', field: 'LG conf', message: expect.stringContaining('column "LG conf" (lat_gastroc quality) is 1,5') },
      ],
      events_file: null,
      suggested_mapping: null,
    });
  });

  it('reads the events file on the samples\' clock, and says the sides and where they come from', async () => {
    const ran = await runLengthwise(['inspect', tables.wide, '--mapping', tables.wideMapping, '--events', tables.events, '--side', 'calf=right', '--json']);
    expect(ran.code).toBe(0);
    const inspection = JSON.parse(ran.stdout);
    expect(inspection.muscles.calf).toMatchObject({ side: 'right', side_source: 'option' });
    expect(inspection.muscles.thigh).toMatchObject({ side: 'right', side_source: 'mapping' });
    // The first foot strike of the demo trial is at 0.341 s on the samples' clock (replays/demo-walk.ndjson).
    expect(inspection.events_file).toMatchObject({ readable: true, first_s: close(0.341), counts: { events: 218, rejected: 1, rejected_by_reason: { unknown_event: 1 } } });
  });

  it('guesses a side from the first foot strike, and says so', async () => {
    const ran = await runLengthwise(['inspect', join(import.meta.dirname, '..', '..', 'replays', 'demo-walk.csv')]);
    expect(ran.code).toBe(0);
    expect(ran.stdout).toContain('muscle thigh: left (guessed from the first foot strike)');
  });

  it('exits 1 for a table in columns not ours without a mapping, and suggests a mapping skeleton that reads it once its words are added', async () => {
    const ran = await runLengthwise(['inspect', tables.long, '--json']);
    expect(ran.code).toBe(1);
    const inspection = JSON.parse(ran.stdout);
    expect(inspection).toMatchObject({ readable: false, layout: null, problem: expect.stringContaining('no line among the first 64 names the columns') });
    const suggested = await runLengthwise(['inspect', tables.long, '--suggest-mapping']);
    expect(suggested.code).toBe(0);
    const skeleton = JSON.parse(suggested.stdout);
    expect(skeleton).toEqual({
      format: 'lengthwise-mapping',
      version: 1,
      device: 'EDIT: what made this file',
      table: { delimiter: ';', decimal: ',', skip_lines: 3 },
      fields: { t: 'Time (ms)', event: 'Gait', side: 'Foot', muscle: 'Site', fascicle: 'Fascicle (cm)', pennation: 'Pennation (rad)', quality: 'Conf' },
      units: { time: 'ms', length: 'cm', angle: 'rad' },
    });
    const mapping = join(dir, 'suggested.json');
    await writeFile(mapping, JSON.stringify({ ...skeleton, device: 'invented station', values: { event: { HS: 'foot_strike', TO: 'toe_off' }, side: { L: 'left', R: 'right' } } }));
    expect((await runLengthwise(['inspect', tables.long, '--mapping', mapping])).code).toBe(0);
  });

  it('exits 1 for a file with no usable sample, listing the first bad lines', async () => {
    const path = join(dir, 'broken.csv');
    await writeFile(path, stringify([['time_s', 'muscle', 'fascicle_mm'], ['0', 'calf', 'x'], ['soon', 'calf', '50']]));
    const ran = await runLengthwise(['inspect', path]);
    expect(ran.code).toBe(1);
    expect(ran.stdout).toContain('cannot be read');
    expect(ran.stdout).toContain('line 2 (fascicle_mm): schema: fascicle_mm is "x", not a decimal number');
    expect(ran.stdout).toContain('line 3 (time_s): schema: time_s is "soon", not a decimal number');
  });

  it('warns when fascicle lengths look like centimetres', async () => {
    const path = join(dir, 'cm.csv');
    await writeFile(path, stringify([['time_s', 'muscle', 'fascicle_mm'], ['0', 'calf', '5.2'], ['0.01', 'calf', '5.3']]));
    const ran = await runLengthwise(['inspect', path]);
    expect(ran.stdout).toContain('warning: fascicle lengths average 5.25 mm, which looks like centimetres');
  });
});
