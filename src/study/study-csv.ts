/**
 * The study table (trials.csv): one row per trial × muscle, tidy (one variable a column, units in the
 * names, RFC 4180 quoting, empty = not known), so it reads straight into a statistics package. Every
 * trial figure is copied from the trial's summary JSON — the same numbers `--summary` writes — so the two
 * never disagree; the between-stride variability is computed from the summary's strides.
 *
 * The columns are the same whatever the calibrations provide: every figure a summary can have has its
 * column (empty when a trial lacks it), and a figure added to the summary later is picked up by name.
 * In a study (a manifest), each row starts with the trial's subject, condition and trial as the manifest
 * gives them, its covariates, and whether it is excluded.
 */
import type { ManifestRow } from '../../adapters/study-manifest.ts';
import { REGION_KEYS } from '../model/regions.ts';
import { roundTo, decimalsFor } from '../output/output-precision.ts';
import { csvField } from '../output/strides-csv.ts';
import type { MuscleJson, SummaryJson } from '../output/summary-json.ts';
import { strideVariability, VARIABILITY_COLUMNS } from './stride-variability.ts';
import { muscleSideAssumed, muscleStridesEstimated, muscleUncalibrated } from './trial-warnings.ts';

export type Cell = string | number | boolean | null;

/** One trial of a study (a manifest row), or null outside a study. */
export interface RowContext {
  readonly summary: SummaryJson;
  readonly muscle: string;
  readonly m: MuscleJson;
  readonly manifest: ManifestRow | null;
}

export interface Column {
  readonly name: string;
  readonly value: (row: RowContext) => Cell;
  /** A number across trials (a figure groups.csv summarizes); false for names, words and flags. */
  readonly figure: boolean;
}

const text = (name: string, value: (row: RowContext) => Cell): Column => ({ name, value, figure: false });
const figure = (name: string, value: (row: RowContext) => Cell): Column => ({ name, value, figure: true });

/** A key of an object read without trusting its type: figures added to the summary later are picked up by name. */
function field(obj: unknown, key: string): unknown {
  return typeof obj === 'object' && obj !== null && Object.hasOwn(obj, key) ? (obj as Record<string, unknown>)[key] : undefined;
}

function numberOrNull(value: unknown): number | null {
  return typeof value === 'number' && Number.isFinite(value) ? value : null;
}

/** Strides the summary flags (too much gap time), from its count or its strides; empty when it does not flag. */
function flaggedStrides(row: RowContext): number | null {
  const count = numberOrNull(field(row.m.trial, 'flagged_count'));
  if (count !== null) return count;
  let any = false;
  let n = 0;
  for (const s of row.m.strides) {
    const flagged = field(s, 'flagged');
    if (typeof flagged === 'boolean') {
      any = true;
      if (flagged) n++;
    }
  }
  return any ? n : null;
}

const trialNumber =
  (key: string) =>
  (r: RowContext): number | null =>
    numberOrNull(field(r.m.trial, key));

/** What a row is about, outside a study: the file, the stream header's subject and trial. */
const FILE_COLUMNS: readonly Column[] = [
  text('source_file', (r) => r.summary.source),
  text('subject', (r) => r.summary.subject),
  text('trial', (r) => r.summary.trial),
];

/** The muscle and its calibration. */
const MUSCLE_COLUMNS: readonly Column[] = [
  text('muscle', (r) => r.muscle),
  text('side', (r) => r.m.side),
  text('species', (r) => r.m.species),
  text('calibration_source', (r) => r.m.calibration_source),
  figure('sarcomeres_in_series', (r) => r.m.sarcomeres_in_series),
  figure('sarcomeres_in_series_relative_sd', (r) => numberOrNull(field(r.m, 'sarcomeres_in_series_relative_sd'))),
];

/** The figures every study has, always present (empty when a summary lacks them). */
const CORE_COLUMNS: readonly Column[] = [
  figure('stride_count', (r) => r.m.trial.stride_count),
  figure('strides_used', trialNumber('strides_used')),
  figure('flagged_strides', flaggedStrides),
  figure('sl_min_um', (r) => r.m.trial.sl_min_um),
  figure('sl_max_um', (r) => r.m.trial.sl_max_um),
  figure('sl_mean_um', (r) => r.m.trial.sl_mean_um),
  figure('sl_p5_um', trialNumber('sl_p5_um')),
  figure('sl_p95_um', trialNumber('sl_p95_um')),
  ...REGION_KEYS.map((k) => figure(`${k}_fraction`, (r) => r.m.trial.region_fraction[k])),
  figure('force_mean', (r) => r.m.trial.force_mean),
  figure('force_lv_mean', trialNumber('force_lv_mean')),
  figure('force_tendon_mean', trialNumber('force_tendon_mean')),
];

