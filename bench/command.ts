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
 * Each run goes through fresh-process.ts: wall time from spawn to exit, CPU time the child's (every thread).
 */
import { readFile, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { build } from 'esbuild';
import { calibrationJson } from '../src/sim/gait-generator.ts';
import type { SummaryJson } from '../src/output/summary-json.ts';
import { median } from '../src/model/stats.ts';
import { figureDifferences, figuresFromSummary, type BenchFigures } from './figures.ts';
import { benchSarcomeres, type BenchTrial } from './generate.ts';
import { BIN, ROOT, runFresh } from './fresh-process.ts';
import { alternate, paired, pairedWall, perSecond, type Paired, type PairedWall } from './paired.ts';

/** Each pair's command / plain-loop process, by wall and by CPU time. */
export interface CommandResult extends Paired<'command', 'loop'> {
  readonly format: BenchTrial['format'];
  readonly samples: number;
  readonly commandSamplesPerS: number;
  readonly loopSamplesPerS: number;
  /** Where the command's summary and the plain loop's figures differ; empty when they agree. */
  readonly differences: readonly string[];
}

/** Each pair's `lengthwise --help` / `node -e 0`, wall time. */
export interface StartResult extends PairedWall<'help', 'bare'> {
  readonly bareMedianMs: number;
  readonly helpMedianMs: number;
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
  const commandArgs = [BIN, 'replay', trial.path, '--speed', 'max', '--calibration', calibrationPath, '--summary', summaryPath];
  const loopArgs = [loopFile, trial.path, trial.format, JSON.stringify(benchSarcomeres(trial.spec))];

  await runFresh(commandArgs);
  const summary = JSON.parse(await readFile(summaryPath, 'utf8')) as SummaryJson;
  const loopFigures = JSON.parse((await runFresh(loopArgs, true)).stdout) as BenchFigures;
  const differences = figureDifferences(figuresFromSummary(summary), loopFigures);

  const runs = await alternate(pairs, () => runFresh(commandArgs), () => runFresh(loopArgs));
  const times = paired('command', runs.a, 'loop', runs.b);
  return {
    format: trial.format,
    samples: trial.samples,
    ...times,
    commandSamplesPerS: perSecond(trial.samples, times.commandMs),
    loopSamplesPerS: perSecond(trial.samples, times.loopMs),
    differences,
  };
}

/** Alternating pairs of `node -e 0` and `lengthwise --help`, after one of each unmeasured (files in the page cache). */
export async function measureStart(pairs: number): Promise<StartResult> {
  const bare = ['-e', '0'];
  const help = [BIN, '--help'];
  await runFresh(bare);
  await runFresh(help);
  const runs = await alternate(pairs, () => runFresh(bare), () => runFresh(help));
  const times = pairedWall('help', runs.b, 'bare', runs.a);
  return { ...times, bareMedianMs: median(times.bareMs), helpMedianMs: median(times.helpMs) };
}
