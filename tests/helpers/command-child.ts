/**
 * The built command as a child process, the way a user runs it, for tests that need real processes, sockets
 * and signals: started (`lengthwise`, to follow it while it runs) or run to its end (`runLengthwise`).
 */
import { spawn, type ChildProcess, type SpawnOptions } from 'node:child_process';
import { mkdtemp, readFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, expect } from 'vitest';
import { until } from '../adapters/ws-peers.ts';

export const BIN = join(import.meta.dirname, '..', '..', 'bin', 'lengthwise.js');

export interface Child {
  readonly child: ChildProcess;
  stdout: string;
  stderr: string;
  readonly exited: Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
}

/** Starts `lengthwise ARGS` (NO_COLOR set); `spawnOptions` may give a cwd or another environment. */
export function lengthwise(args: readonly string[], spawnOptions: SpawnOptions = {}): Child {
  return spawnChild(process.execPath, [BIN, ...args], spawnOptions);
}

/** Starts any program the same way (e.g. the command inside a mount namespace of its own). */
export function spawnChild(program: string, args: readonly string[], spawnOptions: SpawnOptions = {}): Child {
  const child = spawn(program, [...args], { stdio: ['ignore', 'pipe', 'pipe'], env: { ...process.env, NO_COLOR: '1' }, ...spawnOptions });
  const c: Child = {
    child,
    stdout: '',
    stderr: '',
    exited: new Promise((resolve) => child.on('exit', (code, signal) => resolve({ code, signal }))),
  };
  child.stdout?.on('data', (d: Buffer) => (c.stdout += d.toString()));
  child.stderr?.on('data', (d: Buffer) => (c.stderr += d.toString()));
  return c;
}

/** What a program run to its end gave: its exit code (null when a signal ended it) and all it printed. */
export interface Ran {
  readonly code: number | null;
  readonly stdout: string;
  readonly stderr: string;
}

/** Runs any program started as spawnChild starts it, to its end: resolves once its output streams have closed. */
export function runChild(program: string, args: readonly string[], spawnOptions: SpawnOptions = {}): Promise<Ran> {
  const c = spawnChild(program, args, spawnOptions);
  return new Promise((resolve, reject) => {
    c.child.on('error', reject);
    c.child.on('close', (code) => resolve({ code, stdout: c.stdout, stderr: c.stderr }));
  });
}

/** Runs `lengthwise ARGS` (NO_COLOR set) to its end. */
export function runLengthwise(args: readonly string[], spawnOptions: SpawnOptions = {}): Promise<Ran> {
  return runChild(process.execPath, [BIN, ...args], spawnOptions);
}

/** Kills a child that is still running (for afterEach). */
export function killChild(c: Child): void {
  if (c.child.exitCode === null && c.child.signalCode === null) c.child.kill('SIGKILL');
}

/**
 * The children a test file starts and the clean-ups it needs (closing sockets, stopping servers): after each
 * test the children still running are killed, then the clean-ups run, the last added first.
 */
export function endedAfterEach(): { readonly children: Child[]; readonly stops: (() => unknown)[] } {
  const children: Child[] = [];
  const stops: (() => unknown)[] = [];
  afterEach(async () => {
    for (const c of children.splice(0)) killChild(c);
    while (stops.length > 0) await stops.pop()?.();
  });
  return { children, stops };
}

/** The port a `live --listen 127.0.0.1:0` child says it listens on. */
export async function listeningPort(c: Child): Promise<number> {
  await until(() => /listening on ws:\/\/127\.0\.0\.1:\d+/.test(c.stderr), 15_000, `the child to listen (stderr: ${c.stderr})`);
  return Number(/listening on ws:\/\/127\.0\.0\.1:(\d+)/.exec(c.stderr)?.[1]);
}

export type SummaryFile = Record<string, unknown> & { frames: Record<string, unknown> & { rejected_by_reason: Record<string, number> } };

export async function readJson(path: string): Promise<SummaryFile> {
  return JSON.parse(await readFile(path, 'utf8')) as SummaryFile;
}

/** `lengthwise replay LOG --speed max` to a summary file in dir; its summary. */
export async function replaySummary(log: string, dir: string, name = 'replay.json'): Promise<SummaryFile> {
  const out = join(dir, name);
  const r = lengthwise(['replay', log, '--speed', 'max', '--plain', '--summary', out]);
  const { code } = await r.exited;
  if (code !== 0) throw new Error(`replay of ${log} ended with ${code}: ${r.stderr}`);
  return readJson(out);
}

/** A live session of the command in a folder of its own: `lengthwise live SOURCE --plain --log LOG --summary SUMMARY`. */
export interface LiveSession {
  readonly child: Child;
  readonly dir: string;
  readonly log: string;
  readonly summary: string;
}

/** Starts `lengthwise live SOURCE…` (e.g. `--listen 127.0.0.1:0`) with its log and summary in a new folder named from `prefix`. */
export async function liveSession(source: readonly string[], prefix: string): Promise<LiveSession> {
  const dir = await mkdtemp(join(tmpdir(), prefix));
  const log = join(dir, 'session.ndjson');
  const summary = join(dir, 'live.json');
  return { child: lengthwise(['live', ...source, '--plain', '--log', log, '--summary', summary]), dir, log, summary };
}

/** Ends a session once `devices` devices have left it (SIGTERM, then exit 0): the summary is written, the log closed. */
export async function endSession(child: Child, devices: number): Promise<void> {
  await until(() => (child.stderr.match(/DISCONNECTED/g) ?? []).length >= devices, 15_000, `${devices} devices to leave (stderr: ${child.stderr})`);
  child.child.kill('SIGTERM');
  const { code } = await child.exited;
  expect(code, child.stderr).toBe(0);
}

/** Checks that the replay of a session's log gives the live session's summary, apart from source and provenance. */
export async function expectReplayOfLog(log: string, dir: string, live: Record<string, unknown>): Promise<void> {
  expect(withoutSourceOrProvenance(await replaySummary(log, dir))).toEqual(withoutSourceOrProvenance(live));
}

/** A summary without its `source` (a live session's URL, a replay's file), for comparing the two. */
export function withoutSourceOrProvenance(summary: Record<string, unknown>): Record<string, unknown> {
  // A live session's provenance names its session log as the input, its replay's the same file as the trial; each its own time.
  const { source: _source, provenance: _provenance, ...rest } = summary;
  return rest;
}
