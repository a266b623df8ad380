/**
 * What made an output, so that a methods section can cite it and a reader can check it: the tool and
 * its version, when, every setting in effect (defaults included), every input file with its size and
 * SHA-256, and the calibration each muscle ran on with where it came from. The summary JSON carries it as
 * `provenance`; each CSV output in a sidecar `FILE.provenance.json`; the report in its methods section.
 */
import type { SettingsDocument } from '../trial/settings.ts';
import type { ProvenanceJson } from './provenance-json.ts';

/** What an input file is to the run. */
export type InputRole = 'trial' | 'events' | 'mapping' | 'calibration' | 'settings' | 'manifest' | 'session_log';

export interface InputFileJson {
  role: InputRole;
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
