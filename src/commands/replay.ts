/** `lengthwise replay FILE`: play a recorded trial through the pipeline, with the dashboard or plain status lines. */
import { BehaviorSubject, interval, map, ReplaySubject, switchMap, take, tap, type Observable } from 'rxjs';
import type { CommandIo } from '../run/io.ts';
import { parseCommandArgs } from './parse-command-args.ts';
import { outputsApart, provenanceSources, sidesOption, TRIAL_FILE_OPTIONS, TRIAL_INPUT_OPTIONS, TRIAL_OUTPUT_OPTIONS, trialFiles, trialInputPaths, trialOutputPaths } from './option-files.ts';
import type { Batch } from '../trial/records.ts';
import { openTrial } from '../../adapters/trial-source.ts';
import { RejectionTally } from '../trial/rejection-tally.ts';
import { noUsableSample } from '../run/no-usable-sample.ts';
import { namesMissingFromTrial } from '../run/named-muscles.ts';
import { paceReplayWith, readAheadValve, type ReplaySpeed } from '../pipeline/pace-replay.ts';
import type { RunStatus } from '../trial/run-status.ts';
import { countLines } from './count-lines.ts';
import { applyCapture } from '../run/apply-capture.ts';
import { runTrial, type TrialRun } from '../run/run-trial.ts';
import type { TrialState } from '../trial/state.ts';
import { finishTrial, plainReport } from '../run/finish-trial.ts';
import { stopOnSignals } from '../run/stop-signals.ts';

const HELP = `usage: lengthwise replay FILE [options]

Plays a recorded trial (lengthwise-stream NDJSON, its CSV variant, a session log, a table or NDJSON
in your own columns and units, through a mapping, or a trial description joining several recordings)
through the pipeline. Options given here win over a trial description's own, with a note.

options:
  --speed N|max          play at N times recorded time (1 = real time), or as fast as possible  [default: 1]
  --settings FILE        processing settings (lengthwise-settings JSON; \`lengthwise settings\` prints the defaults)
  --calibration FILE     calibration JSON; wins over the stream header's calibration
  --mapping FILE         a file in your own columns, units or table layout (lengthwise-mapping JSON; see adapters/mappings/)
  --events FILE          gait events from another system (CSV, TSV or NDJSON), merged in time order
  --side NAME=left|right a muscle's side (repeatable); wins over the mapping and the stream header
  --summary FILE.json    write the per-stride and per-trial summary
  --strides FILE.csv     write one row per stride and muscle
  --report FILE.html     write a self-contained HTML report with plots of the trial
  --plain                plain status lines instead of the dashboard, even on a terminal
  -h, --help             this text

On a terminal the dashboard shows each muscle's operating region live (q quits and still writes the
summary); otherwise a status line every few seconds and a report at the end. Ctrl+C or SIGTERM stop it
as q does.`;

export type Speed = ReplaySpeed;

/** The speeds + and - step through on the dashboard. */
export const SPEED_STEPS: readonly Speed[] = [0.25, 0.5, 1, 2, 4, 8, 16, 'max'];

/** The next speed up (+1) or down (−1) from the current one; a speed between steps goes to the nearest step that way. */
export function stepSpeed(current: Speed, direction: 1 | -1): Speed {
  const value = (s: Speed): number => (s === 'max' ? Number.POSITIVE_INFINITY : s);
  const now = value(current);
  if (direction === 1) return SPEED_STEPS.find((s) => value(s) > now) ?? 'max';
  return [...SPEED_STEPS].reverse().find((s) => value(s) < now) ?? (SPEED_STEPS[0] as Speed);
}

/**
 * The speeds a replay plays at, from the moment `shown$` first says the screen is up: the trial's clock
 * starts there, so the screen shows the trial from its first second (loading the screen's thread takes
 * a while). paceReplayWith releases nothing before its first speed.
 */
export function speedOnceShown(shown$: Observable<unknown>, speed$: Observable<Speed>): Observable<Speed> {
  return shown$.pipe(
    take(1),
    switchMap(() => speed$),
  );
}

