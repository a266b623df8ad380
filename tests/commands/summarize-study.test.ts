/**
 * `summarize --study`: a generated study (invented subjects and conditions, from src/sim/demo-study.ts)
 * run as a user runs it. The group and comparison tables are checked by recomputing them from trials.csv
 * with jStat (jstat on npm, used only in tests) for the t distribution, not with the tool's statistics.
 */
import { mkdtemp, readdir, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import jstat from 'jstat';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runLengthwise, type Ran } from '../helpers/command-child.ts';
import { csvRecords, parseCsv } from '../study/generated-trials.ts';
import { studyTrials, writeStudy, WALKING_CONDITIONS, type StudySpec } from '../../src/sim/demo-study.ts';
import type { StudyProvenanceJson } from '../../src/output/run-provenance.ts';

const { jStat } = jstat;
const REPLAYS = join(import.meta.dirname, '..', '..', 'replays');

const SPEC: StudySpec = {
  seed: 77,
  subjects: 4,
  conditions: WALKING_CONDITIONS,
  trialsPerCondition: 2,
  durationS: 12,
  rateHz: 50,
  format: 'ndjson',
  excluded: [{ subject: 'SYN-202', trial: 'fast-2', note: 'strap, "loose"' }],
};

let dir = '';
let out = '';
let ran: Ran;
const tables: Record<string, Record<string, string>[]> = {};
const texts: Record<string, string> = {};

function outputs(folder: string): string[] {
  return ['trials.csv', 'groups.csv', 'comparisons.csv', 'cycles.csv'].flatMap((t) => ['--' + (t === 'trials.csv' ? 'out' : t.replace('.csv', '')), join(folder, t)]);
}

beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lengthwise-study-'));
  const results = await writeStudy(join(dir, 'study'), SPEC);
  for (const r of results) if (!r.ok) throw new Error(r.problem);
  out = join(dir, 'out');
  ran = await runLengthwise(['summarize', '--study', join(dir, 'study', 'study.csv'), ...outputs(out), '--jobs', '2', '--plain']);
  for (const t of ['trials', 'groups', 'comparisons', 'cycles']) {
    texts[t] = await readFile(join(out, `${t}.csv`), 'utf8');
    tables[t] = csvRecords(texts[t]);
  }
}, 120_000);
afterAll(() => rm(dir, { recursive: true, force: true }));

const num = (x: string | undefined): number => Number(x);

/** Each subject's value of a figure in a condition, from trials.csv: the mean of its included trials. */
function subjectValues(condition: string, muscle: string, figure: string): Map<string, number> {
  const sums = new Map<string, number[]>();
  for (const r of tables.trials ?? []) {
    if (r.condition !== condition || r.muscle !== muscle || r.exclude === 'true' || r[figure] === '') continue;
    const list = sums.get(r.subject as string) ?? [];
    list.push(num(r[figure]));
    sums.set(r.subject as string, list);
  }
  return new Map([...sums].map(([s, v]) => [s, v.reduce((a, b) => a + b, 0) / v.length]));
}