/** Keys of the trial figures the fixed columns already hold. */
const CORE_TRIAL_KEYS = new Set(['stride_count', 'strides_used', 'flagged_count', 'sl_min_um', 'sl_max_um', 'sl_mean_um', 'sl_p5_um', 'sl_p95_um', 'region_fraction', 'force_mean', 'force_lv_mean', 'force_tendon_mean']);

/** Trial-wide counts and flags, last. */
const FLAG_COLUMNS: readonly Column[] = [
  figure('trial_lines_received', (r) => r.summary.frames.received),
  figure('trial_samples_accepted', (r) => r.summary.frames.accepted),
  figure('trial_samples_low_quality', (r) => r.summary.frames.low_quality),
  figure('trial_lines_rejected', (r) => r.summary.frames.rejected),
  text('uncalibrated', (r) => muscleUncalibrated(r.m)),
  text('side_assumed', (r) => muscleSideAssumed(r.m)),
  // Empty when the summary does not say how strides were found.
  text('segmentation_estimated', (r) => muscleStridesEstimated(r.m)),
  text('trial_ended', (r) => r.summary.ended),
];

/** A path into a muscle's trial figures (keys, or an index into a [p5, p95] pair). */
type Path = readonly (string | number)[];

function at(obj: unknown, path: Path): unknown {
  let v = obj;
  for (const step of path) {
    if (typeof step === 'number') v = Array.isArray(v) ? v[step] : undefined;
    else v = field(v, step);
  }
  return v;
}

/**
 * Every number of a trial-figures object as named columns: a number under its own key, region records
 * as `REGION_fraction` / `REGION_probability` / `REGION_probability_p5|_p95`, a nested set of figures
 * (stance, swing) under its key as a prefix. Arrays other than [p5, p95] pairs are not columns.
 */
function flatten(obj: unknown, prefix: string, path: Path, out: Map<string, Path>, skip: ReadonlySet<string>): void {
  if (typeof obj !== 'object' || obj === null) return;
  for (const [key, value] of Object.entries(obj)) {
    if (prefix === '' && skip.has(key)) continue;
    const here = [...path, key];
    if (typeof value === 'number' || value === null) out.set(`${prefix}${key}`, here);
    else if (key === 'region_fraction' || key === 'region_probability') {
      const suffix = key === 'region_fraction' ? 'fraction' : 'probability';
      for (const k of REGION_KEYS) out.set(`${prefix}${k}_${suffix}`, [...here, k]);
    } else if (key === 'region_probability_90') {
      for (const k of REGION_KEYS) {
        out.set(`${prefix}${k}_probability_p5`, [...here, k, 0]);
        out.set(`${prefix}${k}_probability_p95`, [...here, k, 1]);
      }
    } else if (typeof value === 'object' && !Array.isArray(value)) flatten(value, `${prefix}${key}_`, here, out, skip);
  }
}

/** The figures of one stretch (the trial, its stance, its swing) as a summary writes them, all present. */
function fullFigures(): Record<string, unknown> {
  const regions = Object.fromEntries(REGION_KEYS.map((k) => [k, 0]));
  return {
    sl_min_um: 0,
    sl_max_um: 0,
    sl_mean_um: 0,
    sl_p5_um: 0,
    sl_p95_um: 0,
    region_fraction: regions,
    region_probability: regions,
    region_probability_90: Object.fromEntries(REGION_KEYS.map((k) => [k, [0, 0]])),
    force_mean: 0,
    force_lv_mean: 0,
    force_tendon_mean: 0,
    velocity_min_mm_s: 0,
    velocity_max_mm_s: 0,
    gap_s: 0,
    sample_count: 0,
    excursion_mean_um: 0,
    duration_s: 0,
  };
}

/** A muscle's trial figures with every figure a summary can have, so every study has those columns. */
const FULL_TRIAL_FIGURES = { stride_count: 0, flagged_count: 0, strides_used: 0, phased_count: 0, ...fullFigures(), stance: fullFigures(), swing: fullFigures() };

/**
 * The further figures of the muscles' trial objects (percentiles by phase, velocities, probabilities…)
 * beyond the fixed columns: every one a summary can have, then any a summary gives that is not known
 * here (a figure added later), in the order the summaries first give them.
 */
