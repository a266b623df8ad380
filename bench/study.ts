/**
 * A study as users run it: `lengthwise summarize --study` over a generated study (invented subjects and
 * conditions, src/sim/demo-study.ts), with the group and comparison tables and without them, in
 * alternating pairs of fresh processes (`--jobs 2`). The statistics across subjects are a small part of
 * the work: the ratio of the two says how small (target: at most 1.2×). Before the pairs, one run of each
 * checks that both write the same trials.csv.
 */
import { readFile, rm } from 'node:fs/promises';
import { join } from 'node:path';
import { WALKING_CONDITIONS, writeStudy, type StudySpec } from '../src/sim/demo-study.ts';
import { BIN, runFresh } from './fresh-process.ts';
import { alternate, paired, type Paired } from './paired.ts';

/**
 * Each pair's summarizing with groups.csv and comparisons.csv as well (`with`) / with the trials table
 * only (`without`), by wall and by CPU time.
 */
export interface StudyBenchResult extends Paired<'with', 'without'> {
  readonly trials: number;
  readonly samplesPerTrial: number;
  readonly jobs: number;
  /** Rows of groups.csv and comparisons.csv. */
  readonly groupRows: number;
  readonly comparisonRows: number;
  readonly trialsAgree: boolean;
}

export interface StudyBenchOptions {
  /** Trials: subjects × 2 conditions × 3 trials. @default 60 */
  readonly trials?: number;
  /** Samples in each trial (two muscles at 100 Hz). @default 20 000 */
  readonly samplesPerTrial?: number;
  readonly pairs?: number;
  readonly jobs?: number;
}

export async function measureStudy(dir: string, options: StudyBenchOptions = {}): Promise<StudyBenchResult> {
  const trials = options.trials ?? 60;
  const samplesPerTrial = options.samplesPerTrial ?? 20_000;
  const pairs = options.pairs ?? 5;
  const jobs = options.jobs ?? 2;
  const perSubject = WALKING_CONDITIONS.length * 3;
  const spec: StudySpec = {
    seed: 4242,
    subjects: Math.max(1, Math.round(trials / perSubject)),
    conditions: WALKING_CONDITIONS,
    trialsPerCondition: 3,
    // Two muscles at 100 Hz: 200 samples a second.
    durationS: samplesPerTrial / 200,
    rateHz: 100,
    format: 'ndjson',
  };
  const studyDir = join(dir, 'study');
  for (const r of await writeStudy(studyDir, spec)) if (!r.ok) throw new Error(r.problem);
  const manifest = join(studyDir, 'study.csv');
  const out = (name: string): string => join(dir, name);
  const common = [BIN, 'summarize', '--study', manifest, '--jobs', String(jobs), '--plain'];
  const without = [...common, '--out', out('trials-a.csv')];
  const withTables = [...common, '--out', out('trials-b.csv'), '--groups', out('groups.csv'), '--comparisons', out('comparisons.csv')];

  await runFresh(without);
  await runFresh(withTables);
  const made = /"created_utc": "[^"]*"/;
  const [a, b] = await Promise.all([readFile(out('trials-a.csv'), 'utf8'), readFile(out('trials-b.csv'), 'utf8')]);
  const groupRows = (await readFile(out('groups.csv'), 'utf8')).trimEnd().split('\r\n').length - 1;
  const comparisonRows = (await readFile(out('comparisons.csv'), 'utf8')).trimEnd().split('\r\n').length - 1;

  // Which of the two goes first alternates, so neither always runs on the warmer page cache.
  const runs = await alternate(pairs, () => runFresh(without), () => runFresh(withTables), { swap: true });
  await rm(studyDir, { recursive: true, force: true });
  return {
    trials: spec.subjects * perSubject,
    samplesPerTrial,
    jobs,
    ...paired('with', runs.b, 'without', runs.a),
    groupRows,
    comparisonRows,
    trialsAgree: a.replace(made, '') === b.replace(made, ''),
  };
}
