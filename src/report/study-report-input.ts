/**
 * What the study report is drawn from: the rows of the study's tables (trials.csv, groups.csv,
 * comparisons.csv, cycles.csv, one object per CSV row, keys as the columns) and the study's provenance
 * (its JSON keys as `summarize` writes them). Nothing else is read: the page says what these say.
 */
import type { ProvenanceJson } from '../output/provenance-json.ts';
import type { ComparisonRow, CycleRow, GroupRow } from '../output/study-rows.ts';

/** A field of trials.csv: text, a number, a flag, or null for an empty field. */
export type TrialCell = string | number | boolean | null;

/**
 * One row of trials.csv (a trial × muscle), column name → value: `subject`, `condition`, `trial` and
 * `muscle`, the study table's columns (`side`, `species`, `calibration_source`, `stride_count`,
 * `flagged_strides`, `sl_mean_um`, `plateau_fraction`, `segmentation_estimated`, `uncalibrated`, …) and any
 * covariates. A row whose `exclude` is true (a trial the manifest excludes) is counted as excluded only.
 */
export type TrialRow = Readonly<Record<string, TrialCell>>;

/** A value of the settings file (JSON). */
export type SettingValue = number | string | boolean | null | readonly SettingValue[] | { readonly [key: string]: SettingValue };

/** A file the study read, as the provenance lists it. */
export interface InputFileJson {
  readonly path: string;
  readonly bytes: number;
  readonly sha256: string;
  /** What the file was to the study (trial, events, mapping, calibration, settings, manifest), when said. */
  readonly kind?: string;
}

/** The calibration one muscle was given: in one subject, or in every subject when `subject` is null. */
export interface CalibrationUse {
  readonly muscle: string;
  readonly subject: string | null;
  /** The method in words, as the summary's `calibration_method` says it; null when not known. */
  readonly method: string | null;
  /** Where it came from, as the summary's `calibration_source` says it (a file, the stream header, the baseline). */
  readonly source: string | null;
  /** The calibration file's own provenance (posture windows, sarcomere length and its source), when it has one. */
  readonly provenance?: ProvenanceJson | null;
}

/** The study's provenance: which tool made the tables, when, with which settings, from which files. */
export interface StudyProvenance {
  readonly tool: string;
  readonly version: string;
  readonly created_utc: string;
  /** Every effective setting, defaults included, by its key in the settings file. */
  readonly settings: Readonly<Record<string, SettingValue>>;
  readonly inputs: readonly InputFileJson[];
  readonly calibration: readonly CalibrationUse[];
}

/** A marker set during a trial (time on the trial's clock, and its text). */
export interface StudyMarker {
  readonly subject: string;
  readonly condition: string;
  readonly trial: string;
  readonly time_s: number;
  readonly text: string;
}

export interface StudyReportInput {
  /** @default 'lengthwise study report' */
  readonly title?: string;
  readonly trials: readonly TrialRow[];
  readonly groups: readonly GroupRow[];
  readonly comparisons: readonly ComparisonRow[];
  readonly cycles: readonly CycleRow[];
  readonly provenance: StudyProvenance;
  /** @default [] */
  readonly markers?: readonly StudyMarker[];
}
