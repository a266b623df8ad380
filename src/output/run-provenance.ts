/**
 * What made an output, so that a methods section can cite it and a reader can check it: the tool and
 * its version, when, every setting in effect (defaults included), every input file with its size and
 * SHA-256, and the calibration each muscle ran on with where it came from. The summary JSON carries it as
 * `provenance`; each CSV output in a sidecar `FILE.provenance.json`; the report in its methods section.
 */
import type { SettingsDocument } from '../trial/settings.ts';
import type { ProvenanceJson } from './provenance-json.ts';

/** What an input file is to the run. */
/** What a file was to the run; a trial description's own files are `description`, `recording` and the rest as named. */
export type InputKind = 'trial' | 'description' | 'recording' | 'events' | 'mapping' | 'calibration' | 'settings' | 'manifest' | 'session_log';

export interface InputFileJson {
  kind: InputKind;
  /** As the run opened it (as given, or joined to the manifest's folder). */
  path: string;
  /** Null when the file could not be read when the provenance was made. */
  bytes: number | null;
  sha256: string | null;
}

/** The calibration one muscle ran on. */
export interface MuscleCalibrationEntry {
  muscle: string;
  /** "file" (--calibration or the manifest's), "header" (the stream's), "baseline" (none: assumed), "runtime" (captured while running). */
  source: string | null;
  /** The calibration's method in words, as the summary says it. */
  method: string | null;
  sarcomeres_in_series: number | null;
  /** The calibration file, when the source is a file. */
  file: string | null;
  /** The calibration's own provenance (how `calibrate` made it), when it has one. */
  provenance: ProvenanceJson | null;
}

export interface RunProvenanceJson {
  tool: 'lengthwise';
  version: string;
  /** When the output was made (ISO 8601, UTC): the one thing that differs between two runs of the same inputs. */
  created_utc: string;
  settings: SettingsDocument;
  inputs: InputFileJson[];
  calibration: MuscleCalibrationEntry[];
}

/** The tool's name and version from "lengthwise X.Y.Z" (toolVersion's text). */
export function versionNumber(toolVersionText: string): string {
  return toolVersionText.replace(/^lengthwise\s+/, '');
}

/** A sidecar's path: the CSV's own path with `.provenance.json` added. */
export function sidecarPath(csvPath: string): string {
  return `${csvPath}.provenance.json`;
}

/** A study's calibration entry: one trial × muscle, with who and which trial it is. */
export interface StudyCalibrationEntry extends MuscleCalibrationEntry {
  subject: string | null;
  condition: string | null;
  trial: string | null;
  trial_file: string;
}

/** How a study's tables were made, for its methods section. */
export interface StudyDescriptionJson {
  /** The manifest, or null for trials given as files. */
  manifest: string | null;
  subjects: string[];
  conditions: string[];
  /** Rows of the manifest (or files given). */
  trials: number;
  trials_summarized: number;
  /** Trials marked exclude=true: in trials.csv, left out of the group, comparison and cycle tables. */
  trials_excluded: number;
  /** Trials that could not be summarized: left out of every table. */
  trials_failed: { file: string; row: number | null; message: string }[];
  statistics: typeof STUDY_STATISTICS;
}

/** How groups.csv, comparisons.csv and cycles.csv are made, in words a methods section can take. */
export const STUDY_STATISTICS = {
  unit: 'subject',
  subject_value: "the plain mean of the subject's included trials in the condition (trials marked exclude=true left out)",
  spread: 'sample standard deviation across subjects (n − 1)',
  interval: '95 % confidence interval of the mean across subjects, t distribution with n − 1 degrees of freedom; none for one subject',
  comparison: 'paired t-test, two-sided, over the subjects who have both conditions; mean difference b − a with its 95 % interval; dz = mean difference / SD of the differences',
  cycle: "each trial's gait-cycle curve (101 points, the unflagged strides' mean), a subject's curve the mean of its trials', then the mean and SD across subjects at each point",
  t_distribution: '@stdlib/stats-base-dists-t-quantile and @stdlib/stats-base-dists-t-cdf',
} as const;

export interface StudyProvenanceJson {
  tool: 'lengthwise';
  version: string;
  created_utc: string;
  settings: SettingsDocument;
  inputs: InputFileJson[];
  calibration: StudyCalibrationEntry[];
  study: StudyDescriptionJson;
}