/** Reads `--speed`: a positive number or "max"; anything else is a message saying what is accepted. */
export function parseSpeed(text: string): { ok: true; speed: Speed } | { ok: false; message: string } {
  if (text === 'max') return { ok: true, speed: 'max' };
  const n = Number(text);
  if (text.trim() !== '' && Number.isFinite(n) && n > 0) return { ok: true, speed: n };
  return { ok: false, message: `--speed "${text}" is not a speed: give a positive number (1 = real time, 4 = four times faster) or "max"` };
}

export async function run(argv: string[], io: CommandIo): Promise<number> {
  const parsed = parseCommandArgs('replay', HELP, argv, {
    speed: { type: 'string', default: '1' },
    ...TRIAL_FILE_OPTIONS,
    ...TRIAL_INPUT_OPTIONS,
    ...TRIAL_OUTPUT_OPTIONS,
  }, io);
  if (typeof parsed === 'number') return parsed;
  const { values, positionals } = parsed;
  const [path, ...extra] = positionals;
  if (path === undefined || extra.length > 0) {
    io.err(`lengthwise replay: give exactly one trial file (got ${positionals.length}).\n\n${HELP}`);
    return 2;
  }
  const speed = parseSpeed(values.speed);
  if (!speed.ok) {
    io.err(`lengthwise replay: ${speed.message}`);
    return 2;
  }
  if (!(await outputsApart('replay', [{ path, role: 'the trial file' }, ...trialInputPaths(values)], trialOutputPaths(values), io))) return 2;
  const files = await trialFiles('replay', values, io);
  if (files === null) return 2;
  const sideOption = sidesOption('replay', files.mapping, values.side, io);
  if (sideOption === null) return 2;
  // A trial file, or a trial description (its files read and checked here, before anything plays).
  const opened = await openTrial(path, { calibration: files.calibration, mapping: files.mapping ?? null, eventsPath: values.events, sides: sideOption });
  if (!opened.ok) {
    io.err(`lengthwise replay: ${opened.message}`);
    return opened.status;
  }
  const { calibration, sides } = opened.trial;
  const described = opened.trial.files;
  if (described !== null) {
    const inputs = [...described.map((f) => ({ path: f.path, role: `a file of the trial description ${path}` })), ...trialInputPaths(values)];
    if (!(await outputsApart('replay', inputs, trialOutputPaths(values), io))) return 2;
  }
  const speed$ = new BehaviorSubject<Speed>(speed.speed);
  const useDashboard = io.stdout.isTTY === true && !values.plain;
  // With the dashboard, the trial plays from the moment its screen is up.
  const shown$ = new ReplaySubject<void>(1);
  const valve = readAheadValve();
  let lastLine = 0;
  const rejections = new RejectionTally();
  const records$: Observable<Batch> = opened.trial.records(valve.pause$).pipe(
    paceReplayWith(useDashboard ? speedOnceShown(shown$, speed$) : speed$, undefined, { onBacklog: valve.report }),
    tap((batch) => {
      for (const f of batch) {
        if (f.kind === 'rejection') rejections.add(f);
        else if (f.kind === 'sample' && f.line > lastLine) lastLine = f.line;
      }
    }),
  );
  const trial = runTrial(records$, { source: path, sides, settings: files.settings, ...(calibration !== undefined ? { calibration } : {}) });
  // Ctrl+C and SIGTERM stop the trial as q does, with or without a screen that takes keys.
  const stopped = new ReplaySubject<void>(1);
  const listening = stopOnSignals(() => {
    trial.stop();
    stopped.next();
  });
  try {
    const final = useDashboard
      ? await withDashboard(trial, path, io, {
          speed$,
          progress: opened.trial.spanS === null ? progressOf(path, () => lastLine) : progressInTime(opened.trial.spanS, trial),
          shown: () => shown$.next(),
          stopped$: stopped,
        })
      : await withStatusLines(trial, io);
    speed$.complete();
    if (!final.ok) {
      io.err(`lengthwise replay: ${final.message}`);
      return 1;
    }
    const nothing = noUsableSample(path, final.state, rejections);
    if (nothing !== null) {
      io.err(`lengthwise replay: ${nothing}`);
      return 1;
    }
    for (const warning of namesMissingFromTrial(final.state, { sides, calibration })) io.err(`warning: ${warning}`);
    return await finishTrial(
      final.state,
      {
        summary: values.summary,
        strides: values.strides,
        report: values.report,
        provenance: provenanceSources(files.settings, values, described ?? [{ kind: 'trial', path }]),
      },
      io,
    );
  } finally {
    listening();
  }
}