describe('lengthwise summarize --study', () => {
  it('runs every trial of the manifest and writes the four tables, each with its provenance beside it', async () => {
    expect(ran.code, ran.stderr).toBe(0);
    expect(ran.stderr).toContain('summarized 16 of 16 trials');
    expect((await readdir(out)).sort()).toEqual(
      ['comparisons', 'cycles', 'groups', 'trials'].flatMap((t) => [`${t}.csv`, `${t}.csv.provenance.json`]),
    );
  });

  it('starts each trials.csv row with the manifest: subject, condition, trial, its covariates, exclusion and note', () => {
    const [header] = parseCsv(texts.trials as string);
    expect(header?.slice(0, 9)).toEqual(['subject', 'condition', 'trial', 'speed_m_s', 'age', 'exclude', 'note', 'source_file', 'muscle']);
    const rows = tables.trials ?? [];
    expect(rows).toHaveLength(16 * 2);
    const excluded = rows.filter((r) => r.exclude === 'true');
    expect(excluded.map((r) => [r.subject, r.trial, r.note])).toEqual([
      ['SYN-202', 'fast-2', 'strap, "loose"'],
      ['SYN-202', 'fast-2', 'strap, "loose"'],
    ]);
    const first = studyTrials(SPEC)[0];
    expect(rows[0]).toMatchObject({ subject: 'SYN-201', condition: 'slow', trial: 'slow-1', speed_m_s: '0.9', age: String(first?.age), calibration_source: 'file' });
    for (const r of rows) expect(['true', 'false']).toContain(r.uncalibrated);
  });

  it('gives trials.csv each stride figure\'s SD and CV across strides, in its unit', () => {
    const row = (tables.trials ?? [])[0] as Record<string, string>;
    for (const column of ['sl_min_stride_sd_um', 'sl_max_stride_sd_um', 'sl_mean_stride_sd_um', 'excursion_stride_sd_um', 'plateau_fraction_stride_sd', 'plateau_fraction_stride_cv', 'sl_mean_stride_cv']) {
      expect(row[column], column).not.toBe('');
    }
    expect(num(row.sl_mean_stride_cv)).toBeCloseTo(num(row.sl_mean_stride_sd_um) / num(row.sl_mean_um), 3);
  });

  it('averages each condition over subjects, a subject\'s trials first, with the t interval (jStat)', () => {
    const groups = tables.groups ?? [];
    expect(Object.keys(groups[0] ?? {})).toEqual(['condition', 'muscle', 'figure', 'n_subjects', 'mean', 'sd', 'ci95_low', 'ci95_high']);
    for (const [condition, muscle, figure] of [['slow', 'calf', 'sl_mean_um'], ['fast', 'thigh', 'plateau_fraction'], ['fast', 'calf', 'sl_max_stride_sd_um']] as const) {
      const values = [...subjectValues(condition, muscle, figure).values()];
      const row = groups.find((g) => g.condition === condition && g.muscle === muscle && g.figure === figure);
      const n = values.length;
      const mean = values.reduce((a, b) => a + b, 0) / n;
      const sd = Math.sqrt(values.reduce((a, v) => a + (v - mean) ** 2, 0) / (n - 1));
      const half = jStat.studentt.inv(0.975, n - 1) * (sd / Math.sqrt(n));
      expect(num(row?.n_subjects)).toBe(4);
      const tolerance = figure.endsWith('_um') ? 2e-4 : 2e-6;
      expect(Math.abs(num(row?.mean) - mean)).toBeLessThan(tolerance);
      expect(Math.abs(num(row?.sd) - sd)).toBeLessThan(tolerance);
      expect(Math.abs(num(row?.ci95_low) - (mean - half))).toBeLessThan(tolerance);
      expect(Math.abs(num(row?.ci95_high) - (mean + half))).toBeLessThan(tolerance);
    }
    // One row per condition × muscle × figure, every figure a numeric column of trials.csv.
    const figures = new Set(groups.map((g) => g.figure));
    expect(groups).toHaveLength(2 * 2 * figures.size);
    expect(figures.has('sl_mean_um')).toBe(true);
    expect(figures.has('subject') || figures.has('uncalibrated') || figures.has('speed_m_s')).toBe(false);
  });

  it('leaves an excluded trial out: the subject\'s value is the mean of its other trials', () => {
    const fast = (tables.trials ?? []).filter((r) => r.subject === 'SYN-202' && r.condition === 'fast' && r.muscle === 'calf');
    const kept = fast.find((r) => r.exclude === 'false');
    expect(subjectValues('fast', 'calf', 'sl_mean_um').get('SYN-202')).toBe(num(kept?.sl_mean_um));
  });

  it('compares the conditions within subjects with a paired t-test (jStat), b − a', () => {
    const comparisons = tables.comparisons ?? [];
    expect(Object.keys(comparisons[0] ?? {})).toEqual(['muscle', 'figure', 'condition_a', 'condition_b', 'n_pairs', 'mean_diff', 'ci95_low', 'ci95_high', 't', 'p', 'dz']);
    for (const [muscle, figure] of [['calf', 'sl_mean_um'], ['thigh', 'sl_max_um'], ['calf', 'duration_s']] as const) {
      const a = subjectValues('slow', muscle, figure);
      const b = subjectValues('fast', muscle, figure);
      const d = [...a.keys()].map((s) => (b.get(s) as number) - (a.get(s) as number));
      const n = d.length;
      const mean = d.reduce((x, y) => x + y, 0) / n;
      const sd = Math.sqrt(d.reduce((x, v) => x + (v - mean) ** 2, 0) / (n - 1));
      const t = mean / (sd / Math.sqrt(n));
      const p = 2 * (1 - jStat.studentt.cdf(Math.abs(t), n - 1));
      const row = comparisons.find((c) => c.muscle === muscle && c.figure === figure);
      expect(row).toMatchObject({ condition_a: 'slow', condition_b: 'fast', n_pairs: '4' });
      expect(num(row?.mean_diff)).toBeCloseTo(mean, 3);
      expect(num(row?.t)).toBeCloseTo(t, 1);
      expect(Math.abs(num(row?.p) - p)).toBeLessThan(0.01 * p + 1e-6);
      expect(num(row?.dz)).toBeCloseTo(mean / sd, 1);
    }
    // The faster walking works at longer lengths in every subject of the generated study.
    const calf = comparisons.find((c) => c.muscle === 'calf' && c.figure === 'sl_mean_um');
    expect(num(calf?.mean_diff)).toBeGreaterThan(0);
    expect(num(calf?.p)).toBeLessThan(0.05);
  });

  it('writes each trial\'s gait-cycle curve, then each condition\'s mean and SD across subjects', () => {
    const cycles = tables.cycles ?? [];
    expect(Object.keys(cycles[0] ?? {})).toEqual(['subject', 'condition', 'trial', 'muscle', 'percent', 'sl_um']);
    const trialRows = cycles.filter((c) => c.subject !== 'mean' && c.subject !== 'sd');
    expect(trialRows).toHaveLength(15 * 2 * 101);
    const mean = cycles.filter((c) => c.subject === 'mean' && c.condition === 'slow' && c.muscle === 'calf');
    expect(mean.map((c) => c.percent)).toEqual(Array.from({ length: 101 }, (_, i) => String(i)));
    expect(mean.every((c) => c.trial === '')).toBe(true);
    // At 40 % of the cycle: the mean of the subjects' means of their trials.
    const at = trialRows.filter((c) => c.condition === 'slow' && c.muscle === 'calf' && c.percent === '40');
    const bySubject = new Map<string, number[]>();
    for (const c of at) bySubject.set(c.subject as string, [...(bySubject.get(c.subject as string) ?? []), num(c.sl_um)]);
    const subjectMeans = [...bySubject.values()].map((v) => v.reduce((a, b) => a + b, 0) / v.length);
    expect(num(mean[40]?.sl_um)).toBeCloseTo(subjectMeans.reduce((a, b) => a + b, 0) / subjectMeans.length, 3);
  });

  it('carries the study\'s provenance beside every table: settings, every input with its SHA-256, each trial × muscle\'s calibration, how the tables were made', async () => {
    const sidecars = await Promise.all(['trials', 'groups', 'comparisons', 'cycles'].map((t) => readFile(join(out, `${t}.csv.provenance.json`), 'utf8')));
    expect(new Set(sidecars).size).toBe(1);
    const p = JSON.parse(sidecars[0] as string) as StudyProvenanceJson;
    expect(p.tool).toBe('lengthwise');
    expect(p.settings.format).toBe('lengthwise-settings');
    expect(p.inputs[0]).toMatchObject({ kind: 'manifest', path: join(dir, 'study', 'study.csv') });
    expect(p.inputs.filter((i) => i.kind === 'trial')).toHaveLength(16);
    expect(p.inputs.filter((i) => i.kind === 'calibration')).toHaveLength(4);
    for (const i of p.inputs) expect(i.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(p.calibration).toHaveLength(32);
    expect(p.calibration[0]).toMatchObject({ subject: 'SYN-201', condition: 'slow', trial: 'slow-1', muscle: 'calf', source: 'file', file: join(dir, 'study', 'calibrations', 'SYN-201.json') });
    expect(p.study).toMatchObject({ subjects: ['SYN-201', 'SYN-202', 'SYN-203', 'SYN-204'], conditions: ['slow', 'fast'], trials: 16, trials_summarized: 16, trials_excluded: 1, trials_failed: [] });
    expect(p.study.statistics.unit).toBe('subject');
  });

  it('writes the same bytes again for the same inputs and settings, but for created_utc', async () => {
    const again = join(dir, 'again');
    const second = await runLengthwise(['summarize', '--study', join(dir, 'study', 'study.csv'), ...outputs(again), '--jobs', '1', '--plain']);
    expect(second.code).toBe(0);
    const made = /"created_utc": "[^"]*"/;
    for (const name of await readdir(out)) {
      const [a, b] = await Promise.all([readFile(join(out, name), 'utf8'), readFile(join(again, name), 'utf8')]);
      expect(b.replace(made, ''), name).toBe(a.replace(made, ''));
    }
  }, 120_000);
});

