/**
 * The numbers behind the study report's figures, read from the study's table rows: pure functions (no
 * I/O, no plotting library), so what is drawn is testable on its own. Nothing is computed across subjects
 * here: means, SDs, intervals and tests are the tables' own.
 */
import type { ForceLengthCurve } from '../model/geometry.ts';
import { REGION_KEYS, REGION_LABEL, type RegionKey } from '../model/regions.ts';
import { CYCLE_GROUP_SUBJECTS, type ComparisonRow, type CycleRow, type GroupRow } from '../output/study-rows.ts';
import { curveOf } from './plot-data.ts';
import type { TrialRow } from './study-report-input.ts';

/** The figures of the operating range, as columns of trials.csv. */
export const RANGE_FIGURES = { min: 'sl_min_um', p5: 'sl_p5_um', mean: 'sl_mean_um', p95: 'sl_p95_um', max: 'sl_max_um' } as const;

/** The length figures whose paired differences are drawn (those the comparisons carry). */
export const LENGTH_DIFFERENCE_FIGURES = ['sl_p5_um', 'sl_mean_um', 'sl_p95_um', 'excursion_um'] as const;

/** A region's time-fraction column in the study's tables. */
export function regionFigure(region: RegionKey): string {
  return `${region}_fraction`;
}

const FIGURE_LABEL: Readonly<Record<string, string>> = {
  sl_min_um: 'shortest length',
  sl_p5_um: '5th percentile',
  sl_mean_um: 'mean length',
  sl_p95_um: '95th percentile',
  sl_max_um: 'longest length',
  excursion_um: 'excursion',
  force_mean: 'mean relative force',
  ...Object.fromEntries(REGION_KEYS.map((k) => [regionFigure(k), REGION_LABEL[k]])),
};

/** A figure's name in words for a plot or a table ("5th percentile", "plateau"); its column name otherwise. */
export function figureLabel(figure: string): string {
  return FIGURE_LABEL[figure] ?? figure;
}

function firstSeen(values: Iterable<string>): string[] {
  return [...new Set(values)];
}

/** The study's conditions in the order the tables first give them (groups, then cycles, then comparisons). */
export function conditionsOf(groups: readonly GroupRow[], cycles: readonly CycleRow[], comparisons: readonly ComparisonRow[]): string[] {
  return firstSeen([
    ...groups.map((g) => g.condition),
    ...cycles.map((c) => c.condition),
    ...comparisons.flatMap((c) => [c.condition_a, c.condition_b]),
  ]);
}

/** The study's muscles in the order the tables first give them. */
export function musclesOf(groups: readonly GroupRow[], cycles: readonly CycleRow[], comparisons: readonly ComparisonRow[]): string[] {
  return firstSeen([...groups.map((g) => g.muscle), ...cycles.map((c) => c.muscle), ...comparisons.map((c) => c.muscle)]);
}

/** groups.csv by condition, muscle and figure. */
export class GroupIndex {
  private readonly rows = new Map<string, GroupRow>();

  constructor(groups: readonly GroupRow[]) {
    for (const g of groups) this.rows.set(GroupIndex.key(g.condition, g.muscle, g.figure), g);
  }

  private static key(condition: string, muscle: string, figure: string): string {
    return JSON.stringify([condition, muscle, figure]);
  }

  get(condition: string, muscle: string, figure: string): GroupRow | undefined {
    return this.rows.get(GroupIndex.key(condition, muscle, figure));
  }

  /** The group mean, or null when the table has none. */
  mean(condition: string, muscle: string, figure: string): number | null {
    return finite(this.get(condition, muscle, figure)?.mean);
  }
}

function finite(x: number | null | undefined): number | null {
  return x !== null && x !== undefined && Number.isFinite(x) ? x : null;
}

/** A group mean with its 95 % interval across subjects (interval null with one subject). */
export interface Estimate {
  readonly mean: number;
  readonly low: number | null;
  readonly high: number | null;
}

function estimate(row: GroupRow | undefined): Estimate | null {
  const mean = finite(row?.mean);
  if (row === undefined || mean === null) return null;
  return { mean, low: finite(row.ci95_low), high: finite(row.ci95_high) };
}

/** One condition's operating range for a muscle: the group means of its figures, each with its interval. */
export interface RangeRow {
  readonly muscle: string;
  readonly condition: string;
  /** The condition's place in the study's order. */
  readonly order: number;
  readonly nSubjects: number;
  readonly min: Estimate | null;
  readonly p5: Estimate | null;
  readonly mean: Estimate | null;
  readonly p95: Estimate | null;
  readonly max: Estimate | null;
}

export function rangeRows(index: GroupIndex, muscle: string, conditions: readonly string[]): RangeRow[] {
  const rows: RangeRow[] = [];
  conditions.forEach((condition, order) => {
    const of = (figure: string) => estimate(index.get(condition, muscle, figure));
    const row: RangeRow = {
      muscle,
      condition,
      order,
      nSubjects: Math.max(0, ...Object.values(RANGE_FIGURES).map((f) => index.get(condition, muscle, f)?.n_subjects ?? 0)),
      min: of(RANGE_FIGURES.min),
      p5: of(RANGE_FIGURES.p5),
      mean: of(RANGE_FIGURES.mean),
      p95: of(RANGE_FIGURES.p95),
      max: of(RANGE_FIGURES.max),
    };
    if (row.min !== null || row.p5 !== null || row.mean !== null || row.p95 !== null || row.max !== null) rows.push(row);
  });
  return rows;
}

/** One region's share of a condition's stride time (group mean, %). */
export interface RegionShareRow {
  readonly condition: string;
  readonly order: number;
  readonly region: RegionKey;
  readonly percent: number;
}

