/**
 * `lengthwise live`: ingest a live stream over WebSocket (as a client of the acquisition computer, or as
 * a server devices push to), run it through the same pipeline as a replay, show the dashboard or plain
 * status lines, keep the session log, and write the summary when the session ends (q, Ctrl+C, SIGTERM
 * or --duration).
 */
import { asyncScheduler, BehaviorSubject, merge, Subject, takeUntil, tap, timer, type Observable, type SchedulerLike, type Subscription } from 'rxjs';
import type { CommandIo } from '../run/io.ts';
import { parseCommandArgs } from './parse-command-args.ts';
import { lstat } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { basename, join } from 'node:path';
import { outputsApart, provenanceSources, TRIAL_FILE_OPTIONS, TRIAL_OUTPUT_OPTIONS, trialFiles, trialInputPaths, trialOutputPaths } from './option-files.ts';
import { isLoopbackHost, parseConnect, parseDuration, parseListen } from './option-values.ts';
import { applyCapture } from '../run/apply-capture.ts';
import type { Batch, Frame } from '../trial/records.ts';
import type { TrialState } from '../trial/state.ts';
import type { ConnectionStatus, RunStatus } from '../trial/run-status.ts';
import { unitHint, type DeviceMapping, mappedSides } from '../../adapters/device-mapping.ts';
import { websocketClient, type LinkEvent } from '../../adapters/websocket-client.ts';
import { redactUrl } from '../../adapters/redact-url.ts';
import { OLD_LINK_MARKER_PREFIX } from '../../adapters/old-link-marker.ts';
import { websocketServer } from '../../adapters/websocket-server.ts';
import { defaultLogPath, openSessionLog } from '../session-log/session-log.ts';
import { writeSessionLog } from '../session-log/write-session-log.ts';
import { watchLag } from '../session-log/watch-lag.ts';
import { runTrial, type TrialRun } from '../run/run-trial.ts';
import { finishTrial, plainReport } from '../run/finish-trial.ts';
import { stopOnSignals } from '../run/stop-signals.ts';

const HELP = `usage: lengthwise live --connect ws://HOST:PORT/PATH [options]
       lengthwise live --listen [HOST:]PORT [options]

Ingests a live fascicle stream over WebSocket and runs it through the same pipeline as a replay.

  --connect URL          connect to the acquisition computer's stream (ws:// or wss://); reconnects by
                         itself after a drop-out, each disconnection a gap in the data
  --listen [HOST:]PORT   be the server devices push to (several at once); binds 127.0.0.1 unless a host
                         is given (0.0.0.0: every interface; needs --token); PORT 0 picks a free port

options:
  --token T              --listen: refuse (401) a device without "Authorization: Bearer T" or ?token=T;
                         --connect: send that header
  --no-token             --listen on an address other machines reach, with no token, on purpose: any
                         machine that reaches the port can push data into the session (warned loudly)
  --settings FILE        processing settings (lengthwise-settings JSON; \`lengthwise settings\` prints the defaults)
  --mapping FILE         device field names and units (lengthwise-mapping JSON; see adapters/mappings/)
  --calibration FILE     calibration JSON; wins over the stream header's calibration
  --summary FILE.json    write the per-stride and per-trial summary at the end
                         [default: beside the session log, LOG.summary.json]
  --strides FILE.csv     write one row per stride and muscle at the end
  --report FILE.html     write the self-contained HTML report at the end
  --log FILE             the session log (every message received, valid or not; a replay file); never
                         an existing file  [default: sessions/<UTC date-time>Z.ndjson, a new name]
  --duration S           end by itself after S seconds
  --plain                plain status lines instead of the dashboard, even on a terminal
  -h, --help             this text

The session ends on q, Ctrl+C, SIGTERM or after --duration; the summary is always written and the log
closed. \`lengthwise replay LOG --speed max\` of the session log gives the same summary.
Exit status: 0 done, 1 the session log or an output could not be written in full, 2 a usage error.`;

