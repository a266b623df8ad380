/**
 * A study's statistics across subjects, from its trials (summaries with their manifest rows): the rows of
 * groups.csv, comparisons.csv and cycles.csv (src/output/study-rows.ts). Subjects are the unit: a
 * subject's value in a condition is the plain mean of that subject's trials in it (excluded trials left
 * out), read from the numbers trials.csv writes; the group's mean, SD and 95 % interval are across
 * subjects (src/model/group-stats.ts). Conditions come in the manifest's order, muscles as first seen.
 */
import { groupFigures, meanOf, pairedTTest } from '../model/group-stats.ts';
import { decimalsFor, roundPValue, roundTo } from '../output/output-precision.ts';
import { CYCLE_GROUP_SUBJECTS, type ComparisonRow, type CycleRow, type GroupRow } from '../output/study-rows.ts';
import { cellValue, studyTableColumns, tableRows, type Column, type RowContext, type StudyTableOptions, type TableTrial } from './study-csv.ts';

/** The trials of a study that count: run, with a manifest row, not excluded. */
function included(trials: readonly TableTrial[]): TableTrial[] {
  return trials.filter((t) => t.manifest !== null && !t.manifest.exclude);
}

function inOrder<T>(values: Iterable<T>): T[] {
  return [...new Set(values)];
}

/** Rounds a figure's number as its unit says; null stays null. */
function rounded(x: number | null, decimals: number): number | null {
  return x === null ? null : roundTo(x, decimals);
}

function pValue(p: number | null): number | null {
  return p === null ? null : roundPValue(p);
}

/** The study's trials, grouped: condition → muscle → subject → its trials × muscle rows. */
interface Grouped {
  readonly conditions: readonly string[];
  readonly muscles: readonly string[];
  readonly cells: ReadonlyMap<string, ReadonlyMap<string, readonly RowContext[]>>;
  readonly figures: readonly Column[];
}

const cellKey = (condition: string, muscle: string): string => `${condition}\u0000${muscle}`;

function grouped(trials: readonly TableTrial[], conditionOrder: readonly string[], options: StudyTableOptions): Grouped {
  const used = included(trials);
  const rows = tableRows(used);
  // A figure no included trial has (the calibration uncertainty's, in a study without one) has no row.
  const figures = studyTableColumns(
    trials.map((t) => t.summary),
    options,
  ).filter((c) => c.figure && rows.some((row) => typeof cellValue(c, row) === 'number'));
  const cells = new Map<string, Map<string, RowContext[]>>();
  for (const row of rows) {
    const manifest = row.manifest;
    if (manifest === null) continue;
    const key = cellKey(manifest.condition, row.muscle);
    let bySubject = cells.get(key);
    if (bySubject === undefined) cells.set(key, (bySubject = new Map()));
    const list = bySubject.get(manifest.subject);
    if (list === undefined) bySubject.set(manifest.subject, [row]);
    else list.push(row);
  }
  return {
    conditions: inOrder([...conditionOrder, ...used.map((t) => (t.manifest as NonNullable<TableTrial['manifest']>).condition)]),
    muscles: inOrder(rows.map((r) => r.muscle)),
    cells,
    figures,
  };
}

/** Each subject's value of a figure in one condition × muscle: the mean of its trials' finite values. */
function subjectValues(bySubject: ReadonlyMap<string, readonly RowContext[]> | undefined, column: Column): Map<string, number> {
  const out = new Map<string, number>();
  if (bySubject === undefined) return out;
  for (const [subject, rows] of bySubject) {
    const values: number[] = [];
    for (const row of rows) {
      const v = cellValue(column, row);
      if (typeof v === 'number' && Number.isFinite(v)) values.push(v);
    }
    if (values.length > 0) out.set(subject, meanOf(values));
  }
  return out;
}

export interface StudyTables {
  readonly groups: GroupRow[];
  readonly comparisons: ComparisonRow[];
}

/**
 * groups.csv: a row per condition × muscle × figure (every figure some included trial has); comparisons.csv: per pair of conditions (in the
 * manifest's order, b after a), muscle and figure, a paired t-test over the subjects who have both.
 */
