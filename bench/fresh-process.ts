/**
 * A fresh Node process run to its end. runFresh times it: wall time from spawn to exit, and CPU time as
 * the child's user + system time, read from this process's own children's times in /proc/self/stat
 * (Linux; NaN elsewhere), which counts every thread; the command as users run it and the plain loop's
 * process are measured so. benchScript runs one of the bench's own scripts in a process of its own and
 * reads the JSON it ends with.
 */
import { execFileSync, spawn } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Timing } from './paired.ts';

export const ROOT = join(dirname(fileURLToPath(import.meta.url)), '..');
/** The command as installed: the build in dist/. */
export const BIN = join(ROOT, 'bin', 'lengthwise.js');
/** Runs a repository script written in TypeScript. */
export const RUN_TS = join(ROOT, 'bin', 'run-ts.js');

export interface Finished extends Timing {
  /** What it wrote on standard output (empty unless kept). */
  readonly stdout: string;
}

let ticksPerS: number | undefined;

/** CPU time of this process's finished children so far, ms (Linux), or NaN. */
function childrenCpuMs(): number {
  try {
    ticksPerS ??= Number(execFileSync('getconf', ['CLK_TCK'], { encoding: 'utf8' }).trim()) || 100;
    const stat = readFileSync('/proc/self/stat', 'utf8');
    // Fields after the command name: state is field 3, so cutime (16) and cstime (17) are at 13 and 14.
    const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    return ((Number(fields[13]) + Number(fields[14])) / ticksPerS) * 1000;
  } catch {
    return Number.NaN;
  }
}

/** Runs `node ARGS` to its end, giving what it wrote on standard output (when kept); a failure is an error naming the command and what it said. */
function runNode(args: readonly string[], keepStdout: boolean): Promise<string> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, args, { stdio: ['ignore', keepStdout ? 'pipe' : 'ignore', 'pipe'] });
    let stdout = '';
    let stderr = '';
    child.stdout?.setEncoding('utf8').on('data', (d: string) => (stdout += d));
    child.stderr?.setEncoding('utf8').on('data', (d: string) => (stderr += d));
    child.on('error', reject);
    child.on('close', (code) => {
      if (code !== 0) reject(new Error(`bench: node ${args.join(' ')} exited ${code}: ${stderr.trim()}`));
      else resolve(stdout);
    });
  });
}

/** Runs `node ARGS` to its end, timed. */
export async function runFresh(args: readonly string[], keepStdout = false): Promise<Finished> {
  const cpu0 = childrenCpuMs();
  const t0 = performance.now();
  const stdout = await runNode(args, keepStdout);
  const ms = performance.now() - t0;
  return { ms, cpuMs: childrenCpuMs() - cpu0, stdout };
}

/**
 * Runs one of the bench's scripts (`bench/NAME`) in a fresh process, through the TypeScript loader; gives
 * the JSON of its last line of output, and the lines before it.
 */
export async function benchScript<T>(name: string, args: readonly string[], nodeFlags: readonly string[] = []): Promise<{ readonly result: T; readonly lines: readonly string[] }> {
  const stdout = await runNode([...nodeFlags, RUN_TS, join(ROOT, 'bench', name), ...args], true);
  const lines = stdout.trim().split('\n');
  return { result: JSON.parse(lines.pop() ?? '{}') as T, lines };
}
