/** The command as a child process, the way a user runs it, for tests that need real processes, sockets and signals. */
import { spawn, type ChildProcess, type SpawnOptions } from 'node:child_process';
import { readFile } from 'node:fs/promises';
import { join } from 'node:path';
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

/** Kills a child that is still running (for afterEach). */
export function killChild(c: Child): void {
  if (c.child.exitCode === null && c.child.signalCode === null) c.child.kill('SIGKILL');
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

/** A summary without its `source` (a live session's URL, a replay's file), for comparing the two. */
export function withoutSourceOrProvenance(summary: Record<string, unknown>): Record<string, unknown> {
  // A live session's provenance names its session log as the input, its replay's the same file as the trial; each its own time.
  const { source: _source, provenance: _provenance, ...rest } = summary;
  return rest;
}