export function groupTables(trials: readonly TableTrial[], conditionOrder: readonly string[], options: StudyTableOptions = {}): StudyTables {
  const g = grouped(trials, conditionOrder, options);
  const groups: GroupRow[] = [];
  // Subject values per condition × muscle × figure, kept for the comparisons.
  const values = new Map<string, Map<string, number>>();
  for (const condition of g.conditions) {
    for (const muscle of g.muscles) {
      const bySubject = g.cells.get(cellKey(condition, muscle));
      for (const column of g.figures) {
        const perSubject = subjectValues(bySubject, column);
        values.set(`${cellKey(condition, muscle)}\u0000${column.name}`, perSubject);
        const f = groupFigures([...perSubject.values()]);
        const d = decimalsFor(column.name);
        groups.push({
          condition,
          muscle,
          figure: column.name,
          n_subjects: f.n,
          mean: rounded(f.mean, d),
          sd: rounded(f.sd, d),
          ci95_low: rounded(f.ci95Low, d),
          ci95_high: rounded(f.ci95High, d),
        });
      }
    }
  }
  const comparisons: ComparisonRow[] = [];
  const other = decimalsFor('');
  for (const muscle of g.muscles) {
    for (const column of g.figures) {
      const d = decimalsFor(column.name);
      for (let i = 0; i < g.conditions.length; i++) {
        for (let j = i + 1; j < g.conditions.length; j++) {
          const a = g.conditions[i] as string;
          const b = g.conditions[j] as string;
          const va = values.get(`${cellKey(a, muscle)}\u0000${column.name}`) ?? new Map<string, number>();
          const vb = values.get(`${cellKey(b, muscle)}\u0000${column.name}`) ?? new Map<string, number>();
          const xs: number[] = [];
          const ys: number[] = [];
          for (const [subject, x] of va) {
            const y = vb.get(subject);
            if (y === undefined) continue;
            xs.push(x);
            ys.push(y);
          }
          const test = pairedTTest(xs, ys);
          comparisons.push({
            muscle,
            figure: column.name,
            condition_a: a,
            condition_b: b,
            n_pairs: test.nPairs,
            mean_diff: rounded(test.meanDiff, d),
            ci95_low: rounded(test.ci95Low, d),
            ci95_high: rounded(test.ci95High, d),
            t: rounded(test.t, other),
            p: pValue(test.p),
            dz: rounded(test.dz, other),
          });
        }
      }
    }
  }
  return { groups, comparisons };
}

/** The pointwise mean of curves (each point over the curves finite there); null where none is. */
function meanCurve(curves: readonly (readonly (number | null)[])[], points: number): (number | null)[] {
  const out: (number | null)[] = [];
  for (let p = 0; p < points; p++) {
    const at: number[] = [];
    for (const c of curves) {
      const v = c[p];
      if (v !== null && v !== undefined && Number.isFinite(v)) at.push(v);
    }
    out.push(at.length > 0 ? meanOf(at) : null);
  }
  return out;
}

/**
 * cycles.csv: each included trial × muscle's gait-cycle curve (101 points), then per condition × muscle
 * the group mean and SD across subjects at each point (a subject's curve is the mean of its trials'),
 * as rows whose subject is "mean" or "sd" and whose trial is empty.
 */
export function cycleRows(trials: readonly TableTrial[], conditionOrder: readonly string[]): CycleRow[] {
  const d = decimalsFor('sl_um');
  const rows: CycleRow[] = [];
  /** condition → muscle → subject → curves */
  const curves = new Map<string, Map<string, Map<string, (number | null)[][]>>>();
  let points = 0;
  for (const row of tableRows(included(trials))) {
    const manifest = row.manifest as NonNullable<RowContext['manifest']>;
    const cycle = row.m.cycle;
    if (cycle === null) continue;
    points = Math.max(points, cycle.percent.length);
    cycle.percent.forEach((percent, i) => {
      const sl = cycle.sl_mean_um[i] ?? null;
      rows.push({ subject: manifest.subject, condition: manifest.condition, trial: manifest.trial, muscle: row.muscle, percent, sl_um: rounded(sl, d) });
    });
    let byMuscle = curves.get(manifest.condition);
    if (byMuscle === undefined) curves.set(manifest.condition, (byMuscle = new Map()));
    let bySubject = byMuscle.get(row.muscle);
    if (bySubject === undefined) byMuscle.set(row.muscle, (bySubject = new Map()));
    const list = bySubject.get(manifest.subject);
    if (list === undefined) bySubject.set(manifest.subject, [cycle.sl_mean_um]);
    else list.push(cycle.sl_mean_um);
  }
  const conditions = inOrder([...conditionOrder, ...curves.keys()]);
  for (const condition of conditions) {
    const byMuscle = curves.get(condition);
    if (byMuscle === undefined) continue;
    for (const [muscle, bySubject] of byMuscle) {
      const subjectCurves = [...bySubject.values()].map((c) => meanCurve(c, points));
      const mean: CycleRow[] = [];
      const sd: CycleRow[] = [];
      for (let p = 0; p < points; p++) {
        const at: number[] = [];
        for (const c of subjectCurves) {
          const v = c[p];
          if (v !== null && v !== undefined) at.push(v);
        }
        const f = groupFigures(at);
        mean.push({ subject: CYCLE_GROUP_SUBJECTS.mean, condition, trial: '', muscle, percent: p, sl_um: rounded(f.mean, d) });
        sd.push({ subject: CYCLE_GROUP_SUBJECTS.sd, condition, trial: '', muscle, percent: p, sl_um: rounded(f.sd, d) });
      }
      rows.push(...mean, ...sd);
    }
  }
  return rows;
}
