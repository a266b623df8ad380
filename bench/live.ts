/**
 * Live latency over a real WebSocket on 127.0.0.1: a simulated device in its own process pushes
 * 4 muscles × 500 Hz to the tool's own server adapter (adapters/websocket-server.ts), which feeds
 * runTrial (the same pipeline as replays). For every message: the time from its send (just before
 * ws.send in the device process) to the updated state, an upper bound of receipt → state since it
 * also holds the loopback and the WebSocket framing; and the time from the adapter's output to the
 * updated state (decoding excluded). Measured without the dashboard, with it drawn on the main thread
 * into a fake terminal, and with it on its own thread (as the commands run it) writing a file in
 * place of the terminal, each at its own frame rate.
 */
import { execFile } from 'node:child_process';
import { closeSync, mkdtempSync, openSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { monitorEventLoopDelay } from 'node:perf_hooks';
import { tap } from 'rxjs';
import { websocketServer } from '../adapters/websocket-server.ts';
import { runTrial } from '../src/run-trial.ts';
import { quantile } from './stats.ts';
import { BEGIN_SYNC, FakeStdin, FakeStdout } from './fake-terminal.ts';

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
  /** The dashboard on its own thread, as the commands run it. */
  readonly dashboardThread: LatencyFigures;
  /** p99 with the dashboard on the main thread / p99 without (send → state). */
  readonly dashboardP99Ratio: number;
  /** p99 with the dashboard on its own thread / p99 without. */
  readonly dashboardThreadP99Ratio: number;
  /** The tool's p99 without the dashboard / the bare server's. */
  readonly plainToBareP99Ratio: number;
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

const here = dirname(fileURLToPath(import.meta.url));

/**
 * The floor of send → receipt on this machine: a bare `ws` server that only parses each message to find
 * its last device time, with no adapter, pipeline or state. The tool's p99 is read against it.
 */
async function bareSession(options: SessionOptions): Promise<LatencyFigures> {
  const { WebSocketServer } = await import('ws');
  const server = new WebSocketServer({ host: '127.0.0.1', port: 0 });
  await new Promise<void>((resolve) => server.once('listening', () => resolve()));
  const port = (server.address() as { port: number }).port;
  const seen = new Map<number, bigint>();
  server.on('connection', (ws) =>
    ws.on('message', (data) => {
      const now = process.hrtime.bigint();
      const records = JSON.parse(String(data)) as unknown;
      const last = Array.isArray(records) ? (records.at(-1) as { t?: unknown } | undefined) : undefined;
      if (typeof last?.t === 'number' && !seen.has(last.t)) seen.set(last.t, now);
    }),
  );
  const cpu0 = process.cpuUsage();
  const sent = await sendFromDevice(port, options);
  const cpu = process.cpuUsage(cpu0);
  await new Promise<void>((resolve) => server.close(() => resolve()));
  const latencies: number[] = [];
  const warmup: number[] = [];
  const first = sent.sends[0]?.[0] ?? 0;
  for (const [t, ns] of sent.sends) {
    const got = seen.get(t);
    if (got !== undefined) (t - first < options.warmupS ? warmup : latencies).push(Number(got - BigInt(ns)) / 1e6);
  }
  return {
    messages: latencies.length,
    samples: sent.samples,
    samplesPerS: sent.samples / options.durationS,
    sendToStateP50Ms: quantile(latencies, 0.5),
    sendToStateP99Ms: quantile(latencies, 0.99),
    warmupP99Ms: quantile(warmup, 0.99),
    sendToStateMaxMs: quantile(latencies, 1),
    pipelineP50Ms: 0,
    pipelineP99Ms: 0,
    frames: 0,
    framesPerS: 0,
    writes: 0,
    cpuMsPerS: (cpu.user + cpu.system) / 1000 / options.durationS,
    loopDelayP99Ms: Number.NaN,
  };
}

/** Runs the simulated device against a server on `port` until it has sent its stream. */
function sendFromDevice(port: number, options: SessionOptions): Promise<{ samples: number; sends: [number, string][] }> {
  return new Promise((resolve, reject) => {
    execFile(
      process.execPath,
      [
        join(here, '../bin/run-ts.js'),
        join(here, 'live-sender.ts'),
        `ws://127.0.0.1:${port}`,
        String(options.rateHz),
        String(options.muscles),
        String(options.durationS),
        String(options.messageMs),
      ],
      { maxBuffer: 64 * 1024 * 1024 },
      (error, stdoutText) => {
        if (error !== null) reject(error);
        else resolve(JSON.parse(stdoutText.trim().split('\n').pop() ?? '{}') as { samples: number; sends: [number, string][] });
      },
    );
  });
}

async function session(options: SessionOptions): Promise<LatencyFigures> {
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
  /** Device time of the newest record → the first moment a state showed it, with the pipeline time. */
  const seen = new Map<number, { ns: bigint; pipelineNs: bigint }>();
  const subscription = run.state$.subscribe((state) => {
    const now = process.hrtime.bigint();
    if (!Number.isNaN(state.lastTS) && !seen.has(state.lastTS)) seen.set(state.lastTS, { ns: now, pipelineNs: now - enteredNs });
  });
  let dashboard: { unmount(): void; waitUntilExit(): Promise<void> } | null = null;
  const stdout = new FakeStdout();
  // The thread writes to a file descriptor: a file here, which costs this process nothing to read.
  const screenDir = options.dashboard === 'own' ? mkdtempSync(join(tmpdir(), 'lengthwise-bench-screen-')) : null;
  const screenPath = screenDir === null ? null : join(screenDir, 'screen');
  if (screenPath !== null) stdout.fd = openSync(screenPath, 'w');
  if (options.dashboard !== 'none') {
    const { startDashboard } = await import('../src/dashboard/start-dashboard.tsx');
    dashboard = startDashboard({
      state$: run.state$,
      title: 'live bench',
      stdout: stdout as unknown as NodeJS.WriteStream,
      stdin: new FakeStdin() as unknown as NodeJS.ReadStream,
      env: {},
      onQuit: () => run.stop(),
      thread: options.dashboard === 'own' ? 'own' : 'main',
    });
  }
  await ready;
  const delay = monitorEventLoopDelay({ resolution: 1 });
  delay.enable();
  const cpu0 = process.cpuUsage();
  const sent = await sendFromDevice(port, options);
  const cpu = process.cpuUsage(cpu0);
  delay.disable();
  dashboard?.unmount();
  await dashboard?.waitUntilExit();
  run.stop();
  await run.done;
  subscription.unsubscribe();
  if (screenPath !== null && screenDir !== null && stdout.fd !== undefined) {
    closeSync(stdout.fd);
    // Each frame on a terminal begins with the synchronized-output bracket.
    stdout.frames = readFileSync(screenPath, 'utf8').split(BEGIN_SYNC).length - 1;
    stdout.writes = Number.NaN;
    rmSync(screenDir, { recursive: true, force: true });
  }
  const sendToState: number[] = [];
  const pipeline: number[] = [];
  const first = sent.sends[0]?.[0] ?? 0;
  const warmup: number[] = [];
  for (const [t, ns] of sent.sends) {
    const got = seen.get(t);
    if (got === undefined) continue;
    if (t - first < options.warmupS) {
      warmup.push(Number(got.ns - BigInt(ns)) / 1e6);
      continue;
    }
    sendToState.push(Number(got.ns - BigInt(ns)) / 1e6);
    pipeline.push(Number(got.pipelineNs) / 1e6);
  }
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
    frames: stdout.frames,
    framesPerS: stdout.frames / options.durationS,
    writes: stdout.writes,
    cpuMsPerS: (cpu.user + cpu.system) / 1000 / options.durationS,
    loopDelayP99Ms: delay.percentile(99) / 1e6,
  };
}