/** The connection as the screen shows it; `connectedBefore`: a connection was made once this session. */
function connectionOf(event: LinkEvent, open: number, connectedBefore: boolean): ConnectionStatus | undefined {
  switch (event.kind) {
    case 'connecting':
      if (event.attempt !== 0) return undefined;
      return connectedBefore ? { state: 'reconnecting', detail: `connecting to ${event.url}` } : { state: 'connecting', detail: `connecting to ${event.url}` };
    case 'retrying':
      return { state: connectedBefore ? 'reconnecting' : 'connecting', retryInS: event.inMs / 1000, detail: event.detail };
    case 'connected':
      return { state: 'connected', detail: open > 1 ? `${open} devices` : event.peer };
    case 'disconnected':
      // A client says 'retrying' at once after this; a server waits for its devices again.
      return open > 0 ? { state: 'connected', detail: `${open} device${open > 1 ? 's' : ''}` } : { state: 'listening', detail: `no device now (${event.detail})` };
    case 'listening':
      return { state: 'listening', detail: event.url };
    case 'refused':
    case 'conflict':
      return undefined;
  }
}

function linkText(event: LinkEvent, connectedBefore: boolean): string | null {
  switch (event.kind) {
    case 'connecting':
      return event.attempt === 0 ? `connecting to ${event.url}` : null;
    case 'connected':
      return `connected (${event.peer})`;
    case 'disconnected':
      return `DISCONNECTED: ${event.detail}`;
    case 'retrying':
      if (!(event.attempt === 0 || event.attempt % 5 === 0)) return null;
      return connectedBefore
        ? `reconnecting in ${(event.inMs / 1000).toFixed(1)} s (${event.detail})`
        : `not connected: ${event.detail}; trying again in ${(event.inMs / 1000).toFixed(1)} s`;
    case 'listening':
      return `listening on ${event.url}`;
    case 'refused':
      return `refused a connection from ${event.peer}: ${event.detail}`;
    case 'conflict':
      return event.detail;
  }
}

/** How long the end of a session waits for the dashboard to give the terminal back. */
const SCREEN_EXIT_WAIT_MS = 1000;

export interface LiveRunOptions {
  /** Clock of --duration and the plain status lines. @default asyncScheduler */
  readonly scheduler?: SchedulerLike;
}

