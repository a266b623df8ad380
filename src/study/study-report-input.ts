/**
 * What the study report is drawn from (src/report/study-report-input.ts), made from what `summarize
 * --study` computed: the rows of its four tables and its provenance, and the trials' markers.
 */
import type { CalibrationUse, SettingValue, StudyMarker, StudyReportInput, TrialRow } from '../report/study-report-input.ts';
import type { StudyProvenanceJson } from '../output/run-provenance.ts';
import type { ComparisonRow, CycleRow, GroupRow } from '../output/study-rows.ts';
import { cellValue, studyTableColumns, tableRows, type StudyTableOptions, type TableTrial } from './study-csv.ts';

export interface StudyReportTables {
  readonly groups: readonly GroupRow[];
  readonly comparisons: readonly ComparisonRow[];
  readonly cycles: readonly CycleRow[];
}

/** The calibration of each subject and muscle once (a subject's trials share theirs, as a rule). */
function calibrationUses(provenance: StudyProvenanceJson): CalibrationUse[] {
  const seen = new Set<string>();
  const uses: CalibrationUse[] = [];
  for (const c of provenance.calibration) {
    const use: CalibrationUse = { muscle: c.muscle, subject: c.subject, method: c.method, source: c.source, provenance: c.provenance };
    const key = JSON.stringify(use);
    if (seen.has(key)) continue;
    seen.add(key);
    uses.push(use);
  }
  return uses;
}

/**
 * The settings as the report's methods read them: without the file's format and version, and each pair
 * of `NAME_min_UNIT` / `NAME_max_UNIT` settings as one range, `NAME_UNIT: {min, max}` (the plausible
 * sarcomere lengths, the stride periods looked for), where the pair's first key stood.
 */
export function reportSettings(settings: object): Record<string, SettingValue> {
  const out: Record<string, SettingValue> = {};
  for (const [key, value] of Object.entries(settings)) {
    if (key === 'format' || key === 'version') continue;
    const pair = /^(.+)_(min|max)(_[a-z0-9_]+)?$/.exec(key);
    if (pair !== null) {
      const [, stem, end, unit = ''] = pair;
      const other: unknown = (settings as Record<string, unknown>)[`${stem}_${end === 'min' ? 'max' : 'min'}${unit}`];
      if (typeof value === 'number' && typeof other === 'number') {
        const range = `${stem}${unit}`;
        if (!Object.hasOwn(out, range)) out[range] = end === 'min' ? { min: value, max: other } : { min: other, max: value };
        continue;
      }
    }
    out[key] = value as SettingValue;
  }
  return out;
}

export function studyReportInput(
  trials: readonly TableTrial[],
  options: StudyTableOptions,
  tables: StudyReportTables,
  provenance: StudyProvenanceJson,
  title: string,
): StudyReportInput {
  const columns = studyTableColumns(
    trials.map((t) => t.summary),
    options,
  );
  const rows: TrialRow[] = tableRows(trials).map((row) => Object.fromEntries(columns.map((c) => [c.name, cellValue(c, row)])));
  const markers: StudyMarker[] = [];
  for (const t of trials) {
    if (t.manifest === null) continue;
    for (const m of t.summary.markers) markers.push({ subject: t.manifest.subject, condition: t.manifest.condition, trial: t.manifest.trial, time_s: m.t_s, text: m.text });
  }
  return {
    title,
    trials: rows,
    groups: tables.groups,
    comparisons: tables.comparisons,
    cycles: tables.cycles,
    provenance: {
      tool: provenance.tool,
      version: provenance.version,
      created_utc: provenance.created_utc,
      settings: reportSettings(provenance.settings),
      inputs: provenance.inputs.map((i) => ({ path: i.path, bytes: i.bytes ?? 0, sha256: i.sha256 ?? '', kind: i.kind })),
      calibration: calibrationUses(provenance),
    },
    markers,
  };
}
