/** `lengthwise summarize FILES...` or `--study MANIFEST`: many trials in parallel → a tidy study table, and for a study its group, comparison and cycle tables. */
import type { CommandIo } from '../run/io.ts';
import { parseCommandArgs } from './parse-command-args.ts';
import { outputsApart, sidesOption, TRIAL_FILE_OPTIONS, TRIAL_INPUT_OPTIONS, trialFiles, trialInputPaths } from './option-files.ts';
import { writeFileAtomic } from '../output/write-file.ts';
import { defaultJobs, runStudy, type StudyEvent, type StudyProgress } from '../study/run-study.ts';
import { studyColumnNames, trialsCsv, type TableTrial } from '../study/study-csv.ts';
import { progressBar, progressFigures, rateText } from '../study/progress-line.ts';
import type { SummaryJson } from '../output/summary-json.ts';
import type { TrialOutcome } from '../study/summarize-trial.ts';
import { trialWarnings } from '../study/trial-warnings.ts';
import { stopOnSignals } from '../run/stop-signals.ts';
import { manifestProblemText, readStudyManifest, type ManifestRow, type StudyManifest } from '../../adapters/study-manifest.ts';
import { mappedSides, type DeviceMapping } from '../../adapters/device-mapping.ts';
import type { Side } from '../trial/records.ts';
import type { TrialSetup } from '../study/messages.ts';
import type { NamedPath } from '../run/output-paths.ts';
import { sidecarPath } from '../output/run-provenance.ts';
import { writeSidecar } from '../run/run-provenance.ts';
import { studyProvenance } from '../study/study-provenance.ts';

const HELP = `usage: lengthwise summarize FILES... [options]
       lengthwise summarize --study study.csv [--out trials.csv] [--groups groups.csv] [--comparisons comparisons.csv]
                            [--cycles cycles.csv] [--report report.html] [options]

Runs every trial file (lengthwise-stream NDJSON, its CSV variant, session logs, tables and NDJSON in
your own columns through a mapping, or trial descriptions joining several recordings) through the same
pipeline as replay, in parallel, and writes one study table: a row per trial and muscle, with the same
figures as each trial's --summary.

With --study, the trials are a manifest's rows (a CSV table: subject, condition, file; optionally trial,
calibration, events, mapping, side, exclude, note, and any covariate columns), and the study's tables
follow: group means across subjects with their 95 % intervals, paired comparisons of the conditions,
and the gait-cycle curves. Every CSV written to a file has its provenance beside it (FILE.provenance.json).

options:
  --study FILE.csv       the study's manifest (paths in it are relative to its folder)
  --out FILE.csv         write the study table (trials.csv) here  [default: standard output]
  --groups FILE.csv      --study: per condition, muscle and figure, the mean across subjects, SD and 95 % interval
  --comparisons FILE.csv --study: per pair of conditions, muscle and figure, a paired t-test across subjects
  --cycles FILE.csv      --study: each trial's gait-cycle curve, and each condition's mean and SD across subjects
  --report FILE.html     write one self-contained HTML report: with --study, the study report for a paper (methods,
                         figures across subjects, tables, provenance); else plots of every trial and muscle
  --settings FILE        processing settings (lengthwise-settings JSON; \`lengthwise settings\` prints the defaults)
  --calibration FILE     calibration JSON for every trial (a manifest row's own wins); wins over each trial's header calibration
  --mapping FILE         trials in your own columns, units or table layout (lengthwise-mapping JSON)
  --events FILE          gait events from another system (CSV, TSV or NDJSON), merged into every trial
  --side NAME=left|right a muscle's side (repeatable); wins over the mapping and the stream headers
  --jobs N               trials summarized at once, one worker thread each  [default: ${defaultJobs()}, the cores]
  --plain                plain progress lines instead of a progress bar, even on a terminal
  -h, --help             this text

A manifest is checked whole before any trial runs: every problem is said with its row and column (exit 2).
A file that cannot be read or has no valid sample is named with the reason and left out; the others
go on. Ctrl+C or SIGTERM stop the study: the trials finished so far are written. Exit status: 0 all
trials summarized, 1 some failed or were not summarized or a file could not be written, 2 usage or a
manifest, settings, calibration or mapping file that is not accepted.`;

/** Reads `--jobs`: a whole number from 1 up. */
export function parseJobs(text: string): { ok: true; jobs: number } | { ok: false; message: string } {
  const n = Number(text);
  if (/^\s*\d+\s*$/.test(text) && Number.isInteger(n) && n >= 1) return { ok: true, jobs: n };
  return { ok: false, message: `--jobs "${text}" is not a number of workers: give a whole number from 1 up (the machine has ${defaultJobs()} cores)` };
}