export async function run(argv: string[], io: CommandIo, options: LiveRunOptions = {}): Promise<number> {
  const parsed = parseCommandArgs('live', HELP, argv, {
    connect: { type: 'string' },
    listen: { type: 'string' },
    token: { type: 'string' },
    'no-token': { type: 'boolean', default: false },
    ...TRIAL_FILE_OPTIONS,
    ...TRIAL_OUTPUT_OPTIONS,
    log: { type: 'string' },
    duration: { type: 'string' },
  }, io, { allowPositionals: false });
  if (typeof parsed === 'number') return parsed;
  const { values } = parsed;
  if ((values.connect === undefined) === (values.listen === undefined)) {
    io.err(`lengthwise live: give either --connect URL or --listen [HOST:]PORT (exactly one).\n\n${HELP}`);
    return 2;
  }
  const connect = values.connect !== undefined ? parseConnect(values.connect) : null;
  const listen = values.listen !== undefined ? parseListen(values.listen) : null;
  const duration = values.duration !== undefined ? parseDuration(values.duration) : null;
  for (const p of [connect, listen, duration]) {
    if (p !== null && !p.ok) {
      io.err(`lengthwise live: ${p.message}`);
      return 2;
    }
  }
  if (values.token !== undefined && values.token.length === 0) {
    io.err('lengthwise live: --token is empty: give the token the devices send');
    return 2;
  }
  const openListen = openListenProblem(listen !== null && listen.ok ? listen.value : null, values.token, values['no-token']);
  if (openListen.refused !== null) {
    io.err(`lengthwise live: ${openListen.refused}`);
    return 2;
  }
  if (openListen.warning !== null) io.err(`lengthwise live: ${openListen.warning}`);
  if (values.log !== undefined && (await lstat(values.log).then(() => true, () => false))) {
    io.err(`lengthwise live: the session log ${values.log} exists already, and a session log is never appended to: give --log a new name, or leave --log out for a new sessions/<date-time>Z.ndjson`);
    return 2;
  }
  const logInput = values.log !== undefined ? [{ path: values.log, role: 'the session log (--log)' }] : [];
  const besideLog = values.log !== undefined && values.summary === undefined ? [{ path: summaryPathFor(values.log), role: 'the summary beside the session log' }] : [];
  if (!(await outputsApart('live', [...trialInputPaths(values), ...logInput], [...trialOutputPaths(values), ...besideLog], io))) return 2;
  const files = await trialFiles('live', values, io);
  if (files === null) return 2;
  const calibration = files.calibration;
  const mapping = files.mapping ?? null;
  const settings = files.settings;
  const deviceBounds = { maxMuscles: settings.max_muscles_per_trial, clockResetMinS: settings.clock_reset_min_s };

  const session = new LiveSession(io, values.plain || io.stdout.isTTY !== true, options.scheduler ?? asyncScheduler);
  const log = openSessionLog({
    path: values.log ?? defaultLogPath(process.cwd(), Date.now()),
    // Two sessions started in the same second never share a default name.
    nextFreeName: values.log === undefined,
    onProblem: (message) => session.logProblem(message),
  });
  const logPath = log.path;
  if (!log.complete && log.problem !== null) session.logProblem(log.problem);

  let label: string;
  let source$: Observable<Batch>;
  const onLink = (event: LinkEvent): void => session.link(event);
  if (connect !== null && connect.ok) {
    // What is shown and written (summary source, report, screen, messages): the address with a token in it hidden.
    label = redactUrl(connect.value);
    source$ = websocketClient({
      url: connect.value,
      mapping,
      ...deviceBounds,
      onLink,
      ...(values.token !== undefined ? { headers: { Authorization: `Bearer ${values.token}` } } : {}),
    });
  } else if (listen !== null && listen.ok) {
    label = `ws://${listen.value.host.includes(':') ? `[${listen.value.host}]` : listen.value.host}:${listen.value.port}`;
    source$ = websocketServer({
      host: listen.value.host,
      port: listen.value.port,
      mapping,
      ...deviceBounds,
      onLink,
      ...(values.token !== undefined ? { token: values.token } : {}),
    });
  } else {
    return 2;
  }
  session.status({ sourceLabel: label, logPath, ...(openListen.warning !== null ? { message: openListen.warning } : {}) });

  const records$ = merge(source$, session.extra$).pipe(
    writeSessionLog(log),
    tap((batch) => session.watchUnits(batch, mapping)),
    tap((batch) => session.watchClocks(batch)),
    takeUntil(session.stop$),
  );
  const trial = runTrial(records$, { source: label, sides: mappedSides(mapping), settings, ...(calibration !== undefined ? { calibration } : {}) });
  session.status({ plausibleUm: trial.plausibleUm });
  const final = await session.run(trial, label, duration !== null && duration.ok ? duration.value : null, () => log.flush());
  log.close();
  if (!log.complete && log.problem !== null) session.logProblem(log.problem);
  if (!final.ok) {
    io.err(`lengthwise live: ${final.message}`);
    io.err(`session log: ${log.path} (${log.linesWritten} lines${log.complete ? '' : ', INCOMPLETE'})`);
    return 1;
  }
  if (session.plain) io.out(plainReport(final.state));
  for (const hint of session.hints) io.err(`note: ${hint}`);
  // A live session cannot be run again: its summary is always written, beside the log when not asked
  // for, and in the system's temporary folder should its own place fail.
  const summary = values.summary ?? summaryPathFor(log.path);
  const summaryFallback = join(tmpdir(), `${basename(summary).replace(/\.json$/, '')}-${process.pid}.json`);
  const provenance = provenanceSources(settings, values, [{ kind: 'session_log', path: log.path }]);
  const status = await finishTrial(final.state, { summary, strides: values.strides, report: values.report, summaryFallback, provenance }, io);
  io.err(`session log: ${log.path} (${log.linesWritten} lines${log.complete ? '' : `, INCOMPLETE: ${log.problem ?? ''}`})`);
  if (openListen.warning !== null) io.err(`lengthwise live: ${openListen.warning}`);
  // An incomplete log is an output not written in full.
  return log.complete ? status : 1;
}

