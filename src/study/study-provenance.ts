/**
 * The provenance of a study's tables (one object, written beside each of trials.csv, groups.csv,
 * comparisons.csv and cycles.csv): the run's provenance (src/run/run-provenance.ts) with the manifest
 * among its inputs, each trial × muscle's calibration with its subject, condition and trial, and how the
 * tables were made.
 */
import type { ManifestRow } from '../../adapters/study-manifest.ts';
import { STUDY_STATISTICS, type InputFileJson, type StudyCalibrationEntry, type StudyProvenanceJson } from '../output/run-provenance.ts';
import { calibrationEntries, describeInputs, provenanceOf, type RunInput } from '../run/run-provenance.ts';
import type { Settings } from '../trial/settings.ts';
import type { TrialOutcome } from './summarize-trial.ts';

/** One trial of the study as it came back: its manifest row (null for a file given on the command line). */
export interface StudyTrialOutcome {
  readonly outcome: TrialOutcome;
  readonly row: ManifestRow | null;
}

export interface StudyProvenanceSources {
  readonly settings: Settings;
  readonly settingsPath: string | undefined;
  readonly manifestPath: string | null;
  /** The files --calibration, --mapping and --events name, for every trial without its own. */
  readonly calibrationPath: string | undefined;
  readonly mappingPath: string | undefined;
  readonly eventsPath: string | undefined;
  readonly trials: readonly StudyTrialOutcome[];
  readonly now?: () => Date;
}

/** Every input once, in order: the manifest, the settings, the options' files, then each trial's files. */
export async function studyProvenance(sources: StudyProvenanceSources): Promise<StudyProvenanceJson> {
  const own: RunInput[] = [];
  if (sources.manifestPath !== null) own.push({ kind: 'manifest', path: sources.manifestPath });
  if (sources.settingsPath !== undefined) own.push({ kind: 'settings', path: sources.settingsPath });
  if (sources.calibrationPath !== undefined) own.push({ kind: 'calibration', path: sources.calibrationPath });
  if (sources.mappingPath !== undefined) own.push({ kind: 'mapping', path: sources.mappingPath });
  if (sources.eventsPath !== undefined) own.push({ kind: 'events', path: sources.eventsPath });
  const perTrial: RunInput[] = [];
  for (const { row } of sources.trials) {
    if (row === null) continue;
    if (row.mappingPath !== null) perTrial.push({ kind: 'mapping', path: row.mappingPath });
    if (row.calibrationPath !== null) perTrial.push({ kind: 'calibration', path: row.calibrationPath });
  }
  const described = await describeInputs([...own, ...perTrial]);
  // The trials' own files were read beside the trials, on the workers.
  const trialFiles: InputFileJson[] = [];
  const seen = new Set(described.map((i) => `${i.kind}\u0000${i.path}`));
  for (const { outcome } of sources.trials) {
    const files = outcome.ok && outcome.inputs !== undefined ? outcome.inputs : await describeInputs([{ kind: 'trial', path: outcome.path }]);
    for (const f of files) {
      const key = `${f.kind}\u0000${f.path}`;
      if (seen.has(key)) continue;
      seen.add(key);
      trialFiles.push(f);
    }
  }

  const calibration: StudyCalibrationEntry[] = [];
  for (const { outcome, row } of sources.trials) {
    if (!outcome.ok) continue;
    const file = row?.calibrationPath ?? sources.calibrationPath ?? null;
    for (const entry of calibrationEntries(outcome.summary, file)) {
      calibration.push({
        subject: row?.subject ?? outcome.summary.subject,
        condition: row?.condition ?? null,
        trial: row?.trial ?? outcome.summary.trial,
        trial_file: outcome.path,
        ...entry,
      });
    }
  }
  const rows = sources.trials.map((t) => t.row).filter((r) => r !== null);
  const base = provenanceOf(sources.settings, [...described, ...trialFiles], [], sources.now);
  return {
    tool: base.tool,
    version: base.version,
    created_utc: base.created_utc,
    settings: base.settings,
    inputs: base.inputs,
    calibration,
    study: {
      manifest: sources.manifestPath,
      subjects: [...new Set(rows.map((r) => r.subject))],
      conditions: [...new Set(rows.map((r) => r.condition))],
      trials: sources.trials.length,
      trials_summarized: sources.trials.filter((t) => t.outcome.ok).length,
      trials_excluded: rows.filter((r) => r.exclude).length,
      trials_failed: sources.trials
        .filter((t) => !t.outcome.ok)
        .map((t) => ({ file: t.outcome.path, row: t.row?.row ?? null, message: t.outcome.ok ? '' : t.outcome.message })),
      statistics: STUDY_STATISTICS,
    },
  };
}
