import { mkdir, mkdtemp, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { stringify } from 'csv-stringify/sync';
import { beforeAll, describe, expect, it } from 'vitest';
import { manifestProblemText, readStudyManifest, type ManifestResult } from '../../adapters/study-manifest.ts';

let dir = '';
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lengthwise-manifest-'));
  await mkdir(join(dir, 'trials'));
  for (const name of ['a1.csv', 'a2.csv', 'b1.csv', 'b2.csv']) await writeFile(join(dir, 'trials', name), 'time_s,muscle,fascicle_mm\n');
  await writeFile(join(dir, 'cal-a.json'), JSON.stringify({ muscles: { calf: { method: 'sarcomere_count', sarcomeres_in_series: 17000 } } }));
  await writeFile(join(dir, 'cal-bad.json'), JSON.stringify({ muscles: { calf: { method: 'sarcomere_count', sarcomeres_in_seris: 17000 } } }));
  await writeFile(join(dir, 'map.json'), JSON.stringify({ format: 'lengthwise-mapping', version: 1, muscles: { calf: { side: 'left' } } }));
});

/** Writes a manifest (rows written by csv-stringify, not by the tool) and reads it. */
async function manifest(name: string, rows: readonly (readonly string[])[], options: { bom?: boolean; reserved?: string[] } = {}): Promise<ManifestResult> {
  const path = join(dir, name);
  await writeFile(path, `${options.bom === true ? '\ufeff' : ''}${stringify(rows as string[][])}`);
  return readStudyManifest(path, { reservedColumns: options.reserved ?? ['muscle', 'source_file'] });
}

function problems(result: ManifestResult): string[] {
  if (result.ok) throw new Error('accepted');
  return result.problems.map(manifestProblemText);
}

/** Writes a manifest and reads it, as `manifest` does; the problems it was refused for. */
async function manifestProblems(name: string, rows: readonly (readonly string[])[]): Promise<string[]> {
  return problems(await manifest(name, rows));
}