/** Fraction of the file's lines played so far (NaN until the line count is known). */
function progressOf(path: string, lastLine: () => number): () => number {
  let total = Number.NaN;
  void countLines(path).then((n) => (total = n));
  return () => (total > 0 ? Math.min(1, lastLine() / total) : Number.NaN);
}

/** Fraction of a trial description's joint time played so far (NaN before its first record). */
function progressInTime(span: { readonly firstS: number; readonly lastS: number }, trial: TrialRun): () => number {
  return () => Math.min(1, Math.max(0, (trial.latest().lastTS - span.firstS) / (span.lastS - span.firstS)));
}

type Final = { ok: true; state: TrialState } | { ok: false; message: string };

async function settle(trial: TrialRun): Promise<Final> {
  try {
    return { ok: true, state: await trial.done };
  } catch (error) {
    return { ok: false, message: error instanceof Error ? error.message : String(error) };
  }
}

async function withStatusLines(trial: TrialRun, io: CommandIo): Promise<Final> {
  const { statusLine } = await import('../output/status-line.ts');
  let latest: TrialState | null = null;
  const stateSub = trial.state$.subscribe((s) => (latest = s));
  const tick = interval(3000).subscribe(() => {
    if (latest !== null) io.err(statusLine(latest));
  });
  const final = await settle(trial);
  tick.unsubscribe();
  stateSub.unsubscribe();
  if (final.ok) io.out(plainReport(final.state));
  return final;
}

interface ReplayControls {
  readonly speed$: BehaviorSubject<Speed>;
  readonly progress: () => number;
  /** Called once the dashboard is drawn (or has failed to start). */
  readonly shown: () => void;
  /** Says when a signal stopped the replay: the dashboard closes without waiting for q. */
  readonly stopped$: Observable<void>;
}

async function withDashboard(trial: TrialRun, path: string, io: CommandIo, controls: ReplayControls): Promise<Final> {
  const { startDashboard } = await import('../dashboard/thread/start-dashboard.tsx');
  const message$ = new BehaviorSubject<string | undefined>(undefined);
  const status$: Observable<RunStatus> = interval(250).pipe(
    map(() => {
      const progress = controls.progress();
      return {
        sourceLabel: path,
        plausibleUm: trial.plausibleUm,
        replay: { progress: Number.isFinite(progress) ? progress : 0, speed: controls.speed$.value },
        message: message$.value,
      };
    }),
  );
  const dashboard = startDashboard({
    state$: trial.state$,
    status$,
    title: 'lengthwise replay',
    thread: 'own',
    stdout: io.stdout,
    stdin: io.stdin,
    env: io.env,
    onQuit: () => trial.stop(),
    onSpeed: (direction) => controls.speed$.next(stepSpeed(controls.speed$.value, direction)),
    onMarker: (text) => trial.inject([{ kind: 'marker', tS: trial.latest().lastTS, marker: text, line: 0 }]),
    onCalibrate: (muscle, sarcomereUm) => {
      void applyCapture(trial, muscle, sarcomereUm).then((text) => message$.next(text));
    },
  });
  void dashboard.shown.then(controls.shown);
  const closing = controls.stopped$.pipe(take(1)).subscribe(() => dashboard.unmount());
  const final = await settle(trial);
  // At the end of a replay the dashboard stays up until the user quits, so the last figures can be read.
  await dashboard.waitUntilExit();
  closing.unsubscribe();
  return final;
}