/**
 * Shows progress on standard error: a redrawn bar on a terminal, a line per finished trial otherwise.
 * A trial's warnings (uncalibrated, side assumed, strides estimated) are in its plain line; with the
 * bar, a line of their own above it, and the bar counts the trials that had some.
 */
function progressReporter(io: CommandIo, bar: boolean): { readonly onEvent: (event: StudyEvent) => void; readonly end: () => void } {
  const started = performance.now();
  const elapsedS = (): number => (performance.now() - started) / 1000;
  let lastDraw = Number.NEGATIVE_INFINITY;
  let drawn = false;
  let warned = 0;
  const clear = (): void => {
    if (drawn) io.stderr.write('\r\x1b[2K');
    drawn = false;
  };
  const draw = (p: StudyProgress, force: boolean): void => {
    const now = performance.now();
    if (!force && now - lastDraw < 100) return;
    lastDraw = now;
    io.stderr.write(`\r\x1b[2K${progressBar(p, elapsedS(), io.stderr.columns ?? 80, warned)}`);
    drawn = true;
  };
  const failure = (outcome: TrialOutcome): string => (outcome.ok ? '' : `lengthwise summarize: ${outcome.message}`);
  return {
    onEvent: (event) => {
      const warnings = event.type === 'trial' && event.outcome.ok ? trialWarnings(event.outcome.summary) : [];
      if (warnings.length > 0) warned++;
      if (bar) {
        if (event.type === 'trial' && !event.outcome.ok) {
          clear();
          io.err(failure(event.outcome));
        } else if (event.type === 'trial' && warnings.length > 0) {
          clear();
          io.err(`${event.outcome.path}: ${warnings.join(' · ')}`);
        }
        draw(event.progress, event.type === 'trial');
        return;
      }
      if (event.type !== 'trial') return;
      const p = event.progress;
      const count = `[${p.trialsDone}/${p.trialsTotal}]`;
      if (!event.outcome.ok) io.err(`${count} ${failure(event.outcome)}`);
      else {
        const muscles = Object.values(event.outcome.summary.muscles);
        const strides = muscles.reduce((n, m) => n + m.trial.stride_count, 0);
        const said = warnings.map((w) => ` · ${w}`).join('');
        io.err(
          `${count} ${event.outcome.path}: ${muscles.length} muscle${muscles.length === 1 ? '' : 's'}, ${strides} stride${strides === 1 ? '' : 's'}, ` +
            `${event.outcome.samples} samples${said} · ${progressFigures(p, elapsedS(), warned)}`,
        );
      }
    },
    end: () => clear(),
  };
}

/** The study tables' options, only with --study. */
const STUDY_TABLES = ['groups', 'comparisons', 'cycles'] as const;

/** A trial's own setup from its manifest row: its files, and its sides over the study's. */
function rowSetup(row: ManifestRow, manifest: StudyManifest, studyMapping: DeviceMapping | undefined, optionSides: Readonly<Record<string, Side>>): TrialSetup {
  const mapping = row.mappingPath !== null ? manifest.mappings.get(row.mappingPath) : undefined;
  const calibration = row.calibrationPath !== null ? manifest.calibrations.get(row.calibrationPath) : undefined;
  const sides: Record<string, Side> = { ...mappedSides(mapping ?? studyMapping), ...optionSides, ...row.sides };
  return {
    ...(mapping !== undefined ? { mapping } : {}),
    ...(calibration !== undefined ? { calibration } : {}),
    ...(row.eventsPath !== null ? { eventsPath: row.eventsPath } : {}),
    sides,
  };
}

/** The files a manifest's rows name, for the check that no output replaces one. */
function manifestInputs(manifest: StudyManifest): NamedPath[] {
  const out: NamedPath[] = [{ path: manifest.path, role: 'the manifest (--study)' }];
  for (const row of manifest.rows) {
    out.push({ path: row.file, role: `the trial file of row ${row.row}` });
    for (const [column, path] of [['calibration', row.calibrationPath], ['events', row.eventsPath], ['mapping', row.mappingPath]] as const) {
      if (path !== null) out.push({ path, role: `the ${column} file of row ${row.row}` });
    }
  }
  return out;
}

