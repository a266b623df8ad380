/**
 * The study table: one row per trial × muscle, tidy (one variable a column, units in the names, RFC 4180
 * quoting, empty = not known), so it reads straight into a statistics package. Every figure is copied
 * from the trial's summary JSON — the same numbers `--summary` writes — so the two never disagree.
 */
import { REGION_KEYS } from '../model/regions.ts';
import { csvField } from '../output/strides-csv.ts';
import type { MuscleJson, SummaryJson } from '../output/summary-json.ts';
import { muscleSideAssumed, muscleStridesEstimated, muscleUncalibrated } from './trial-warnings.ts';

type Cell = string | number | boolean | null;

interface RowContext {
  readonly summary: SummaryJson;
  readonly muscle: string;
  readonly m: MuscleJson;
}

type Column = readonly [name: string, value: (row: RowContext) => Cell];

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

/** Who and what a row is about. */
const ID_COLUMNS: readonly Column[] = [
  ['source_file', (r) => r.summary.source],
  ['subject', (r) => r.summary.subject],
  ['trial', (r) => r.summary.trial],
  ['muscle', (r) => r.muscle],
  ['side', (r) => r.m.side],
  ['species', (r) => r.m.species],
  ['calibration_source', (r) => r.m.calibration_source],
  ['sarcomeres_in_series', (r) => r.m.sarcomeres_in_series],
  ['sarcomeres_in_series_relative_sd', (r) => numberOrNull(field(r.m, 'sarcomeres_in_series_relative_sd'))],
];

/** The figures every study has, always present (empty when a summary lacks them). */
const CORE_COLUMNS: readonly Column[] = [
  ['stride_count', (r) => r.m.trial.stride_count],
  ['strides_used', trialNumber('strides_used')],
  ['flagged_strides', flaggedStrides],
  ['sl_min_um', (r) => r.m.trial.sl_min_um],
  ['sl_max_um', (r) => r.m.trial.sl_max_um],
  ['sl_mean_um', (r) => r.m.trial.sl_mean_um],
  ['sl_p5_um', trialNumber('sl_p5_um')],
  ['sl_p95_um', trialNumber('sl_p95_um')],
  ...REGION_KEYS.map((k): Column => [`${k}_fraction`, (r) => r.m.trial.region_fraction[k]]),
  ['force_mean', (r) => r.m.trial.force_mean],
  ['force_lv_mean', trialNumber('force_lv_mean')],
  ['force_tendon_mean', trialNumber('force_tendon_mean')],
];

/** Keys of the trial figures the fixed columns already hold. */
const CORE_TRIAL_KEYS = new Set(['stride_count', 'strides_used', 'flagged_count', 'sl_min_um', 'sl_max_um', 'sl_mean_um', 'sl_p5_um', 'sl_p95_um', 'region_fraction', 'force_mean', 'force_lv_mean', 'force_tendon_mean']);

/** Trial-wide counts and flags, last. */
const FLAG_COLUMNS: readonly Column[] = [
  ['trial_lines_received', (r) => r.summary.frames.received],
  ['trial_samples_accepted', (r) => r.summary.frames.accepted],
  ['trial_samples_low_quality', (r) => r.summary.frames.low_quality],
  ['trial_lines_rejected', (r) => r.summary.frames.rejected],
  ['uncalibrated', (r) => muscleUncalibrated(r.m)],
  ['side_assumed', (r) => muscleSideAssumed(r.m)],
  // Empty when the summary does not say how strides were found.
  ['segmentation_estimated', (r) => muscleStridesEstimated(r.m)],
  ['trial_ended', (r) => r.summary.ended],
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

/**
 * The further figures of the muscles' trial objects (percentiles by phase, velocities, probabilities…)
 * beyond the fixed columns, in the order the summaries first give them; their union over the study, so
 * every row has the same columns and figures added to the summary later appear without a change here.
 */
function extraTrialColumns(summaries: readonly SummaryJson[]): Column[] {
  const paths = new Map<string, Path>();
  for (const s of summaries) for (const m of Object.values(s.muscles)) flatten(m.trial, '', [], paths, CORE_TRIAL_KEYS);
  const taken = new Set([...ID_COLUMNS, ...CORE_COLUMNS, ...FLAG_COLUMNS].map(([name]) => name));
  return [...paths.entries()]
    .filter(([name]) => !taken.has(name))
    .map(([name, path]): Column => [name, (r) => numberOrNull(at(r.m.trial, path))]);
}

function allColumns(summaries: readonly SummaryJson[]): Column[] {
  return [...ID_COLUMNS, ...CORE_COLUMNS, ...extraTrialColumns(summaries), ...FLAG_COLUMNS];
}

function cell(value: Cell): string {
  if (typeof value === 'boolean') return value ? 'true' : 'false';
  return csvField(value);
}

/** The column names of a study over these summaries (the fixed ones, then any further trial figures). */
export function studyColumns(summaries: readonly SummaryJson[]): string[] {
  return allColumns(summaries).map(([name]) => name);
}

/** The study table as CSV text (CRLF line ends, header row first), rows in the summaries' order. */
export function studyCsv(summaries: readonly SummaryJson[]): string {
  const columns = allColumns(summaries);
  const lines = [columns.map(([name]) => name).join(',')];
  for (const summary of summaries) {
    for (const [muscle, m] of Object.entries(summary.muscles)) {
      const row: RowContext = { summary, muscle, m };
      lines.push(columns.map(([, value]) => cell(value(row))).join(','));
    }
  }
  return `${lines.join('\r\n')}\r\n`;
}