/** Each condition's time in each region for a muscle (group means of the region fractions, in %). */
export function regionShareRows(index: GroupIndex, muscle: string, conditions: readonly string[]): RegionShareRow[] {
  const rows: RegionShareRow[] = [];
  conditions.forEach((condition, order) => {
    for (const region of REGION_KEYS) {
      const mean = index.mean(condition, muscle, regionFigure(region));
      if (mean !== null) rows.push({ condition, order, region, percent: 100 * mean });
    }
  });
  return rows;
}

/** A point of a condition's gait-cycle curve: group mean and mean ± SD across subjects. */
export interface CyclePoint {
  readonly condition: string;
  readonly order: number;
  readonly percent: number;
  readonly meanUm: number;
  /** Mean ± SD; null where the SD is not known (one subject). */
  readonly lowUm: number | null;
  readonly highUm: number | null;
}

/** The group curves of a muscle, one per condition (cycles.csv's "mean" and "sd" rows). */
export function cyclePoints(cycles: readonly CycleRow[], muscle: string, conditions: readonly string[]): CyclePoint[] {
  const sd = new Map<string, number>();
  for (const c of cycles) {
    const value = finite(c.sl_um);
    if (c.muscle === muscle && c.subject === CYCLE_GROUP_SUBJECTS.sd && value !== null) sd.set(JSON.stringify([c.condition, c.percent]), value);
  }
  const points: CyclePoint[] = [];
  for (const c of cycles) {
    const meanUm = finite(c.sl_um);
    const order = conditions.indexOf(c.condition);
    if (c.muscle !== muscle || c.subject !== CYCLE_GROUP_SUBJECTS.mean || meanUm === null || order < 0) continue;
    const spread = sd.get(JSON.stringify([c.condition, c.percent]));
    points.push({
      condition: c.condition,
      order,
      percent: c.percent,
      meanUm,
      lowUm: spread === undefined ? null : meanUm - spread,
      highUm: spread === undefined ? null : meanUm + spread,
    });
  }
  return points.sort((a, b) => a.order - b.order || a.percent - b.percent);
}

/** One paired difference (b − a) of a figure between two conditions, with its interval. */
export interface DifferenceRow {
  readonly figure: string;
  readonly figureOrder: number;
  /** "b − a" in the conditions' names. */
  readonly pair: string;
  readonly pairOrder: number;
  readonly nPairs: number;
  readonly diff: number;
  readonly low: number | null;
  readonly high: number | null;
  readonly p: number | null;
}

/** The label of a comparison: condition b minus condition a. */
export function pairLabel(c: Pick<ComparisonRow, 'condition_a' | 'condition_b'>): string {
  return `${c.condition_b} − ${c.condition_a}`;
}

/**
 * A muscle's paired differences for the given figures, in the figures' order, then the pairs' order of
 * first appearance; `scale` turns a difference into the plotted unit (100 for fractions in percentage points).
 */
export function differenceRows(comparisons: readonly ComparisonRow[], muscle: string, figures: readonly string[], pairs: readonly string[], scale = 1): DifferenceRow[] {
  const rows: DifferenceRow[] = [];
  for (const c of comparisons) {
    const diff = finite(c.mean_diff);
    const figureOrder = figures.indexOf(c.figure);
    const pair = pairLabel(c);
    if (c.muscle !== muscle || diff === null || figureOrder < 0) continue;
    const low = finite(c.ci95_low);
    const high = finite(c.ci95_high);
    rows.push({
      figure: c.figure,
      figureOrder,
      pair,
      pairOrder: pairs.indexOf(pair),
      nPairs: c.n_pairs,
      diff: diff * scale,
      low: low === null ? null : low * scale,
      high: high === null ? null : high * scale,
      p: finite(c.p),
    });
  }
  return rows.sort((a, b) => a.figureOrder - b.figureOrder || a.pairOrder - b.pairOrder);
}

/** The comparisons' pairs ("b − a") in the order they first appear. */
export function pairsOf(comparisons: readonly ComparisonRow[]): string[] {
  return firstSeen(comparisons.map(pairLabel));
}

/** The regions a muscle spent time in, in any condition (group means above zero), in the curve's order. */
export function regionsReached(index: GroupIndex, muscle: string, conditions: readonly string[]): RegionKey[] {
  return REGION_KEYS.filter((k) => conditions.some((c) => (index.mean(c, muscle, regionFigure(k)) ?? 0) > 0));
}

/** The text values of one column over a muscle's trial rows, each once, in the rows' order. */
export function trialValues(trials: readonly TrialRow[], muscle: string, column: string): string[] {
  return firstSeen(trials.filter((t) => t['muscle'] === muscle).flatMap((t) => (typeof t[column] === 'string' && t[column] !== '' ? [t[column]] : [])));
}

/**
 * The force–length curve whose regions are shaded behind a muscle's plots: its species' preset (trials.csv
 * carries the species, not the filament lengths), with the species named; null when the muscle's trials
 * name several species or none the report knows.
 */
export function muscleCurve(trials: readonly TrialRow[], muscle: string): { readonly curve: ForceLengthCurve; readonly species: string } | null {
  const species = trialValues(trials, muscle, 'species');
  const only = species.length === 1 ? (species[0] as string) : species.length === 0 ? 'human' : null;
  if (only === null) return null;
  const { curve, note } = curveOf({ species: only });
  return note === null ? { curve, species: only } : null;
}

/** Whether any of a muscle's trials had its strides estimated from the fascicle signal (not from foot strikes). */
export function anyStridesEstimated(trials: readonly TrialRow[], muscle: string): boolean {
  return trials.some((t) => t['muscle'] === muscle && isTrue(t['segmentation_estimated']));
}

/** A flag of trials.csv: true, or the text "true". */
export function isTrue(cell: unknown): boolean {
  return cell === true || cell === 'true';
}