/**
 * Listening where other machines reach, with no token, is refused unless --no-token says it is meant;
 * then it is a warning, said at the start and at the end. --no-token with anything else is refused.
 */
export function openListenProblem(
  listen: { readonly host: string; readonly port: number } | null,
  token: string | undefined,
  noToken: boolean,
): { readonly refused: string | null; readonly warning: string | null } {
  if (noToken && token !== undefined) return { refused: 'give --token T or --no-token, not both', warning: null };
  if (noToken && listen === null) return { refused: '--no-token is for --listen (with --connect, give --token T when the server asks for one)', warning: null };
  if (listen === null || token !== undefined || isLoopbackHost(listen.host)) return { refused: null, warning: null };
  const where = `${listen.host.includes(':') ? `[${listen.host}]` : listen.host}:${listen.port}`;
  if (!noToken) {
    return {
      refused:
        `--listen ${where} lets other machines connect, and no --token is given, so any of them could push data into the session. ` +
        'Give --token T (each device then sends "Authorization: Bearer T" or ?token=T), listen on 127.0.0.1 (the default: --listen PORT), ' +
        'or give --no-token to listen with no token on purpose',
      warning: null,
    };
  }
  return { refused: null, warning: `WARNING: listening on ${where} with NO TOKEN (--no-token): any machine that reaches this port can push data into the session` };
}

/** The summary written beside a session log when --summary is not given: LOG.summary.json. */
export function summaryPathFor(logPath: string): string {
  return `${logPath.replace(/\.ndjson$/, '')}.summary.json`;
}

type Final = { ok: true; state: TrialState } | { ok: false; message: string };

/** The command's running parts: status for the screen, extra frames, the ways a session ends. */
class LiveSession {
  readonly extra$ = new Subject<Batch>();
  readonly stop$ = new Subject<void>();
  readonly hints: string[] = [];
  private readonly status$ = new BehaviorSubject<RunStatus>({});
  private readonly hinted = new Set<string>();
  private open = 0;
  private connectedBefore = false;
  /** The first link line (connecting to…, listening on…) is said at once, before the screen is up. */
  private saidFirstLink = false;
  private logNoticeSent = false;
  private logMessage: string | null = null;
  private stopped = false;
  private latest: TrialState | null = null;

  constructor(
    private readonly io: CommandIo,
    readonly plain: boolean,
    private readonly scheduler: SchedulerLike,
  ) {}

  status(next: RunStatus): void {
    this.status$.next({ ...this.status$.getValue(), ...next });
  }

  say(text: string): void {
    if (this.plain) this.io.err(text);
    else this.status({ message: text });
  }

  link(event: LinkEvent): void {
    if (event.kind === 'connected') this.open++;
    if (event.kind === 'disconnected') this.open = Math.max(0, this.open - 1);
    if (event.kind === 'listening') this.status({ sourceLabel: event.url });
    const connection = connectionOf(event, this.open, this.connectedBefore);
    const text = linkText(event, this.connectedBefore);
    if (event.kind === 'connected') this.connectedBefore = true;
    if (connection !== undefined && !this.stopped) this.status({ connection });
    const first = !this.saidFirstLink && (event.kind === 'connecting' || event.kind === 'listening');
    if (first) this.saidFirstLink = true;
    if (text !== null && (this.plain || first)) this.io.err(first && !this.plain ? `lengthwise live: ${text}` : text);
    if (event.kind === 'conflict') {
      // On the screen now, and again among the notes at the end.
      if (!this.plain) this.status({ message: event.detail });
      this.hints.push(event.detail);
    }
  }

  /** The log stopped being complete: said loudly now, and once in the trial's warnings (the summary). */
  logProblem(message: string): void {
    if (this.logMessage === null) this.io.err(`lengthwise live: ${message}`);
    this.logMessage = message;
    this.status({ message: 'SESSION LOG INCOMPLETE (see the end of the session)' });
    // Never from inside a batch on its way: the notice goes in once the current batch has passed.
    queueMicrotask(() => this.sendLogNotice());
  }

  private sendLogNotice(): void {
    if (this.logNoticeSent || this.logMessage === null || this.stopped) return;
    this.logNoticeSent = true;
    this.extra$.next([{ kind: 'notice', muscle: null, text: `the session log is incomplete: ${this.logMessage}` }]);
  }