describe('the study report of summarize --study', () => {
  it('is drawn from the study\'s tables and provenance: methods with the settings in effect, the inputs\' SHA-256, the trials\' markers', async () => {
    const settings = join(dir, 'settings.json');
    await writeFile(settings, JSON.stringify({ format: 'lengthwise-settings', version: 1, plausible_sarcomere_max_um: 4.5, gap_s: 0.3 }));
    const page = join(dir, 'report-out', 'report.html');
    const result = await runLengthwise(['summarize', '--study', join(dir, 'study', 'study.csv'), '--out', join(dir, 'report-out', 'trials.csv'), '--report', page, '--settings', settings, '--plain']);
    expect(result.code, result.stderr).toBe(0);
    const html = await readFile(page, 'utf8');
    const text = html.replace(/<[^>]+>/g, ' ').replace(/\s+/g, ' ');
    expect(text).toContain('Estimates outside 1–4.5 µm would have been reported as implausible');
    expect(text).toContain('longer than 0.3 s');
    expect(text).toContain('stride period 0.4–3 s');
    const p = JSON.parse(await readFile(join(dir, 'report-out', 'trials.csv.provenance.json'), 'utf8')) as StudyProvenanceJson;
    expect(html).toContain(p.inputs[0]?.sha256 as string);
    expect(text).toContain('belt 1.5 m/s');
  }, 120_000);
});

