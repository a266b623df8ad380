import { mkdtemp, readFile, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { stringify } from 'csv-stringify/sync';
import { beforeAll, describe, expect, it } from 'vitest';
import { labTables, type LabTables } from '../helpers/lab-tables.ts';
import { runLengthwise } from '../helpers/command-child.ts';

const REPLAYS = join(import.meta.dirname, '..', '..', 'replays');
const DEMO = join(REPLAYS, 'demo-walk.ndjson');
const DEMO_CSV = join(REPLAYS, 'demo-walk.csv');
const DEMO_CAL = join(REPLAYS, 'demo-calibration.json');

interface Strides {
  readonly side: string;
  readonly starts: number[];
}

/** Each muscle's side and stride start times, from a replay's summary. */
async function strides(args: readonly string[], dir: string, name: string): Promise<Record<string, Strides>> {
  const summaryPath = join(dir, `${name}.json`);
  const ran = await runLengthwise(['replay', ...args, '--speed', 'max', '--plain', '--summary', summaryPath]);
  expect(ran.stderr).not.toMatch(/\n\s+at /);
  expect(ran.code).toBe(0);
  const summary = JSON.parse(await readFile(summaryPath, 'utf8')) as { muscles: Record<string, { side: string; strides: { start_s: number }[] }> };
  return Object.fromEntries(Object.entries(summary.muscles).map(([m, s]) => [m, { side: s.side, starts: s.strides.map((x) => x.start_s) }]));
}

function expectSameStrides(got: Record<string, Strides>, want: Record<string, Strides>): void {
  expect(Object.keys(got).sort()).toEqual(Object.keys(want).sort());
  for (const [m, w] of Object.entries(want)) {
    const g = got[m] as Strides;
    expect(g.side, m).toBe(w.side);
    expect(g.starts.length, m).toBe(w.starts.length);
    g.starts.forEach((s, i) => expect(s).toBeCloseTo(w.starts[i] as number, 9));
  }
}

let dir = '';
let tables: LabTables;
let ndjson: Record<string, Strides>;
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lengthwise-own-data-'));
  tables = await labTables(DEMO, dir);
  ndjson = await strides([DEMO], dir, 'ndjson');
}, 60_000);

describe('a trial in your own files', () => {
  it('cuts the demo CSV into the NDJSON trial\'s strides once --side puts thigh on the right', async () => {
    const guessed = await strides([DEMO_CSV, '--calibration', DEMO_CAL], dir, 'csv-guessed');
    expect(guessed['thigh']?.side).toBe('left');
    expectSameStrides(await strides([DEMO_CSV, '--calibration', DEMO_CAL, '--side', 'thigh=right', '--side', 'calf=left'], dir, 'csv-side'), ndjson);
  });

  it('reads a long table in a lab\'s columns and units (";", decimal commas, notes, CRLF, BOM) with sides from the mapping, giving the NDJSON trial\'s strides', async () => {
    expectSameStrides(await strides([tables.long, '--mapping', tables.longMapping, '--calibration', DEMO_CAL], dir, 'long'), ndjson);
  });

  it('reads a wide table (a column per muscle) with its gait events from a file of their own on another clock, giving the NDJSON trial\'s strides', async () => {
    expectSameStrides(await strides([tables.wide, '--mapping', tables.wideMapping, '--events', tables.events, '--calibration', DEMO_CAL], dir, 'wide'), ndjson);
  });

  it('summarizes a table with its events file and mapping as replay does', async () => {
    const out = join(dir, 'study.csv');
    const ran = await runLengthwise(['summarize', tables.wide, '--mapping', tables.wideMapping, '--events', tables.events, '--calibration', DEMO_CAL, '--out', out, '--plain', '--jobs', '1']);
    expect(ran.code).toBe(0);
    const [header, ...rows] = (await readFile(out, 'utf8')).trim().split(/\r?\n/).map((r) => r.split(','));
    const column = (name: string): number => (header ?? []).indexOf(name);
    expect(rows.map((r) => [r[column('muscle')], r[column('side')], r[column('side_assumed')], Number(r[column('stride_count')])])).toEqual([
      ['calf', 'left', 'false', ndjson['calf']?.starts.length],
      ['thigh', 'right', 'false', ndjson['thigh']?.starts.length],
    ]);
  });

  it('calibrates from a table through its mapping', async () => {
    const ran = await runLengthwise(['calibrate', tables.long, '--mapping', tables.longMapping, '--muscle', 'calf', '--window', '1-4', '--sarcomere-length', '2.7']);
    expect(ran.code).toBe(0);
    expect(JSON.parse(ran.stdout)).toMatchObject({ muscles: { calf: { method: 'sarcomere_count' } } });
  });
});