  watchUnits(batch: Batch, mapping: DeviceMapping | null): void {
    for (const f of batch) {
      if (f.kind !== 'sample' || this.hinted.has(f.muscle)) continue;
      this.hinted.add(f.muscle);
      const hint = unitHint(f, mapping);
      if (hint === null) continue;
      this.hints.push(hint);
      this.io.err(`lengthwise live: ${hint}`);
      this.status({ message: hint });
    }
  }

  /** A device whose clock restarted is said once, when its connection says so. */
  watchClocks(batch: Batch): void {
    for (const f of batch) {
      if (f.kind === 'clock_reset') this.say(`device clock restarted: ${f.detail}; its times go on shifted by ${f.offsetS} s (kept so in the session log)`);
    }
  }

  private marker(text: string): void {
    const tS = this.latest !== null && Number.isFinite(this.latest.lastTS) ? this.latest.lastTS : 0;
    // A marker with the old link text would be read back from the log as a lost connection.
    const marker = text.startsWith(OLD_LINK_MARKER_PREFIX) ? `(typed) ${text}` : text;
    const frame: Frame = { kind: 'marker', tS, marker, line: 0 };
    this.extra$.next([frame]);
  }

  async run(trial: TrialRun, label: string, durationS: number | null, flushLog: () => void): Promise<Final> {
    const subscriptions: Subscription[] = [];
    subscriptions.push(trial.state$.subscribe((s) => (this.latest = s)));
    // A log that failed before the trial started is in the summary too.
    this.sendLogNotice();
    const stop = (): void => {
      if (this.stopped) return;
      // Everything received is in the file, and a failure to write it is in the summary.
      flushLog();
      this.sendLogNotice();
      this.stopped = true;
      this.status({ connection: { state: 'ended' } });
      this.stop$.next();
    };
    const listening = stopOnSignals(stop);
    if (durationS !== null) subscriptions.push(timer(durationS * 1000, this.scheduler).subscribe(stop));
    subscriptions.push(
      watchLag({
        onLag: (lagMs) =>
          this.say(
            lagMs > 0
              ? `processing fell behind by ${(lagMs / 1000).toFixed(1)} s: messages wait in the socket's buffer (none is dropped)`
              : 'processing caught up',
          ),
      }),
    );
    let dashboard: { unmount(): void; waitUntilExit(): Promise<void> } | null = null;
    if (this.plain) {
      const { statusLine } = await import('../output/status-line.ts');
      subscriptions.push(
        timer(3000, 3000, this.scheduler).subscribe(() => {
          if (this.latest !== null) this.io.err(statusLine(this.latest, this.status$.getValue()));
        }),
      );
    } else {
      const { startDashboard } = await import('../dashboard/thread/start-dashboard.tsx');
      dashboard = startDashboard({
        state$: trial.state$,
        status$: this.status$,
        title: `live ${label}`,
        thread: 'own',
        stdout: this.io.stdout,
        stdin: this.io.stdin,
        env: this.io.env,
        onQuit: stop,
        onMarker: (text) => this.marker(text),
        onCalibrate: (muscle, sarcomereUm) => {
          void applyCapture(trial, muscle, sarcomereUm).then((text) => {
            this.status({ message: text });
            // The log keeps a note of it; a replay of the log takes the saved file with --calibration.
            this.marker(`calibration captured: ${text}`);
          });
        },
      });
    }
    let final: Final;
    try {
      final = { ok: true, state: await trial.done };
    } catch (error) {
      final = { ok: false, message: error instanceof Error ? error.message : String(error) };
    }
    this.stopped = true;
    listening();
    for (const s of subscriptions) s.unsubscribe();
    if (dashboard !== null) {
      dashboard.unmount();
      // The screen is given back before the closing lines are written under it; a screen thread that does
      // not answer within a second is not waited for.
      await Promise.race([dashboard.waitUntilExit(), new Promise((resolve) => setTimeout(resolve, SCREEN_EXIT_WAIT_MS).unref())]);
    }
    this.extra$.complete();
    return final;
  }
}