/** Writes a CSV and its provenance beside it; false (after saying why) when either could not be written. */
async function writeTable(path: string, what: string, text: string, provenance: object, io: CommandIo): Promise<boolean> {
  const result = await writeFileAtomic(path, text);
  if (!result.ok) {
    io.err(`lengthwise summarize: ${result.message}`);
    return false;
  }
  io.err(`${what} written to ${result.path}`);
  const sidecar = await writeSidecar(path, provenance);
  if (sidecar !== null && !sidecar.ok) {
    io.err(`lengthwise summarize: ${sidecar.message}`);
    return false;
  }
  return true;
}

export async function run(argv: string[], io: CommandIo): Promise<number> {
  const parsed = parseCommandArgs('summarize', HELP, argv, {
    study: { type: 'string' },
    out: { type: 'string' },
    groups: { type: 'string' },
    comparisons: { type: 'string' },
    cycles: { type: 'string' },
    report: { type: 'string' },
    ...TRIAL_FILE_OPTIONS,
    ...TRIAL_INPUT_OPTIONS,
    jobs: { type: 'string' },
    plain: { type: 'boolean', default: false },
  }, io);
  if (typeof parsed === 'number') return parsed;
  const { values, positionals } = parsed;
  if (values.study !== undefined && positionals.length > 0) {
    io.err(`lengthwise summarize: give either --study MANIFEST or trial files, not both (the manifest names the trials: ${positionals.slice(0, 3).join(', ')}…)`);
    return 2;
  }
  if (values.study === undefined) {
    const studyOnly = STUDY_TABLES.filter((t) => values[t] !== undefined);
    if (studyOnly.length > 0) {
      io.err(`lengthwise summarize: ${studyOnly.map((t) => `--${t}`).join(', ')} need${studyOnly.length === 1 ? 's' : ''} --study MANIFEST: the subjects and conditions come from a manifest`);
      return 2;
    }
    if (positionals.length === 0) {
      io.err(`lengthwise summarize: give one or more trial files, or --study MANIFEST.\n\n${HELP}`);
      return 2;
    }
  }
  let jobs = defaultJobs();
  if (values.jobs !== undefined) {
    const parsedJobs = parseJobs(values.jobs);
    if (!parsedJobs.ok) {
      io.err(`lengthwise summarize: ${parsedJobs.message}`);
      return 2;
    }
    jobs = parsedJobs.jobs;
  }
  const files = await trialFiles('summarize', values, io);
  if (files === null) return 2;
  const { calibration, mapping, settings } = files;
  const optionSides = sidesOption('summarize', undefined, values.side, io);
  if (optionSides === null) return 2;
  const sides = { ...mappedSides(mapping), ...optionSides };

  let manifest: StudyManifest | null = null;
  if (values.study !== undefined) {
    const read = await readStudyManifest(values.study, { reservedColumns: studyColumnNames() });
    if (!read.ok) {
      io.err(`lengthwise summarize: the manifest ${values.study} was not accepted; nothing was run:`);
      for (const p of read.problems) io.err(`  ${values.study} ${manifestProblemText(p)}`);
      return 2;
    }
    manifest = read.manifest;
  }
  const paths = manifest !== null ? manifest.rows.map((r) => r.file) : positionals;
  const tables: NamedPath[] = [
    ...(values.out !== undefined ? [{ path: values.out, role: '--out' }] : []),
    ...STUDY_TABLES.flatMap((t) => (values[t] !== undefined ? [{ path: values[t], role: `--${t}` }] : [])),
  ];
  const outputs = [
    ...tables,
    ...tables.map((t) => ({ path: sidecarPath(t.path), role: `${t.role}'s provenance (FILE.provenance.json)` })),
    ...(values.report !== undefined ? [{ path: values.report, role: '--report' }] : []),
  ];
  const inputs = [...(manifest !== null ? manifestInputs(manifest) : positionals.map((path) => ({ path, role: 'a trial file' }))), ...trialInputPaths(values)];
  if (!(await outputsApart('summarize', inputs, outputs, io))) return 2;

  const started = performance.now();
  const reporter = progressReporter(io, io.stderr.isTTY === true && !values.plain);
  // Ctrl+C and SIGTERM stop the study: what finished is written, the rest is named as not summarised.
  const stop = new AbortController();
  let stoppedBy: string | null = null;
  const listening = stopOnSignals((signal) => {
    stoppedBy = signal;
    stop.abort();
  });
  const outcomes = await runStudy(paths, {
    jobs,
    settings,
    ...(calibration !== undefined ? { calibration } : {}),
    ...(mapping !== undefined ? { mapping } : {}),
    ...(values.events !== undefined ? { eventsPath: values.events } : {}),
    sides,
    ...(manifest !== null ? { perTrial: manifest.rows.map((row) => rowSetup(row, manifest, mapping, optionSides)) } : {}),
    onEvent: reporter.onEvent,
    // The trials' own report sections are drawn for the trials' report; a study's report is drawn from its tables.
    drawReport: values.report !== undefined && manifest === null,
    describeInputs: tables.length > 0 || (manifest !== null && values.report !== undefined),
    signal: stop.signal,
  });
  reporter.end();
  const elapsedS = (performance.now() - started) / 1000;

  const summaries: SummaryJson[] = [];
  const trials: TableTrial[] = [];
  // For the report: each trial's place among the files given, and the sections its worker drew.
  const keys: number[] = [];
  const sections: (string | undefined)[] = [];
  const failed: string[] = [];
  let samples = 0;
  outcomes.forEach((o, i) => {
    if (o.ok) {
      summaries.push(o.summary);
      trials.push({ summary: o.summary, manifest: manifest?.rows[i] ?? null });
      keys.push(i + 1);
      sections.push(o.reportSections);
      samples += o.samples;
    } else failed.push(manifest !== null ? `${o.path} (row ${manifest.rows[i]?.row ?? '?'})` : o.path);
  });
  let status = failed.length > 0 ? 1 : 0;
  const workers = Math.min(jobs, outcomes.length);
  if (stoppedBy !== null) io.err(`lengthwise summarize: stopped by ${stoppedBy}: the ${manifest !== null ? 'tables hold' : 'table holds'} the ${summaries.length} trials finished before it`);
  io.err(
    `summarized ${summaries.length} of ${outcomes.length} trials in ${elapsedS.toFixed(1)} s (${rateText(samples / elapsedS)}, ${workers} worker${workers === 1 ? '' : 's'})` +
      (failed.length > 0 ? `; ${failed.length} failed: ${failed.join(', ')}` : ''),
  );

  const covariates = manifest !== null ? { covariates: manifest.covariates } : {};
  const csv = trialsCsv(trials, covariates);
  const studyReport = manifest !== null && values.report !== undefined;
  const provenance =
    tables.length > 0 || studyReport
      ? await studyProvenance({
          settings,
          settingsPath: values.settings,
          manifestPath: manifest?.path ?? null,
          calibrationPath: values.calibration,
          mappingPath: values.mapping,
          eventsPath: values.events,
          trials: outcomes.map((outcome, i) => ({ outcome, row: manifest?.rows[i] ?? null })),
        })
      : null;
  if (values.out === undefined) io.stdout.write(csv);
  else if (!(await writeTable(values.out, 'study table', csv, provenance as object, io))) status = 1;
  if (manifest !== null && (values.groups !== undefined || values.comparisons !== undefined || values.cycles !== undefined || studyReport)) {
    const { groupTables, cycleRows } = await import('../study/group-tables.ts');
    const { groupsCsv, comparisonsCsv, cyclesCsv } = await import('../study/study-tables-csv.ts');
    const conditions = [...new Set(manifest.rows.map((r) => r.condition))];
    const { groups, comparisons } = values.groups !== undefined || values.comparisons !== undefined || studyReport ? groupTables(trials, conditions, covariates) : { groups: [], comparisons: [] };
    const cycles = values.cycles !== undefined || studyReport ? cycleRows(trials, conditions) : [];
    if (values.groups !== undefined && !(await writeTable(values.groups, 'group table', groupsCsv(groups), provenance as object, io))) status = 1;
    if (values.comparisons !== undefined && !(await writeTable(values.comparisons, 'comparison table', comparisonsCsv(comparisons), provenance as object, io))) status = 1;
    if (values.cycles !== undefined && !(await writeTable(values.cycles, 'cycle table', cyclesCsv(cycles), provenance as object, io))) status = 1;
    if (studyReport && provenance !== null) {
      const [{ writeStudyReport }, { studyReportInput }] = await Promise.all([import('../report/write-study-report.ts'), import('../study/study-report-input.ts')]);
      const input = studyReportInput(trials, covariates, { groups, comparisons, cycles }, provenance, `lengthwise study report: ${manifest.path}`);
      const result = await writeStudyReport(values.report as string, input);
      if (result.ok) io.err(`report written to ${result.path}`);
      else {
        io.err(`lengthwise summarize: ${result.message}`);
        status = 1;
      }
    }
  }
  if (values.report !== undefined && manifest === null) {
    const { writeReport } = await import('../report/write-report.ts');
    const result = await writeReport(values.report, summaries, { title: `Study of ${summaries.length} trials`, keys, sections });
    if (result.ok) io.err(`report written to ${result.path}`);
    else {
      io.err(`lengthwise summarize: ${result.message}`);
      status = 1;
    }
  }
  listening();
  return status;
}
