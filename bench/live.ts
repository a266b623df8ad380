/**
 * Live latency over a real WebSocket on 127.0.0.1: a simulated device in its own process pushes
 * 4 muscles × 500 Hz to the tool's own server adapter (adapters/websocket-server.ts), which feeds
 * runTrial (the same pipeline as replays). For every message: the time from its send (just before
 * ws.send in the device process) to the updated state, an upper bound of receipt → state since it
 * also holds the loopback and the WebSocket framing; and the time from the adapter's output to the
 * updated state (decoding excluded). Measured without the dashboard, with it drawn on the main thread
 * into a fake terminal, and, in one session of alternating windows, without it and with it on its own
 * thread (as the commands run it) writing a file in place of the terminal; and what the screen of an
 * ended trial costs while it stays up.
 */
import { closeSync, mkdtempSync, openSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { register } from 'tsx/esm/api';
import { monitorEventLoopDelay } from 'node:perf_hooks';
import { tap } from 'rxjs';
import { websocketServer } from '../adapters/websocket-server.ts';
import { runTrial } from '../src/run/run-trial.ts';
import { median, quantile } from '../src/model/stats.ts';
import { createPrng } from '../src/sim/prng.ts';
import { BEGIN_SYNC, FakeStdin, FakeStdout } from './fake-terminal.ts';
import { benchScript } from './fresh-process.ts';
import type { DashboardHandle, DashboardOptions } from '../src/dashboard/thread/dashboard-options.ts';

/** Where the dashboard is drawn: nowhere, on the main thread, or on a thread of its own. */
export type DashboardMode = 'none' | 'main' | 'own';

export interface LatencyFigures {
  readonly messages: number;
  readonly samples: number;
  readonly samplesPerS: number;
  /** Device send → updated state, ms. */
  readonly sendToStateP50Ms: number;
  readonly sendToStateP99Ms: number;
  /** The same over the warm-up (the first warmupS seconds, left out of the figures above), ms. */
  readonly warmupP99Ms: number;
  readonly sendToStateMaxMs: number;
  /** Adapter output → updated state, ms. */
  readonly pipelineP50Ms: number;
  readonly pipelineP99Ms: number;
  /** Dashboard frames written (0 without the dashboard). */
  readonly frames: number;
  /** Frames per second of streaming. */
  readonly framesPerS: number;
  /** Writes to the terminal: each frame is one, between the synchronized-output brackets (two more). */
  readonly writes: number;
  /** Receiving process CPU time per second of streaming (ms/s): what the pipeline (and dashboard) cost. */
  readonly cpuMsPerS: number;
  /** Event-loop delay p99 (ms): how long the loop was kept from answering (renders, collections). */
  readonly loopDelayP99Ms: number;
}

export interface LiveResult {
  readonly rateHz: number;
  readonly muscles: number;
  readonly messageMs: number;
  readonly durationS: number;
  /** A bare WebSocket server that only parses each message: the floor of send → receipt here. */
  readonly bare: LatencyFigures;
  readonly plain: LatencyFigures;
  /** The dashboard on the main thread. */
  readonly dashboard: LatencyFigures;
  /** p99 with the dashboard on the main thread / p99 without (send → state), from separate sessions. */
  readonly dashboardP99Ratio: number;
  /** The dashboard on its own thread, as the commands run it, switched on and off within one session. */
  readonly switching: SwitchingFigures;
  /** The tool's p99 without the dashboard / the bare server's. */
  readonly plainToBareP99Ratio: number;
  /** The screen of an ended trial, on its own thread (and the other checkout's, when one is given). */
  readonly quiet: readonly QuietFigures[];
  /** With another checkout given: its dashboard and this one's taking turns in one switching session. */
  readonly turns?: SwitchingFigures;
  readonly lines: readonly string[];
}

interface SessionOptions {
  readonly rateHz: number;
  readonly muscles: number;
  readonly durationS: number;
  readonly messageMs: number;
  readonly dashboard: DashboardMode;
  /**
   * Messages of the first seconds are the warm-up, reported apart: code that runs once a stride (a few
   * times a second) is compiled to its fast form only after many strides, so early strides cost more.
   */
  readonly warmupS: number;
}

/** When a message's device time first showed on the receiving side, and its pipeline time (0 where none). */
type Seen = ReadonlyMap<number, { readonly ns: bigint; readonly pipelineNs: bigint }>;

/** Each sent message that was seen: seconds since the first send, send → seen (ms), pipeline time (ms). */
function perMessage(sent: { readonly sends: readonly [number, string][] }, seen: Seen): { sinceS: number; ms: number; pipelineMs: number }[] {
  const first = sent.sends[0]?.[0] ?? 0;
  const out: { sinceS: number; ms: number; pipelineMs: number }[] = [];
  for (const [t, ns] of sent.sends) {
    const got = seen.get(t);
    if (got !== undefined) out.push({ sinceS: t - first, ms: Number(got.ns - BigInt(ns)) / 1e6, pipelineMs: Number(got.pipelineNs) / 1e6 });
  }
  return out;
}

/** A session's latency figures: its messages after the warm-up, the warm-up's p99 apart. */
function latencyFigures(
  sent: { readonly samples: number; readonly sends: readonly [number, string][] },
  seen: Seen,
  options: SessionOptions,
  rest: Pick<LatencyFigures, 'frames' | 'writes' | 'loopDelayP99Ms'> & { readonly cpu: NodeJS.CpuUsage },
): LatencyFigures {
  const messages = perMessage(sent, seen);
  const after = messages.filter((m) => m.sinceS >= options.warmupS);
  const sendToState = after.map((m) => m.ms);
  const pipeline = after.map((m) => m.pipelineMs);
  const warmup = messages.filter((m) => m.sinceS < options.warmupS).map((m) => m.ms);
  return {
    messages: sendToState.length,
    samples: sent.samples,
    samplesPerS: sent.samples / options.durationS,
    sendToStateP50Ms: quantile(sendToState, 0.5),
    sendToStateP99Ms: quantile(sendToState, 0.99),
    warmupP99Ms: quantile(warmup, 0.99),
    sendToStateMaxMs: quantile(sendToState, 1),
    pipelineP50Ms: quantile(pipeline, 0.5),
    pipelineP99Ms: quantile(pipeline, 0.99),
    frames: rest.frames,
    framesPerS: rest.frames / options.durationS,
    writes: rest.writes,
    cpuMsPerS: (rest.cpu.user + rest.cpu.system) / 1000 / options.durationS,
    loopDelayP99Ms: rest.loopDelayP99Ms,
  };
}

/**
 * The floor of send → receipt on this machine: a bare `ws` server that only parses each message to find
 * its last device time, with no adapter, pipeline or state. The tool's p99 is read against it.
 */
async function bareSession(options: SessionOptions): Promise<LatencyFigures> {
  const { WebSocketServer } = await import('ws');
  const server = new WebSocketServer({ host: '127.0.0.1', port: 0 });
  await new Promise<void>((resolve) => server.once('listening', () => resolve()));
  const port = (server.address() as { port: number }).port;
  const seen = new Map<number, { ns: bigint; pipelineNs: bigint }>();
  server.on('connection', (ws) =>
    ws.on('message', (data) => {
      const now = process.hrtime.bigint();
      const records = JSON.parse(String(data)) as unknown;
      const last = Array.isArray(records) ? (records.at(-1) as { t?: unknown } | undefined) : undefined;
      if (typeof last?.t === 'number' && !seen.has(last.t)) seen.set(last.t, { ns: now, pipelineNs: 0n });
    }),
  );
  const cpu0 = process.cpuUsage();
  const sent = await sendFromDevice(port, options);
  const cpu = process.cpuUsage(cpu0);
  await new Promise<void>((resolve) => server.close(() => resolve()));
  return latencyFigures(sent, seen, options, { frames: 0, writes: 0, loopDelayP99Ms: Number.NaN, cpu });
}

/** Runs the simulated device against a server on `port` until it has sent its stream. */
async function sendFromDevice(port: number, options: SessionOptions): Promise<{ samples: number; sends: [number, string][] }> {
  const args = [`ws://127.0.0.1:${port}`, String(options.rateHz), String(options.muscles), String(options.durationS), String(options.messageMs)];
  return (await benchScript<{ samples: number; sends: [number, string][] }>('live-sender.ts', args)).result;
}

/** The tool's own server feeding runTrial, noting when each device time first shows in the state. */
async function startReceiver(): Promise<{
  readonly port: number;
  readonly run: ReturnType<typeof runTrial>;
  /** Device time of the newest record → the first moment a state showed it, with the pipeline time. */
  readonly seen: ReadonlyMap<number, { readonly ns: bigint; readonly pipelineNs: bigint }>;
  stop(): Promise<void>;
}> {
  let port = 0;
  let listening!: () => void;
  const ready = new Promise<void>((resolve) => (listening = resolve));
  let enteredNs = 0n;
  const source$ = websocketServer({
    port: 0,
    onLink: (event) => {
      if (event.kind === 'listening') {
        port = event.port;
        listening();
      }
    },
  }).pipe(tap(() => (enteredNs = process.hrtime.bigint())));
  const run = runTrial(source$, { source: 'bench-live' });
  const seen = new Map<number, { ns: bigint; pipelineNs: bigint }>();
  const subscription = run.state$.subscribe((state) => {
    const now = process.hrtime.bigint();
    if (!Number.isNaN(state.lastTS) && !seen.has(state.lastTS)) seen.set(state.lastTS, { ns: now, pipelineNs: now - enteredNs });
  });
  await ready;
  return {
    port,
    run,
    seen,
    async stop() {
      run.stop();
      await run.done;
      subscription.unsubscribe();
    },
  };
}

/** A stand-in terminal whose descriptor is a file, for the dashboard on its own thread; counts frames when closed. */
function fileTerminal(): { readonly stdout: FakeStdout; framesSoFar(): number; close(): number } {
  const stdout = new FakeStdout();
  const dir = mkdtempSync(join(tmpdir(), 'lengthwise-bench-screen-'));
  const path = join(dir, 'screen');
  stdout.fd = openSync(path, 'w');
  // Each frame on a terminal begins with the synchronized-output bracket.
  const framesSoFar = (): number => readFileSync(path, 'utf8').split(BEGIN_SYNC).length - 1;
  return {
    stdout,
    framesSoFar,
    close() {
      if (stdout.fd !== undefined) closeSync(stdout.fd);
      const frames = framesSoFar();
      rmSync(dir, { recursive: true, force: true });
      return frames;
    },
  };
}

/** A checkout's entry point of the dashboard (src/dashboard/thread/start-dashboard.tsx). */
export type StartDashboard = (options: DashboardOptions) => DashboardHandle;

/** A dashboard to draw in the on windows: this checkout's (start undefined) or another's. */
export interface ScreenUnderTest {
  readonly name: string;
  readonly start?: StartDashboard;
}

async function openDashboard(
  run: ReturnType<typeof runTrial>,
  stdout: FakeStdout,
  thread: 'main' | 'own',
  start?: StartDashboard,
): Promise<{ unmount(): void; waitUntilExit(): Promise<void> }> {
  // In colour, as on a 256-colour terminal, whatever this process's own output is: on the main thread the
  // colour library reads FORCE_COLOR when it loads (the screen's thread is told by the stand-in terminal).
  process.env['FORCE_COLOR'] ??= '2';
  const startDashboard = start ?? (await import('../src/dashboard/thread/start-dashboard.tsx')).startDashboard;
  return startDashboard({
    state$: run.state$,
    title: 'live bench',
    stdout: stdout as unknown as NodeJS.WriteStream,
    stdin: new FakeStdin() as unknown as NodeJS.ReadStream,
    env: {},
    onQuit: () => run.stop(),
    thread,
  });
}

async function session(options: SessionOptions): Promise<LatencyFigures> {
  const receiver = await startReceiver();
  const { run, seen } = receiver;
  let dashboard: { unmount(): void; waitUntilExit(): Promise<void> } | null = null;
  // The thread writes to a file descriptor: a file here, which costs this process nothing to read.
  const screen = options.dashboard === 'own' ? fileTerminal() : null;
  const stdout = screen?.stdout ?? new FakeStdout();
  if (options.dashboard !== 'none') dashboard = await openDashboard(run, stdout, options.dashboard);
  const delay = monitorEventLoopDelay({ resolution: 1 });
  delay.enable();
  const cpu0 = process.cpuUsage();
  const sent = await sendFromDevice(receiver.port, options);
  const cpu = process.cpuUsage(cpu0);
  delay.disable();
  dashboard?.unmount();
  await dashboard?.waitUntilExit();
  await receiver.stop();
  if (screen !== null) {
    stdout.frames = screen.close();
    stdout.writes = Number.NaN;
  }
  return latencyFigures(sent, seen, options, { frames: stdout.frames, writes: stdout.writes, loopDelayP99Ms: delay.percentile(99) / 1e6, cpu });
}

export interface SwitchingFigures {
  readonly windowS: number;
  readonly settleS: number;
  /** p99 (ms) of each window in order, off first: off, on, off, …, off. */
  readonly windowP99Ms: readonly number[];
  /** Messages counted in each window (those of its first settleS seconds left out). */
  readonly windowMessages: readonly number[];
  /** Each on window's p99 over the mean of its two neighbouring off windows' p99. */
  readonly onOffRatios: readonly number[];
  readonly onOffRatioMedian: number;
  /** Median over the on windows, and over the off windows, of their p99 (ms). */
  readonly onP99Ms: number;
  readonly offP99Ms: number;
  /** p99 (ms) of all the on windows' messages together, and of all the off windows'. */
  readonly pooledOnP99Ms: number;
  readonly pooledOffP99Ms: number;
  /** pooledOnP99Ms / pooledOffP99Ms: the figure read against the target. */
  readonly pooledRatio: number;
  /** 95% interval of pooledRatio, from resampling whole windows (seeded bootstrap, 1000 draws). */
  readonly pooledRatioInterval: readonly [number, number];
  readonly framesPerOnS: number;
  /** Median over the on windows, and over the off windows, of the process's CPU per second (ms/s), settled part only. */
  readonly onCpuMsPerS: number;
  readonly offCpuMsPerS: number;
  /** Each dashboard drawn in the on windows (they take turns when there are several). */
  readonly screens: readonly ScreenFigures[];
}

export interface ScreenFigures {
  readonly name: string;
  readonly windows: number;
  /** Median over its windows of the process's CPU per second above the mean of the two neighbouring off windows (ms/s). */
  readonly cpuAboveOffMsPerS: number;
  /** Median over its windows of the frames written per second (settled part). */
  readonly framesPerS: number;
  /** Median over its windows of the CPU above the off windows per frame written (ms). */
  readonly cpuMsPerFrame: number;
}

/**
 * The dashboard's effect on the p99 read in one session, so the machine's drift between sessions does
 * not swamp it: after the warm-up, windows of windowS alternate without the dashboard and with it on
 * its own thread (started at the window's start, unmounted at its end, as the commands run it),
 * beginning and ending without. Each window's first settleS seconds are left out: they hold the
 * thread's start (loading Ink and React) or its exit, which a session pays once. Each on window is read
 * against the mean of the off windows either side of it. With several screens (this checkout's and
 * another's), the on windows take turns: before and after in one session.
 */
async function switchingSession(
  options: SessionOptions & { readonly onWindows: number; readonly windowS: number; readonly settleS: number; readonly screens: readonly ScreenUnderTest[] },
): Promise<SwitchingFigures> {
  const windows = 2 * options.onWindows + 1;
  const receiver = await startReceiver();
  const screen = fileTerminal();
  const shown: { current: { unmount(): void; waitUntilExit(): Promise<void> } | null } = { current: null };
  const close = async (): Promise<void> => {
    const d = shown.current;
    shown.current = null;
    d?.unmount();
    await d?.waitUntilExit();
  };
  let switching = Promise.resolve();
  const timers: NodeJS.Timeout[] = [];
  let baseSet = false;
  /** Process CPU at each window's settled start and at its end (all threads: the screen's included). */
  const cpuFrom: NodeJS.CpuUsage[] = [];
  const cpuTo: NodeJS.CpuUsage[] = [];
  /** Frames written by then, at the same moments. */
  const framesFrom: number[] = [];
  const framesTo: number[] = [];
  /** Which screen the on window k shows. */
  const screenOf = (k: number): ScreenUnderTest | undefined => options.screens[Math.floor(k / 2) % options.screens.length];
  const arm = receiver.run.state$.subscribe((state) => {
    if (baseSet || Number.isNaN(state.lastTS)) return;
    baseSet = true;
    for (let k = 0; k < windows; k++) {
      const startMs = (options.warmupS + k * options.windowS) * 1000;
      timers.push(
        setTimeout(() => {
          cpuFrom[k] = process.cpuUsage();
          framesFrom[k] = screen.framesSoFar();
        }, startMs + options.settleS * 1000),
      );
      // Set before the switch due at the same moment, so it fires first.
      timers.push(
        setTimeout(() => {
          cpuTo[k] = process.cpuUsage();
          framesTo[k] = screen.framesSoFar();
        }, startMs + options.windowS * 1000),
      );
    }
    for (let k = 1; k < windows; k++) {
      const on = k % 2 === 1;
      timers.push(
        setTimeout(() => {
          switching = switching.then(async () => {
            if (on) shown.current = await openDashboard(receiver.run, screen.stdout, 'own', screenOf(k)?.start);
            else await close();
          });
        }, (options.warmupS + k * options.windowS) * 1000),
      );
    }
  });
  // A second past the last window, so its end is read before the stream stops (its messages are left out).
  const sent = await sendFromDevice(receiver.port, { ...options, durationS: options.warmupS + windows * options.windowS + 1 });
  for (const t of timers) clearTimeout(t);
  arm.unsubscribe();
  await switching;
  await close();
  await receiver.stop();
  const frames = screen.close();
  const byWindow: number[][] = Array.from({ length: windows }, () => []);
  for (const m of perMessage(sent, receiver.seen)) {
    const sinceS = m.sinceS - options.warmupS;
    if (sinceS < 0) continue;
    const k = Math.floor(sinceS / options.windowS);
    if (k >= windows || sinceS - k * options.windowS < options.settleS) continue;
    byWindow[k]?.push(m.ms);
  }
  const p99 = byWindow.map((w) => quantile(w, 0.99));
  const cpuMsPerS = byWindow.map((_, k) => {
    const from = cpuFrom[k];
    const to = cpuTo[k];
    if (from === undefined || to === undefined) return Number.NaN;
    return (to.user - from.user + to.system - from.system) / 1000 / (options.windowS - options.settleS);
  });
  const ratios: number[] = [];
  for (let k = 1; k < windows; k += 2) ratios.push((p99[k] as number) / (((p99[k - 1] as number) + (p99[k + 1] as number)) / 2));
  const settledS = options.windowS - options.settleS;
  const screens = options.screens.map((under): ScreenFigures => {
    const ks: number[] = [];
    for (let k = 1; k < windows; k += 2) if (screenOf(k) === under) ks.push(k);
    const above = ks.map((k) => (cpuMsPerS[k] as number) - ((cpuMsPerS[k - 1] as number) + (cpuMsPerS[k + 1] as number)) / 2);
    const fps = ks.map((k) => ((framesTo[k] ?? Number.NaN) - (framesFrom[k] ?? Number.NaN)) / settledS);
    return {
      name: under.name,
      windows: ks.length,
      cpuAboveOffMsPerS: median(above),
      framesPerS: median(fps),
      cpuMsPerFrame: median(above.map((a, i) => a / (fps[i] ?? Number.NaN))),
    };
  });
  const on = byWindow.filter((_, k) => k % 2 === 1);
  const off = byWindow.filter((_, k) => k % 2 === 0);
  const pooledP99 = (ws: readonly (readonly number[])[]): number => quantile(ws.flat(), 0.99);
  const pooledRatio = pooledP99(on) / pooledP99(off);
  // Windows, not messages, are resampled: messages close in time share the machine's moment.
  const prng = createPrng(2026);
  const draw = (ws: readonly (readonly number[])[]): (readonly number[])[] => ws.map(() => ws[Math.floor(prng.next() * ws.length)] ?? []);
  const draws: number[] = [];
  for (let i = 0; i < 1000; i++) draws.push(pooledP99(draw(on)) / pooledP99(draw(off)));
  return {
    windowS: options.windowS,
    settleS: options.settleS,
    windowP99Ms: p99,
    windowMessages: byWindow.map((w) => w.length),
    onOffRatios: ratios,
    onOffRatioMedian: median(ratios),
    onP99Ms: median(p99.filter((_, k) => k % 2 === 1)),
    offP99Ms: median(p99.filter((_, k) => k % 2 === 0)),
    framesPerOnS: frames / (options.onWindows * options.windowS),
    onCpuMsPerS: median(cpuMsPerS.filter((_, k) => k % 2 === 1)),
    offCpuMsPerS: median(cpuMsPerS.filter((_, k) => k % 2 === 0)),
    pooledOnP99Ms: pooledP99(on),
    pooledOffP99Ms: pooledP99(off),
    pooledRatio,
    pooledRatioInterval: [quantile(draws, 0.025), quantile(draws, 0.975)],
    screens,
  };
}

export interface QuietFigures {
  readonly name: string;
  readonly settleS: number;
  readonly windowS: number;
  /** The process's CPU per second over the window (ms/s): the screen's thread is all that runs. */
  readonly cpuMsPerS: number;
}

/**
 * The screen of a trial that has ended, left up as the commands leave it until q: after a short stream
 * the trial is stopped, the screen on its own thread is given settleS to show the end (the rate falls
 * to zero over its window), and then the process's CPU is read over windowS. Nothing else runs in the
 * process meanwhile, so this is what a screen that shows nothing new costs. (Frames written say
 * nothing here: Ink writes a screen only when it differs from the last, however often it draws one.)
 */
async function quietSession(options: SessionOptions & { readonly settleS: number; readonly windowS: number; readonly screen: ScreenUnderTest }): Promise<QuietFigures> {
  const receiver = await startReceiver();
  const screen = fileTerminal();
  const dashboard = await openDashboard(receiver.run, screen.stdout, 'own', options.screen.start);
  await sendFromDevice(receiver.port, options);
  await receiver.stop();
  await new Promise((resolve) => setTimeout(resolve, options.settleS * 1000));
  const cpu0 = process.cpuUsage();
  await new Promise((resolve) => setTimeout(resolve, options.windowS * 1000));
  const cpu = process.cpuUsage(cpu0);
  dashboard.unmount();
  await dashboard.waitUntilExit();
  screen.close();
  return { name: options.screen.name, settleS: options.settleS, windowS: options.windowS, cpuMsPerS: (cpu.user + cpu.system) / 1000 / options.windowS };
}

/** Each screen's CPU above the off windows, frames and CPU per frame. */
function screenLines(session: string, f: SwitchingFigures): string[] {
  return f.screens.map(
    (sc) =>
      `live ${session.padEnd(10)} ${sc.name}, ${sc.windows} windows: ${sc.cpuAboveOffMsPerS.toFixed(0)} ms/s of CPU above the off windows, ` +
      `${sc.framesPerS.toFixed(1)} frames/s, ${sc.cpuMsPerFrame.toFixed(1)} ms per frame (medians over its windows)`,
  );
}

function line(name: string, f: LatencyFigures): string {
  return (
    `live ${name.padEnd(10)} ${f.samplesPerS.toFixed(0)} samples/s in ${f.messages} messages: send → state p50 ${f.sendToStateP50Ms.toFixed(2)} ms, ` +
    `p99 ${f.sendToStateP99Ms.toFixed(2)} ms (max ${f.sendToStateMaxMs.toFixed(1)}; warm-up p99 ${f.warmupP99Ms.toFixed(2)}); pipeline p50 ${f.pipelineP50Ms.toFixed(3)} ms, p99 ${f.pipelineP99Ms.toFixed(3)} ms` +
    `; CPU ${f.cpuMsPerS.toFixed(0)} ms/s, event-loop delay p99 ${f.loopDelayP99Ms.toFixed(1)} ms` +
    (f.frames > 0 ? `; ${f.frames} frames (${f.framesPerS.toFixed(1)}/s)${Number.isNaN(f.writes) ? '' : ` in ${f.writes} writes`}` : '')
  );
}

/**
 * `against`: another checkout of lengthwise (see bench/README.md); its dashboard takes turns with this
 * one's in a second switching session. It is compiled with that checkout's settings and started through
 * that checkout's own entry point, so its thread loads its own code.
 */
export async function measureLive(options: { readonly quick: boolean; readonly against?: string }): Promise<LiveResult> {
  const base = { rateHz: 500, muscles: 4, messageMs: 10, durationS: options.quick ? 6 : 60, warmupS: options.quick ? 1 : 10 };
  const bare = await bareSession({ ...base, dashboard: 'none' });
  const plain = await session({ ...base, dashboard: 'none' });
  const dashboard = await session({ ...base, durationS: options.quick ? 6 : 30, dashboard: 'main' });
  const windows = { dashboard: 'own' as const, onWindows: options.quick ? 2 : 10, windowS: options.quick ? 3 : 10, settleS: options.quick ? 1 : 2 };
  const switching = await switchingSession({ ...base, ...windows, screens: [{ name: 'this checkout' }] });
  const quietOptions = { ...base, durationS: options.quick ? 3 : 5, warmupS: 0, dashboard: 'own' as const, settleS: 4, windowS: options.quick ? 5 : 15 };
  const quiet = [await quietSession({ ...quietOptions, screen: { name: 'this checkout' } })];
  let turns: SwitchingFigures | undefined;
  if (options.against !== undefined) {
    const against = resolve(options.against);
    const there = register({ namespace: 'live-bench-against', tsconfig: join(against, 'tsconfig.json') });
    const other = (await there.import(pathToFileURL(join(against, 'src/dashboard/thread/start-dashboard.tsx')).href, import.meta.url)) as { startDashboard: StartDashboard };
    turns = await switchingSession({ ...base, ...windows, screens: [{ name: 'this checkout' }, { name: against, start: other.startDashboard }] });
    quiet.push(await quietSession({ ...quietOptions, screen: { name: against, start: other.startDashboard } }));
  }
  const ratio = dashboard.sendToStateP99Ms / plain.sendToStateP99Ms;
  const adds = (r: number): string => `${((r - 1) * 100).toFixed(0)}%`;
  const toBare = plain.sendToStateP99Ms / bare.sendToStateP99Ms;
  const ms = (xs: readonly number[]): string => xs.map((x) => x.toFixed(2)).join(' ');
  return {
    ...base,
    bare,
    plain,
    plainToBareP99Ratio: toBare,
    dashboard,
    dashboardP99Ratio: ratio,
    switching,
    ...(turns === undefined ? {} : { turns }),
    quiet,
    lines: [
      `live bare       ${bare.samplesPerS.toFixed(0)} samples/s in ${bare.messages} messages: send → receipt and parse, p50 ${bare.sendToStateP50Ms.toFixed(2)} ms, p99 ${bare.sendToStateP99Ms.toFixed(2)} ms (max ${bare.sendToStateMaxMs.toFixed(1)}; warm-up p99 ${bare.warmupP99Ms.toFixed(2)}); CPU ${bare.cpuMsPerS.toFixed(0)} ms/s`,
      line('plain', plain),
      line('dash main', dashboard),
      `live the tool's p99 is ${toBare.toFixed(2)}× a bare WebSocket server's; the dashboard on the main thread adds ${adds(ratio)} to it (separate sessions)`,
      `live dash own   ${switching.windowS} s windows without/with the dashboard on its own thread (${switching.framesPerOnS.toFixed(1)} frames/s), ` +
        `first ${switching.settleS} s of each left out: p99 ${ms(switching.windowP99Ms)} ms; CPU ${switching.onCpuMsPerS.toFixed(0)} ms/s with it, ${switching.offCpuMsPerS.toFixed(0)} without`,
      `live dashboard on its own thread adds ${adds(switching.pooledRatio)} to the p99 (95% interval ${adds(switching.pooledRatioInterval[0])} to ${adds(switching.pooledRatioInterval[1])}): ` +
        `p99 ${switching.pooledOnP99Ms.toFixed(2)} ms with it, ${switching.pooledOffP99Ms.toFixed(2)} ms without, over all windows of each; ` +
        `window by window against its neighbours ${switching.onOffRatios.map((r) => r.toFixed(2)).join(' ')} (median ${switching.onOffRatioMedian.toFixed(2)})`,
      ...screenLines('dash own', switching),
      ...(turns === undefined ? [] : screenLines('dash turns', turns)),
      ...quiet.map((q) => `live quiet      the screen of an ended trial on its own thread, ${q.settleS} s after the end, over ${q.windowS} s: CPU ${q.cpuMsPerS.toFixed(1)} ms/s — ${q.name}`),
    ],
  };
}
