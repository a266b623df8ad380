/** `lengthwise summarize FILES...`: many trials in parallel → one tidy study table. */
import type { CommandIo } from '../run/io.ts';
import { parseCommandArgs } from './parse-command-args.ts';
import { outputsApart, sidesOption, TRIAL_FILE_OPTIONS, TRIAL_INPUT_OPTIONS, trialFiles, trialInputPaths } from './option-files.ts';
import { writeFileAtomic } from '../output/write-file.ts';
import { defaultJobs, runStudy, type StudyEvent, type StudyProgress } from '../study/run-study.ts';
import { studyCsv } from '../study/study-csv.ts';
import { progressBar, progressFigures, rateText } from '../study/progress-line.ts';
import type { SummaryJson } from '../output/summary-json.ts';
import type { TrialOutcome } from '../study/summarize-trial.ts';
import { trialWarnings } from '../study/trial-warnings.ts';
import { stopOnSignals } from '../run/stop-signals.ts';

const HELP = `usage: lengthwise summarize FILES... [options]

Runs every trial file (lengthwise-stream NDJSON, its CSV variant, session logs, tables and NDJSON in
your own columns through a mapping, or trial descriptions joining several recordings) through the same
pipeline as replay, in parallel, and writes one study table: a row per trial and muscle, with the same
figures as each trial's --summary.

options:
  --out FILE.csv         write the study table here  [default: standard output]
  --report FILE.html     write one self-contained HTML report with plots of every trial and muscle
  --calibration FILE     calibration JSON for every trial; wins over each trial's header calibration
  --mapping FILE         trials in your own columns, units or table layout (lengthwise-mapping JSON)
  --events FILE          gait events from another system (CSV, TSV or NDJSON), merged into every trial
  --side NAME=left|right a muscle's side (repeatable); wins over the mapping and the stream headers
  --jobs N               trials summarized at once, one worker thread each  [default: ${defaultJobs()}, the cores]
  --plain                plain progress lines instead of a progress bar, even on a terminal
  -h, --help             this text

A file that cannot be read or has no valid sample is named with the reason and left out; the others
go on. Ctrl+C or SIGTERM stop the study: the trials finished so far are written. Exit status: 0 all
trials summarized, 1 some failed or were not summarized or a file could not be written, 2 usage.`;

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

export async function run(argv: string[], io: CommandIo): Promise<number> {
  const parsed = parseCommandArgs('summarize', HELP, argv, {
    out: { type: 'string' },
    report: { type: 'string' },
    ...TRIAL_FILE_OPTIONS,
    ...TRIAL_INPUT_OPTIONS,
    jobs: { type: 'string' },
    plain: { type: 'boolean', default: false },
  }, io);
  if (typeof parsed === 'number') return parsed;
  const { values, positionals } = parsed;
  if (positionals.length === 0) {
    io.err(`lengthwise summarize: give one or more trial files.\n\n${HELP}`);
    return 2;
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
  const outputs = [
    ...(values.out !== undefined ? [{ path: values.out, role: '--out' }] : []),
    ...(values.report !== undefined ? [{ path: values.report, role: '--report' }] : []),
  ];
  if (!(await outputsApart('summarize', [...positionals.map((path) => ({ path, role: 'a trial file' })), ...trialInputPaths(values)], outputs, io))) return 2;
  const files = await trialFiles('summarize', values, io);
  if (files === null) return 2;
  const { calibration, mapping } = files;
  const sides = sidesOption('summarize', mapping, values.side, io);
  if (sides === null) return 2;

  const started = performance.now();
  const reporter = progressReporter(io, io.stderr.isTTY === true && !values.plain);
  // Ctrl+C and SIGTERM stop the study: what finished is written, the rest is named as not summarised.
  const stop = new AbortController();
  let stoppedBy: string | null = null;
  const listening = stopOnSignals((signal) => {
    stoppedBy = signal;
    stop.abort();
  });
  const outcomes = await runStudy(positionals, {
    jobs,
    ...(calibration !== undefined ? { calibration } : {}),
    ...(mapping !== undefined ? { mapping } : {}),
    ...(values.events !== undefined ? { eventsPath: values.events } : {}),
    sides,
    onEvent: reporter.onEvent,
    drawReport: values.report !== undefined,
    signal: stop.signal,
  });
  reporter.end();
  const elapsedS = (performance.now() - started) / 1000;

  const summaries: SummaryJson[] = [];
  // For the report: each trial's place among the files given, and the sections its worker drew.
  const keys: number[] = [];
  const sections: (string | undefined)[] = [];
  const failed: string[] = [];
  let samples = 0;
  outcomes.forEach((o, i) => {
    if (o.ok) {
      summaries.push(o.summary);
      keys.push(i + 1);
      sections.push(o.reportSections);
      samples += o.samples;
    } else failed.push(o.path);
  });
  let status = failed.length > 0 ? 1 : 0;
  const workers = Math.min(jobs, outcomes.length);
  if (stoppedBy !== null) io.err(`lengthwise summarize: stopped by ${stoppedBy}: the table holds the ${summaries.length} trials finished before it`);
  io.err(
    `summarized ${summaries.length} of ${outcomes.length} trials in ${elapsedS.toFixed(1)} s (${rateText(samples / elapsedS)}, ${workers} worker${workers === 1 ? '' : 's'})` +
      (failed.length > 0 ? `; ${failed.length} failed: ${failed.join(', ')}` : ''),
  );

  const csv = studyCsv(summaries);
  if (values.out === undefined) io.stdout.write(csv);
  else {
    const result = await writeFileAtomic(values.out, csv);
    if (result.ok) io.err(`study table written to ${result.path}`);
    else {
      io.err(`lengthwise summarize: ${result.message}`);
      status = 1;
    }
  }
  if (values.report !== undefined) {
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