describe('a study manifest', () => {
  it('gives a row per trial: paths from the manifest\'s folder, trials numbered within subject and condition, covariates as written', async () => {
    const result = await manifest('good.csv', [
      ['subject', 'condition', 'file', 'calibration', 'mapping', 'side', 'exclude', 'note', 'speed_m_s', 'age'],
      ['S01', 'slow', 'trials/a1.csv', 'cal-a.json', 'map.json', 'calf=left;thigh=right', '', '', '0.8', '31'],
      ['S01', 'slow', 'trials/a2.csv', 'cal-a.json', '', '', 'TRUE', 'probe slipped, 0:42', '0.8', '31'],
      ['S01', 'fast', 'trials/b1.csv', '', '', '', 'false', '', '1.6', '31'],
    ], { bom: true });
    expect(result.ok).toBe(true);
    if (!result.ok) return;
    const m = result.manifest;
    expect(m.covariates).toEqual(['speed_m_s', 'age']);
    expect(m.rows.map((r) => [r.row, r.subject, r.condition, r.trial, r.exclude])).toEqual([
      [2, 'S01', 'slow', '1', false],
      [3, 'S01', 'slow', '2', true],
      [4, 'S01', 'fast', '1', false],
    ]);
    expect(m.rows[0]).toMatchObject({
      file: join(dir, 'trials', 'a1.csv'),
      calibrationPath: join(dir, 'cal-a.json'),
      mappingPath: join(dir, 'map.json'),
      eventsPath: null,
      sides: { calf: 'left', thigh: 'right' },
      covariates: { speed_m_s: '0.8', age: '31' },
    });
    expect(m.rows[1]?.note).toBe('probe slipped, 0:42');
    expect([...m.calibrations.keys()]).toEqual([join(dir, 'cal-a.json')]);
    expect([...m.mappings.keys()]).toEqual([join(dir, 'map.json')]);
  });

  it('names a required column that is missing, with the nearest header', async () => {
    expect(await manifestProblems('no-condition.csv', [['subject', 'conditon', 'file'], ['S01', 'slow', 'trials/a1.csv']])).toEqual([
      'row 1, column "condition": is missing from the header row; did you mean "conditon"? (required: subject, condition, file; optional: trial, calibration, events, mapping, side, exclude, note)',
    ]);
  });

  it('names each missing file with its row and column, before any trial runs', async () => {
    const found = await manifestProblems('missing.csv', [
      ['subject', 'condition', 'file', 'calibration', 'events'],
      ['S01', 'slow', 'trials/a1.csv', 'cal-none.json', ''],
      ['S02', 'slow', 'trials/zz.csv', '', 'ev.tsv'],
    ]);
    expect(found).toEqual([
      `row 2, column "calibration": cal-none.json: no such file (looked for ${join(dir, 'cal-none.json')}); paths are relative to the manifest's folder, ${dir}`,
      `row 3, column "file": trials/zz.csv: no such file (looked for ${join(dir, 'trials', 'zz.csv')}); paths are relative to the manifest's folder, ${dir}`,
      `row 3, column "events": ev.tsv: no such file (looked for ${join(dir, 'ev.tsv')}); paths are relative to the manifest's folder, ${dir}`,
    ]);
  });

  it('refuses a value a column does not accept: exclude, side, an empty required cell, a reserved subject', async () => {
    const found = await manifestProblems('values.csv', [
      ['subject', 'condition', 'file', 'side', 'exclude'],
      ['S01', 'slow', 'trials/a1.csv', 'calf=up', 'yes'],
      ['', 'slow', 'trials/a2.csv', '', ''],
      ['mean', 'fast', 'trials/b1.csv', 'calf=left;calf=right', ''],
    ]);
    expect(found).toEqual([
      'row 2, column "side": "calf=up" is not a side: give NAME=left or NAME=right, several separated by ";" (e.g. lat_gastroc=left;vastus_lat=right)',
      'row 2, column "exclude": "yes" is not accepted; give true or false (or leave it empty: false)',
      'row 3, column "subject": is empty; every trial needs its subject',
      'row 4, column "subject": "mean" is kept for the group rows of cycles.csv (mean, sd); give the subject another code',
      'row 4, column "side": names "calf" twice; give each muscle\'s side once',
    ]);
  });

  it('refuses the same subject, condition and trial twice, naming the first row', async () => {
    const found = await manifestProblems('twice.csv', [
      ['subject', 'condition', 'trial', 'file'],
      ['S01', 'slow', 't1', 'trials/a1.csv'],
      ['S01', 'slow', 't2', 'trials/a2.csv'],
      ['S01', 'slow', 't1', 'trials/b1.csv'],
    ]);
    expect(found).toEqual([
      'row 4, column "trial": subject "S01", condition "slow", trial "t1" is given in row 2 already; give each trial a name of its own in the "trial" column',
    ]);
  });

  it('refuses the same trial file in two rows', async () => {
    const found = await manifestProblems('same-file.csv', [['subject', 'condition', 'file'], ['S01', 'slow', 'trials/a1.csv'], ['S01', 'slow', './trials/a1.csv']]);
    expect(found).toEqual(['row 3, column "file": the trial file is given in row 2 already; each row is a trial of its own file']);
  });

  it('says what a calibration file named in a row lacks, as --calibration would', async () => {
    const found = await manifestProblems('bad-cal.csv', [['subject', 'condition', 'file', 'calibration'], ['S01', 'slow', 'trials/a1.csv', 'cal-bad.json']]);
    expect(found).toHaveLength(1);
    expect(found[0]).toMatch(/^row 2, column "calibration": cal-bad\.json was not accepted: .*`muscles\.calf\.sarcomeres_in_seris`: unknown key; did you mean `muscles\.calf\.sarcomeres_in_series`\?/);
  });

  it('refuses a covariate named like a column the tables write, a column named twice, and a row with more cells than the header', async () => {
    expect(await manifestProblems('reserved.csv', [['subject', 'condition', 'file', 'muscle'], ['S01', 'slow', 'trials/a1.csv', 'calf']])).toEqual([
      'row 1, column "muscle": is a column the study\'s tables write themselves; rename this covariate (e.g. with a prefix)',
    ]);
    expect(await manifestProblems('twice-col.csv', [['subject', 'condition', 'file', 'age', 'age'], ['S01', 'slow', 'trials/a1.csv', '1', '2']])).toEqual([
      'row 1, column "age": is given twice in the header row; give each column once',
    ]);
    expect(await manifestProblems('wide-row.csv', [['subject', 'condition', 'file'], ['S01', 'slow', 'trials/a1.csv', 'extra']])).toEqual([
      'row 2: has 4 cells and the header row 3; quote cells that hold commas',
    ]);
  });

  it('refuses a manifest with no trial, and one that is not there', async () => {
    expect(await manifestProblems('empty.csv', [['subject', 'condition', 'file']])).toEqual([`${join(dir, 'empty.csv')} has a header row but no trial; give a row per trial`]);
    expect(problems(await readStudyManifest(join(dir, 'none.csv')))).toEqual([`cannot read the manifest ${join(dir, 'none.csv')} (no such file); check the path`]);
  });
});