function extraTrialColumns(summaries: readonly SummaryJson[], taken: ReadonlySet<string>): Column[] {
  const paths = new Map<string, Path>();
  flatten(FULL_TRIAL_FIGURES, '', [], paths, CORE_TRIAL_KEYS);
  for (const s of summaries) for (const m of Object.values(s.muscles)) flatten(m.trial, '', [], paths, CORE_TRIAL_KEYS);
  return [...paths.entries()].filter(([name]) => !taken.has(name)).map(([name, path]) => figure(name, (r) => numberOrNull(at(r.m.trial, path))));
}

/** Between-stride variability: SD and coefficient of variation of each stride figure across the unflagged strides. */
const VARIABILITY: readonly Column[] = VARIABILITY_COLUMNS.map((name) => figure(name, (r) => strideVariability(r.m)[name] ?? null));

/** The manifest's columns at the start of a study's rows: who, in which condition, which trial, the covariates, exclusion. */
function manifestColumns(covariates: readonly string[]): Column[] {
  return [
    text('subject', (r) => r.manifest?.subject ?? r.summary.subject),
    text('condition', (r) => r.manifest?.condition ?? null),
    text('trial', (r) => r.manifest?.trial ?? r.summary.trial),
    ...covariates.map((c) => text(c, (r) => r.manifest?.covariates[c] ?? null)),
    text('exclude', (r) => r.manifest?.exclude ?? false),
    text('note', (r) => r.manifest?.note ?? ''),
    text('source_file', (r) => r.summary.source),
  ];
}

/** Names the study's table writes itself, whatever the manifest: a covariate may not take one. */
export function studyColumnNames(summaries: readonly SummaryJson[] = []): string[] {
  return allColumns(summaries, []).map((c) => c.name);
}

export interface StudyTableOptions {
  /** The manifest's covariate columns; given, the rows start with the manifest's columns. */
  readonly covariates?: readonly string[];
}

function allColumns(summaries: readonly SummaryJson[], covariates: readonly string[] | undefined): Column[] {
  const head = covariates !== undefined ? manifestColumns(covariates) : FILE_COLUMNS;
  const fixed = [...head, ...MUSCLE_COLUMNS, ...CORE_COLUMNS, ...VARIABILITY, ...FLAG_COLUMNS];
  const extra = extraTrialColumns(summaries, new Set(fixed.map((c) => c.name)));
  return [...head, ...MUSCLE_COLUMNS, ...CORE_COLUMNS, ...extra, ...VARIABILITY, ...FLAG_COLUMNS];
}

/** The study table's columns over these summaries. */
export function studyTableColumns(summaries: readonly SummaryJson[], options: StudyTableOptions = {}): Column[] {
  return allColumns(summaries, options.covariates);
}

/** The column names of a study over these summaries (the fixed ones, then any further trial figures). */
export function studyColumns(summaries: readonly SummaryJson[], options: StudyTableOptions = {}): string[] {
  return studyTableColumns(summaries, options).map((c) => c.name);
}

/** One trial of the table: its summary, and its manifest row in a study. */
export interface TableTrial {
  readonly summary: SummaryJson;
  readonly manifest: ManifestRow | null;
}

/** Every trial × muscle's context, in the trials' order. */
export function tableRows(trials: readonly TableTrial[]): RowContext[] {
  return trials.flatMap((t) => Object.entries(t.summary.muscles).map(([muscle, m]) => ({ summary: t.summary, muscle, m, manifest: t.manifest })));
}

/** A cell's value as written: a figure rounded once to its unit's precision (computed figures; copied ones are already). */
export function cellValue(column: Column, row: RowContext): Cell {
  const value = column.value(row);
  return typeof value === 'number' ? roundTo(value, decimalsFor(column.name)) : value;
}

/** A table as CSV text: the header row, then the rows (CRLF line ends, RFC 4180 quoting, booleans true/false). */
export function csvText(header: readonly string[], rows: readonly (readonly Cell[])[]): string {
  const lines = [header.map((name) => csvField(name)).join(',')];
  for (const row of rows) lines.push(row.map((v) => csvField(v)).join(','));
  return `${lines.join('\r\n')}\r\n`;
}

/** The study table as CSV text (CRLF line ends, header row first), rows in the summaries' order. */
export function studyCsv(summaries: readonly SummaryJson[]): string {
  return trialsCsv(summaries.map((summary) => ({ summary, manifest: null })));
}

/** The study table of trials with or without their manifest rows. */
export function trialsCsv(trials: readonly TableTrial[], options: StudyTableOptions = {}): string {
  const columns = studyTableColumns(
    trials.map((t) => t.summary),
    options,
  );
  return csvText(
    columns.map((c) => c.name),
    tableRows(trials).map((row) => columns.map((c) => cellValue(c, row))),
  );
}