function line(name: string, f: LatencyFigures): string {
  return (
    `live ${name.padEnd(10)} ${f.samplesPerS.toFixed(0)} samples/s in ${f.messages} messages: send → state p50 ${f.sendToStateP50Ms.toFixed(2)} ms, ` +
    `p99 ${f.sendToStateP99Ms.toFixed(2)} ms (max ${f.sendToStateMaxMs.toFixed(1)}; warm-up p99 ${f.warmupP99Ms.toFixed(2)}); pipeline p50 ${f.pipelineP50Ms.toFixed(3)} ms, p99 ${f.pipelineP99Ms.toFixed(3)} ms` +
    `; CPU ${f.cpuMsPerS.toFixed(0)} ms/s, event-loop delay p99 ${f.loopDelayP99Ms.toFixed(1)} ms` +
    (f.frames > 0 ? `; ${f.frames} frames (${f.framesPerS.toFixed(1)}/s)${Number.isNaN(f.writes) ? '' : ` in ${f.writes} writes`}` : '')
  );
}

export async function measureLive(options: { readonly quick: boolean }): Promise<LiveResult> {
  const base = { rateHz: 500, muscles: 4, messageMs: 10, durationS: options.quick ? 6 : 60, warmupS: options.quick ? 1 : 10 };
  const bare = await bareSession({ ...base, dashboard: 'none' });
  const plain = await session({ ...base, dashboard: 'none' });
  const dashboard = await session({ ...base, dashboard: 'main' });
  const dashboardThread = await session({ ...base, dashboard: 'own' });
  const ratio = dashboard.sendToStateP99Ms / plain.sendToStateP99Ms;
  const threadRatio = dashboardThread.sendToStateP99Ms / plain.sendToStateP99Ms;
  const adds = (r: number): string => `${((r - 1) * 100).toFixed(0)}%`;
  const toBare = plain.sendToStateP99Ms / bare.sendToStateP99Ms;
  return {
    ...base,
    bare,
    plain,
    plainToBareP99Ratio: toBare,
    dashboard,
    dashboardThread,
    dashboardP99Ratio: ratio,
    dashboardThreadP99Ratio: threadRatio,
    lines: [
      `live bare       ${bare.samplesPerS.toFixed(0)} samples/s in ${bare.messages} messages: send → receipt and parse, p50 ${bare.sendToStateP50Ms.toFixed(2)} ms, p99 ${bare.sendToStateP99Ms.toFixed(2)} ms (max ${bare.sendToStateMaxMs.toFixed(1)}; warm-up p99 ${bare.warmupP99Ms.toFixed(2)}); CPU ${bare.cpuMsPerS.toFixed(0)} ms/s`,
      line('plain', plain),
      line('dash main', dashboard),
      line('dash own', dashboardThread),
      `live the tool's p99 is ${toBare.toFixed(2)}× a bare WebSocket server's`,
      `live dashboard adds ${adds(threadRatio)} to the p99 on its own thread (as the commands run it), ${adds(ratio)} on the main thread`,
    ],
  };
}