describe('a manifest with problems', () => {
  it('is refused whole, every problem with its row and column, before any trial runs', async () => {
    const bad = join(dir, 'study', 'bad.csv');
    await writeFile(
      bad,
      'subject,condition,trial,file,exclude\r\nSYN-201,slow,a,trials/SYN-201-slow-1.ndjson,maybe\r\nSYN-201,slow,b,trials/none.ndjson,\r\nSYN-201,slow,a,trials/SYN-201-slow-2.ndjson,\r\n',
    );
    const folder = join(dir, 'bad-out');
    const refused = await runLengthwise(['summarize', '--study', bad, '--out', join(folder, 'trials.csv'), '--plain']);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toContain(`the manifest ${bad} was not accepted; nothing was run:`);
    expect(refused.stderr).toContain(`${bad} row 2, column "exclude": "maybe" is not accepted; give true or false`);
    expect(refused.stderr).toContain(`${bad} row 3, column "file": trials/none.ndjson: no such file`);
    expect(refused.stderr).toContain(`${bad} row 4, column "trial": subject "SYN-201", condition "slow", trial "a" is given in row 2 already`);
    expect(refused.stderr).not.toContain('summarized');
    await expect(readdir(folder)).rejects.toThrow();
  });

  it('says the study tables need a manifest, and that a manifest and trial files do not go together', async () => {
    const demo = join(REPLAYS, 'demo-walk.ndjson');
    const a = await runLengthwise(['summarize', demo, '--groups', join(dir, 'g.csv')]);
    expect(a.code).toBe(2);
    expect(a.stderr).toContain('--groups needs --study MANIFEST');
    const b = await runLengthwise(['summarize', demo, '--study', join(REPLAYS, 'study', 'study.csv')]);
    expect(b.code).toBe(2);
    expect(b.stderr).toContain('give either --study MANIFEST or trial files, not both');
  });

  it('goes on past a trial that cannot be read, leaving it out and exiting 1', async () => {
    const manifest = join(dir, 'study', 'one-broken.csv');
    await writeFile(join(dir, 'study', 'trials', 'broken.ndjson'), 'not a trial\n');
    await writeFile(manifest, 'subject,condition,file\r\nSYN-201,slow,trials/SYN-201-slow-1.ndjson\r\nSYN-202,slow,trials/broken.ndjson\r\n');
    const folder = join(dir, 'broken-out');
    const result = await runLengthwise(['summarize', '--study', manifest, '--out', join(folder, 'trials.csv'), '--groups', join(folder, 'groups.csv'), '--plain']);
    expect(result.code).toBe(1);
    expect(result.stderr).toContain('1 failed');
    const rows = csvRecords(await readFile(join(folder, 'trials.csv'), 'utf8'));
    expect(new Set(rows.map((r) => r.subject))).toEqual(new Set(['SYN-201']));
    const p = JSON.parse(await readFile(join(folder, 'groups.csv.provenance.json'), 'utf8')) as StudyProvenanceJson;
    expect(p.study.trials_failed).toEqual([expect.objectContaining({ row: 3, file: join(dir, 'study', 'trials', 'broken.ndjson') })]);
  });
});

describe('the bundled demo study', () => {
  it('runs as the README shows it, from a fresh clone', async () => {
    const folder = join(dir, 'demo-out');
    const result = await runLengthwise(['summarize', '--study', join(REPLAYS, 'study', 'study.csv'), '--out', join(folder, 'trials.csv'), '--groups', join(folder, 'groups.csv'), '--plain']);
    expect(result.code, result.stderr).toBe(0);
    expect(result.stderr).toContain('summarized 12 of 12 trials');
  });
});
