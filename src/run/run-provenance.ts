/**
 * The provenance of a run's outputs (src/output/run-provenance.ts), made from what the run read: each
 * input file's size and SHA-256 are read here, once, when the outputs are written.
 */
import { stat } from 'node:fs/promises';
import { settingsDocument, type Settings } from '../trial/settings.ts';
import { sidecarPath, versionNumber, type InputFileJson, type InputKind, type MuscleCalibrationEntry, type RunProvenanceJson } from '../output/run-provenance.ts';
import type { SummaryJson } from '../output/summary-json.ts';
import { writeFileAtomic, type WriteResult } from '../output/write-file.ts';
import { fileSha256 } from './file-digest.ts';
import { toolVersion } from './tool-version.ts';

/** An input file and what it is to the run. */
export interface RunInput {
  readonly kind: InputKind;
  readonly path: string;
}

/** What a trial's provenance is made from. */
export interface ProvenanceSources {
  readonly settings: Settings;
  /** Every file the run read: the trial, its events, mapping, calibration and settings files, a session log. */
  readonly inputs: readonly RunInput[];
  /** The calibration file every trial's "file" calibration came from, if any. */
  readonly calibrationFile: string | null;
  /** The clock of `created_utc`. @default () => new Date() */
  readonly now?: () => Date;
}

/** An input's size and SHA-256; both null when it cannot be read (now). Never throws. */
export async function describeInput(input: RunInput): Promise<InputFileJson> {
  try {
    const info = await stat(input.path);
    if (!info.isFile()) return { kind: input.kind, path: input.path, bytes: null, sha256: null };
    return { kind: input.kind, path: input.path, bytes: info.size, sha256: await fileSha256(input.path) };
  } catch {
    return { kind: input.kind, path: input.path, bytes: null, sha256: null };
  }
}

/** Each input once (the first time a kind and path are given), described, in the order given. */
export function describeInputs(inputs: readonly RunInput[]): Promise<InputFileJson[]> {
  const seen = new Set<string>();
  const once = inputs.filter((i) => {
    const key = `${i.kind}\u0000${i.path}`;
    if (seen.has(key)) return false;
    seen.add(key);
    return true;
  });
  return Promise.all(once.map(describeInput));
}

/** The provenance object with its inputs already described. */
export function provenanceOf(
  settings: Settings,
  inputs: InputFileJson[],
  calibration: MuscleCalibrationEntry[],
  now: () => Date = () => new Date(),
): RunProvenanceJson {
  return {
    tool: 'lengthwise',
    version: versionNumber(toolVersion()),
    created_utc: now().toISOString(),
    settings: settingsDocument(settings),
    inputs,
    calibration,
  };
}

/** The calibration entries of one trial's muscles, from its summary. */
export function calibrationEntries(summary: Pick<SummaryJson, 'muscles'>, calibrationFile: string | null): MuscleCalibrationEntry[] {
  return Object.entries(summary.muscles).map(([muscle, m]) => ({
    muscle,
    source: m.calibration_source,
    method: m.calibration_method,
    sarcomeres_in_series: m.sarcomeres_in_series,
    file: m.calibration_source === 'file' ? calibrationFile : null,
    provenance: m.calibration_provenance,
  }));
}

/** A trial's provenance: its inputs read and hashed, the calibration of each of its muscles. */
export async function trialProvenance(summary: Pick<SummaryJson, 'muscles'>, sources: ProvenanceSources): Promise<RunProvenanceJson> {
  return provenanceOf(sources.settings, await describeInputs(sources.inputs), calibrationEntries(summary, sources.calibrationFile), sources.now);
}

/**
 * Writes a CSV output's provenance beside it (`FILE.provenance.json`). A CSV written into a device or a
 * pipe (/dev/stdout, /dev/null) has no sidecar: null.
 */
export async function writeSidecar(csvPath: string, provenance: object): Promise<WriteResult | null> {
  const info = await stat(csvPath).catch(() => null);
  if (info !== null && !info.isFile()) return null;
  return writeFileAtomic(sidecarPath(csvPath), `${JSON.stringify(provenance, null, 2)}\n`);
}
