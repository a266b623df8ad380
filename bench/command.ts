/**
 * The command as users run it, start-up included: each run is a fresh process.
 *
 * - `lengthwise replay FILE --speed max --summary F` (bin/lengthwise.js, the build in dist/) against the
 *   plain loop doing the same work in a fresh process of its own (plain-loop-process.ts, bundled to plain
 *   JavaScript first, so neither pays for a TypeScript loader), in alternating pairs. Before the pairs,
 *   one run of each checks that they give the same figures.
 * - `lengthwise --help` against a bare `node -e 0`, in alternating pairs: what starting the command
 *   costs beyond starting Node.
 *
 * Wall time runs from spawn to exit. CPU time is the child's user + system time, read from this
 * process's own children's times in /proc/self/stat (Linux; NaN elsewhere), which counts every thread.
 */
import { execFileSync, spawn } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { readFile, writeFile } from 'node:fs/promises';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { build } from 'esbuild';
import { calibrationJson } from '../src/sim/gait-generator.ts';
import type { SummaryJson } from '../src/output/summary-json.ts';
import { figureDifferences, figuresFromSummary, type BenchFigures } from './figures.ts';
import type { BenchTrial } from './generate.ts';
import { median } from '../src/model/stats.ts';

const ROOT = join(dirname(fileURLToPath(import.meta.url)), '..');
const BIN = join(ROOT, 'bin', 'lengthwise.js');

export interface CommandResult {
  readonly format: BenchTrial['format'];
  readonly samples: number;
  readonly commandMs: readonly number[];
  readonly loopMs: readonly number[];
  /** Each pair's command / plain-loop process, wall time. */
  readonly ratios: readonly number[];
  readonly ratioMedian: number;
  readonly commandCpuMs: readonly number[];
  readonly loopCpuMs: readonly number[];
  readonly cpuRatios: readonly number[];
  readonly cpuRatioMedian: number;
  readonly commandSamplesPerS: number;
  readonly loopSamplesPerS: number;
  /** Where the command's summary and the plain loop's figures differ; empty when they agree. */
  readonly differences: readonly string[];
}

export interface StartResult {
  readonly bareMs: readonly number[];
  readonly helpMs: readonly number[];
  /** Each pair's `lengthwise --help` / `node -e 0`, wall time. */
  readonly ratios: readonly number[];
  readonly ratioMedian: number;
  readonly bareMedianMs: number;
  readonly helpMedianMs: number;
}

export interface Timed {
  readonly ms: number;
  readonly cpuMs: number;
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

/** Runs a fresh Node process to its end; a failure is an error naming the command and what it said. */
export function timed(args: readonly string[], keepStdout = false): Promise<Timed> {
  return new Promise((resolve, reject) => {
    const cpu0 = childrenCpuMs();
    const t0 = performance.now();
    const child = spawn(process.execPath, args, { stdio: ['ignore', keepStdout ? 'pipe' : 'ignore', 'pipe'] });
    let stdout = '';
    let stderr = '';
    child.stdout?.on('data', (d: Buffer) => (stdout += d.toString()));
    child.stderr?.on('data', (d: Buffer) => (stderr += d.toString()));
    child.on('error', reject);
    child.on('close', (code) => {
      const ms = performance.now() - t0;
      if (code !== 0) reject(new Error(`bench: node ${args.join(' ')} exited ${code}: ${stderr.trim()}`));
      else resolve({ ms, cpuMs: childrenCpuMs() - cpu0, stdout });
    });
  });
}

/** Bundles the plain loop's process into plain JavaScript in dir; gives its path. */
async function buildPlainLoop(dir: string): Promise<string> {
  const outfile = join(dir, 'plain-loop-process.mjs');
  await build({
    entryPoints: [join(ROOT, 'bench', 'plain-loop-process.ts')],
    outfile,
    bundle: true,
    format: 'esm',
    platform: 'node',
    target: 'node20',
    packages: 'external',
    logLevel: 'warning',
  });
  return outfile;
}

/** Alternating pairs of the command and the plain-loop process over one trial, after one checked run of each. */
export async function measureCommand(trial: BenchTrial, dir: string, pairs: number): Promise<CommandResult> {
  const loopFile = await buildPlainLoop(dir);
  const calibrationPath = join(dir, `command-calibration-${trial.format}.json`);
  await writeFile(calibrationPath, JSON.stringify(calibrationJson(trial.spec)));
  const summaryPath = join(dir, `command-summary-${trial.format}.json`);
  const sarcomeres: Record<string, number> = {};
  for (const m of trial.spec.muscles) sarcomeres[m.name] = m.sarcomeresInSeries;
  const commandArgs = [BIN, 'replay', trial.path, '--speed', 'max', '--calibration', calibrationPath, '--summary', summaryPath];
  const loopArgs = [loopFile, trial.path, trial.format, JSON.stringify(sarcomeres)];

  await timed(commandArgs);
  const summary = JSON.parse(await readFile(summaryPath, 'utf8')) as SummaryJson;
  const loopFigures = JSON.parse((await timed(loopArgs, true)).stdout) as BenchFigures;
  const differences = figureDifferences(figuresFromSummary(summary), loopFigures);

  const commandMs: number[] = [];
  const loopMs: number[] = [];
  const commandCpuMs: number[] = [];
  const loopCpuMs: number[] = [];
  for (let i = 0; i < pairs; i++) {
    const command = await timed(commandArgs);
    const loop = await timed(loopArgs);
    commandMs.push(command.ms);
    commandCpuMs.push(command.cpuMs);
    loopMs.push(loop.ms);
    loopCpuMs.push(loop.cpuMs);
  }
  const ratios = commandMs.map((ms, i) => ms / (loopMs[i] as number));
  const cpuRatios = commandCpuMs.map((ms, i) => ms / (loopCpuMs[i] as number));
  return {
    format: trial.format,
    samples: trial.samples,
    commandMs,
    loopMs,
    ratios,
    ratioMedian: median(ratios),
    commandCpuMs,
    loopCpuMs,
    cpuRatios,
    cpuRatioMedian: median(cpuRatios),
    commandSamplesPerS: trial.samples / (median(commandMs) / 1000),
    loopSamplesPerS: trial.samples / (median(loopMs) / 1000),
    differences,
  };
}

/** Alternating pairs of `node -e 0` and `lengthwise --help`, after one of each unmeasured (files in the page cache). */
export async function measureStart(pairs: number): Promise<StartResult> {
  const bare = ['-e', '0'];
  const help = [BIN, '--help'];
  await timed(bare);
  await timed(help);
  const bareMs: number[] = [];
  const helpMs: number[] = [];
  for (let i = 0; i < pairs; i++) {
    bareMs.push((await timed(bare)).ms);
    helpMs.push((await timed(help)).ms);
  }
  const ratios = helpMs.map((ms, i) => ms / (bareMs[i] as number));
  return { bareMs, helpMs, ratios, ratioMedian: median(ratios), bareMedianMs: median(bareMs), helpMedianMs: median(helpMs) };
}