describe('failures nobody may miss', () => {
  it('exits 1 on a trial with no usable sample, naming the commonest reasons and the first bad lines with their field', async () => {
    const path = join(dir, 'no-samples.csv');
    await writeFile(path, stringify([['time_s', 'muscle', 'fascicle_mm'], ['0', 'calf', '-3'], ['0.01', 'calf', 'lost'], ['0.02', 'calf', '0']]));
    const summaryPath = join(dir, 'no-samples.json');
    const ran = await runLengthwise(['replay', path, '--speed', 'max', '--plain', '--summary', summaryPath]);
    expect(ran.code).toBe(1);
    expect(ran.stderr).toContain(`lengthwise replay: ${path} has no valid sample in 4 lines (rejected: 2 out_of_range`);
    expect(ran.stderr).toContain('line 2 (fascicle_mm): fascicle_mm is -3');
    expect(ran.stderr).toContain('line 3 (fascicle_mm): fascicle_mm is "lost", not a decimal number');
    await expect(readFile(summaryPath)).rejects.toThrow();
  });

  it('exits 1 on an events file with no usable gait event, naming why', async () => {
    const path = join(dir, 'no-events.tsv');
    await writeFile(path, stringify([['time', 'kind', 'foot'], ['1.5', 'JUMP', 'L']], { delimiter: '\t' }));
    const ran = await runLengthwise(['replay', tables.wide, '--mapping', tables.wideMapping, '--events', path, '--speed', 'max', '--plain']);
    expect(ran.code).toBe(1);
    expect(ran.stderr).toContain('the events file has no usable gait event in 2 lines (rejected: 1 unknown_event');
    expect(ran.stderr).toContain('line 2 (kind)');
  });

  it('refuses a misspelled mapping key with its path and the nearest known key', async () => {
    const path = join(dir, 'typo.json');
    await writeFile(path, JSON.stringify({ format: 'lengthwise-mapping', version: 1, muscles: { calf: { side: 'left', fasicle: 'LG' } } }));
    const ran = await runLengthwise(['replay', DEMO, '--mapping', path, '--speed', 'max', '--plain']);
    expect(ran.code).toBe(2);
    expect(ran.stderr).toContain('`muscles.calf.fasicle`: unknown key; did you mean `muscles.calf.fascicle`?');
  });

  it('refuses a table whose columns are not the mapping\'s, naming the columns the file has', async () => {
    const ran = await runLengthwise(['replay', DEMO_CSV, '--mapping', tables.wideMapping, '--speed', 'max', '--plain']);
    expect(ran.code).toBe(1);
    expect(ran.stderr).toMatch(/lacks columns "calf fascicle \(mm\)" \(muscles\.calf\.fascicle\).*; it has "time_s", "muscle", "fascicle_mm"/);
  });

  it('warns when --side names a muscle the trial lacks, with both lists', async () => {
    const ran = await runLengthwise(['replay', DEMO, '--side', 'claf=left', '--speed', 'max', '--plain']);
    expect(ran.code).toBe(0);
    expect(ran.stderr).toContain('names "claf", which the trial lacks; the trial has "calf", "thigh"');
  });
});
