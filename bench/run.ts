/**
 * npm run bench: replay throughput of the tool against a plain loop doing the same work (in one process,
 * warm, and as fresh processes: the command as users run it), the command's start against bare Node,
 * live latency over a real WebSocket, memory over a long replay, the dashboard's CPU per frame, a table in
 * a lab's own layout against our own CSV, and floods that look legitimate. Writes
 * bench/results/<date-time>.json and prints a short table. Machines here are shared and noisy, so speed is
 * reported as the median ratio of alternating runs (tool, loop, tool, loop, …).
 *
 *   npm run bench                  # full sizes (about 10 minutes on 2 cores)
 *   npm run bench -- --quick       # small sizes, about a minute
 *   npm run bench -- --only replay # or table, command, study, live, memory, screen, floods, description; several: --only replay,command
 *   npm run bench -- --only floods --bin OLD/bin/lengthwise.js   # the floods against another build
 *   npm run bench -- --only live,screen --against DIR   # another checkout's dashboard measured beside this one's
 */
import { PerformanceObserver, constants, type PerformanceEntry } from 'node:perf_hooks';
import { mkdir, mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir, cpus, loadavg } from 'node:os';
import { join } from 'node:path';
import { benchSarcomeres, writeBenchTrial, type BenchFormat, type BenchTrial } from './generate.ts';
import { runToolReplay } from './tool-replay.ts';
import { plainLoop } from './plain-loop.ts';
import { figureDifferences, figuresFromSummary, type BenchFigures } from './figures.ts';
import { median } from '../src/model/stats.ts';
import { benchArgs, wholeNumber } from './args.ts';
import { benchScript, ROOT } from './fresh-process.ts';
import { alternate, paired, perSecond, ratiosText, timeHere, type Paired } from './paired.ts';
import { measureMemory, type MemoryResult } from './memory.ts';
import { measureLive, type LiveResult } from './live.ts';
import { measureCommand, measureStart, type CommandResult, type StartResult } from './command.ts';
import { measureTable, type TableResult } from './table.ts';
import { floodLines, measureFloods } from './floods.ts';
import { measureStudy, type StudyBenchResult } from './study.ts';
import { descriptionLines, measureDescription } from './description.ts';

/** Each pair's tool / plain loop in one process, by wall and by process CPU time (which other programs move less). */
export interface ReplayResult extends Paired<'tool', 'loop'> {
  readonly format: BenchFormat;
  readonly samples: number;
  readonly bytes: number;
  /** Full (mark-compact) collections during the timed runs; many of them mean objects went to the old space. */
  readonly majorGcs: number;
  readonly toolSamplesPerS: number;
  readonly loopSamplesPerS: number;
  readonly figures: BenchFigures;
  /** Where the tool's and the loop's figures differ; empty when they agree. */
  readonly differences: readonly string[];
}

const PARTS = ['replay', 'table', 'command', 'study', 'live', 'memory', 'screen', 'floods', 'description'];

interface Args {
  readonly quick: boolean;
  readonly only: ReadonlySet<string>;
  readonly samples: number;
  readonly pairs: number;
  readonly memorySamples: number;
  /** Pairs of fresh processes: the command and the plain-loop process. */
  readonly commandPairs: number;
  /** Pairs of `lengthwise --help` and `node -e 0`. */
  readonly startPairs: number;
  /** The command the floods run (another build, for before/after figures); undefined: this one. */
  readonly bin: string | undefined;
  /** Frames per pass of the screen bench. */
  readonly screenFrames: number;
  /** Another checkout whose dashboard is measured beside this one's (live and screen). */
  readonly against: string | undefined;
  /** Lengths of the trial description's runs, hours. */
  readonly descriptionHours: readonly number[];
  /** In a process of its own: one format's replay measurement (replayInChild), or the wide table's (tableInChild). */
  readonly replayChild: BenchFormat | undefined;
  readonly tableChild: boolean;
}

function parseArgs(argv: readonly string[]): Args {
  const v = benchArgs('bench', argv, {
    quick: { type: 'boolean' },
    only: { type: 'string' },
    samples: { type: 'string' },
    pairs: { type: 'string' },
    'memory-samples': { type: 'string' },
    'command-pairs': { type: 'string' },
    'start-pairs': { type: 'string' },
    bin: { type: 'string' },
    against: { type: 'string' },
    'description-hours': { type: 'string' },
    'replay-child': { type: 'string' },
    'table-child': { type: 'boolean' },
  });
  const quick = v.quick === true;
  const count = (name: 'samples' | 'pairs' | 'memory-samples' | 'command-pairs' | 'start-pairs', full: number, short: number): number =>
    wholeNumber('bench', name, v[name], quick ? short : full);
  const only = new Set((v.only ?? PARTS.join(',')).split(','));
  for (const part of only) {
    if (!PARTS.includes(part)) {
      console.error(`bench: --only ${part}: accepted are ${PARTS.join(', ')} (comma-separated)`);
      process.exit(2);
    }
  }
  return {
    quick,
    only,
    samples: count('samples', 1_000_000, 200_000),
    pairs: count('pairs', 5, 3),
    memorySamples: count('memory-samples', 10_000_000, 1_000_000),
    commandPairs: count('command-pairs', 5, 2),
    startPairs: count('start-pairs', 20, 10),
    bin: v.bin,
    screenFrames: quick ? 60 : 200,
    against: v.against,
    descriptionHours: (v['description-hours'] ?? (quick ? '0.25,1' : '1,24')).split(',').map(Number),
    replayChild: v['replay-child'] === undefined ? undefined : v['replay-child'] === 'csv' ? 'csv' : 'ndjson',
    tableChild: v['table-child'] === true,
  };
}

/** Alternating runs of the tool and the plain loop over one file, after one warm-up run of each. */
export async function measureReplay(trial: BenchTrial, pairs: number): Promise<ReplayResult> {
  const loopOptions = { format: trial.format, sarcomeresInSeries: benchSarcomeres(trial.spec) };
  // Warm-up: both paths compiled before anything is timed.
  const warm = await runToolReplay(trial.path, trial.calibration);
  const loopFigures = await plainLoop(trial.path, loopOptions);
  const figures = figuresFromSummary(warm.summary);
  const differences = figureDifferences(figures, loopFigures);
  let majorGcs = 0;
  const observer = new PerformanceObserver((list) => {
    for (const entry of list.getEntries()) if ((entry as PerformanceEntry & { detail?: { kind?: number } }).detail?.kind === constants.NODE_PERFORMANCE_GC_MAJOR) majorGcs++;
  });
  observer.observe({ entryTypes: ['gc'] });
  const runs = await alternate(
    pairs,
    () => timeHere(() => runToolReplay(trial.path, trial.calibration)),
    () => timeHere(() => plainLoop(trial.path, loopOptions)),
  );
  // Entries are delivered asynchronously: give them a turn before counting.
  await new Promise((resolve) => setTimeout(resolve, 50));
  observer.disconnect();
  const times = paired('tool', runs.a, 'loop', runs.b);
  return {
    format: trial.format,
    samples: trial.samples,
    bytes: trial.bytes,
    ...times,
    majorGcs,
    toolSamplesPerS: perSecond(trial.samples, times.toolMs),
    loopSamplesPerS: perSecond(trial.samples, times.loopMs),
    figures,
    differences,
  };
}

/**
 * One format's replay measurement in a fresh process (bench/run.ts --replay-child FORMAT), so that what
 * one format's run leaves in the JIT and the heap does not move the other's figures. Without
 * allocation-site pretenuring: alternating the tool and the plain loop in one process sometimes sends it
 * into a slow mode that a user's process does not show (bench/README.md).
 */
async function replayInChild(format: BenchFormat, samples: number, pairs: number): Promise<ReplayResult> {
  const args = ['--replay-child', format, '--samples', String(samples), '--pairs', String(pairs)];
  return (await benchScript<ReplayResult>('run.ts', args, ['--no-allocation-site-pretenuring'])).result;
}

/** bench/screen-frames.ts in a fresh process: its table line and its figures. */
async function screenInChild(frames: number, passes: number, against: string | undefined): Promise<{ readonly lines: readonly string[] } & Record<string, unknown>> {
  const args = ['--frames', String(frames), '--passes', String(passes), ...(against === undefined ? [] : ['--against', against])];
  const { result, lines } = await benchScript<Record<string, unknown>>('screen-frames.ts', args);
  return { ...result, lines: lines.filter((l) => l.startsWith('screen ')) };
}

/** The wide-table measurement in a fresh process of its own (bench/run.ts --table-child), as the replays'. */
async function tableInChild(samples: number, pairs: number): Promise<TableResult> {
  const args = ['--table-child', '--samples', String(samples), '--pairs', String(pairs)];
  return (await benchScript<TableResult>('run.ts', args, ['--no-allocation-site-pretenuring'])).result;
}

/** A child's part: one measurement in a temporary folder of its own, written as one line of JSON. */
async function childMeasurement(measure: (dir: string) => Promise<unknown>): Promise<void> {
  const dir = await mkdtemp(join(tmpdir(), 'lengthwise-bench-'));
  try {
    process.stdout.write(`${JSON.stringify(await measure(dir))}\n`);
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}

function stamp(d: Date): string {
  return d.toISOString().replace(/[:]/g, '-').replace(/\..+$/, '');
}

function fmtRate(perS: number): string {
  return `${(perS / 1e6).toFixed(2)} M/s`;
}

/** Whether the two sides' figures agree, or where they differ. */
function agreement(differences: readonly string[]): string {
  return differences.length === 0 ? 'agree' : `DIFFER: ${differences.join('; ')}`;
}

async function main(args: Args): Promise<void> {
  const started = new Date();
  const dir = await mkdtemp(join(tmpdir(), 'lengthwise-bench-'));
  const out: Record<string, unknown> = {
    date: started.toISOString(),
    node: process.version,
    cpus: cpus().length,
    cpuModel: cpus()[0]?.model ?? 'unknown',
    loadavgAtStart: loadavg(),
    quick: args.quick,
  };
  const lines: string[] = [];
  try {
    if (args.only.has('replay')) {
      const replay: ReplayResult[] = [];
      for (const format of ['csv', 'ndjson'] as const) {
        console.error(`bench: replay ${format}: a ${args.samples}-sample trial, ${args.pairs} alternating pairs, in a fresh process…`);
        const r = await replayInChild(format, args.samples, args.pairs);
        replay.push(r);
        lines.push(
          `replay ${format.padEnd(6)} tool ${fmtRate(r.toolSamplesPerS).padStart(10)}  loop ${fmtRate(r.loopSamplesPerS).padStart(10)}  ` +
            `tool/loop ${ratiosText(r)}  figures ${agreement(r.differences)}; ${r.majorGcs} full collections`,
        );
      }
      out['replay'] = replay;
    }
    if (args.only.has('table')) {
      console.error(`bench: a ${args.samples}-sample wide table with decimal commas against the same trial in our CSV, ${args.pairs} alternating pairs, in a fresh process…`);
      const t = await tableInChild(args.samples, args.pairs);
      out['table'] = t;
      lines.push(
        `table   wide ";" table with decimal commas / our CSV: ${ratiosText(t)}; CSV ${fmtRate(perSecond(t.samples, t.csvMs))}, ` +
          `wide ${fmtRate(perSecond(t.samples, t.wideMs))}; figures ${t.differences.length === 0 ? 'agree' : `differ: ${t.differences.join('; ')}`}`,
      );
    }
    if (args.only.has('command')) {
      const command: CommandResult[] = [];
      for (const format of ['csv', 'ndjson'] as const) {
        console.error(`bench: the command on a ${args.samples}-sample ${format} trial against a plain-loop process, ${args.commandPairs} alternating pairs of fresh processes…`);
        const trial = await writeBenchTrial(dir, format, { samples: args.samples });
        const r = await measureCommand(trial, dir, args.commandPairs);
        await rm(trial.path, { force: true });
        command.push(r);
        lines.push(
          `command ${format.padEnd(6)} lengthwise replay ${fmtRate(r.commandSamplesPerS).padStart(10)}  plain-loop process ${fmtRate(r.loopSamplesPerS).padStart(10)}  ` +
            `command/loop ${ratiosText(r)}  figures ${agreement(r.differences)}`,
        );
      }
      out['command'] = command;
      console.error(`bench: lengthwise --help against node -e 0, ${args.startPairs} alternating pairs…`);
      const start: StartResult = await measureStart(args.startPairs);
      out['start'] = start;
      lines.push(
        `start   lengthwise --help ${start.helpMedianMs.toFixed(0)} ms, node -e 0 ${start.bareMedianMs.toFixed(0)} ms: ` +
          `${start.ratioMedian.toFixed(2)}× (median of ${start.ratios.length} pairs; ${Math.min(...start.ratios).toFixed(2)}–${Math.max(...start.ratios).toFixed(2)})`,
      );
    }
    if (args.only.has('study')) {
      const trials = args.quick ? 12 : 60;
      const samplesPerTrial = args.quick ? 5_000 : 20_000;
      console.error(`bench: summarize --study, ${trials} trials of ${samplesPerTrial} samples, --jobs 2, with and without the group and comparison tables, ${args.commandPairs} alternating pairs of fresh processes…`);
      const study: StudyBenchResult = await measureStudy(dir, { trials, samplesPerTrial, pairs: args.commandPairs, jobs: 2 });
      out['study'] = study;
      lines.push(
        `study   ${study.trials} trials × ${study.samplesPerTrial} samples, --jobs ${study.jobs}: without the tables ${(median(study.withoutMs) / 1000).toFixed(1)} s, ` +
          `with groups (${study.groupRows} rows) and comparisons (${study.comparisonRows} rows) ${(median(study.withMs) / 1000).toFixed(1)} s: ` +
          `${ratiosText(study, 3)}; trials.csv ${study.trialsAgree ? 'the same' : 'DIFFERS'}`,
      );
    }
    if (args.only.has('live')) {
      console.error('bench: live latency over a WebSocket on 127.0.0.1…');
      const live: LiveResult = await measureLive({ quick: args.quick, ...(args.against === undefined ? {} : { against: args.against }) });
      out['live'] = live;
      for (const l of live.lines) lines.push(l);
    }
    if (args.only.has('memory')) {
      console.error(`bench: memory over a ${args.memorySamples}-sample replay (writing it first)…`);
      const memory: MemoryResult = await measureMemory(dir, args.memorySamples);
      out['memory'] = memory;
      lines.push(
        `memory ${memory.samples} samples: RSS ${memory.rssStartMb.toFixed(0)} → ${memory.rssEndMb.toFixed(0)} MB (growth after the first checkpoint ` +
          `${memory.rssGrowthMb.toFixed(1)} MB, peak ${memory.peakRssMb.toFixed(0)} MB), heap ${memory.heapStartMb.toFixed(1)} → ${memory.heapEndMb.toFixed(1)} MB, ` +
          `${memory.strides} strides kept`,
      );
    }
    if (args.only.has('floods')) {
      console.error(`bench: floods that look legitimate, each in a fresh process of ${args.bin ?? 'the command'}…`);
      const floods = await measureFloods(dir, { quick: args.quick, ...(args.bin !== undefined ? { bin: args.bin } : {}) });
      out['floods'] = { bin: args.bin ?? 'bin/lengthwise.js', results: floods };
      for (const l of floodLines(floods)) lines.push(l);
    }
    if (args.only.has('screen')) {
      console.error(`bench: the dashboard's CPU per frame, ${args.screenFrames} frames a pass, in a fresh process…`);
      const screen = await screenInChild(args.screenFrames, args.quick ? 3 : 5, args.against);
      out['screen'] = screen;
      for (const l of screen.lines) lines.push(l);
    }
    if (args.only.has('description')) {
      console.error(`bench: a trial description of two probes' tables against the same trial in one table, ${args.descriptionHours.join(' and ')} h, alternating fresh processes (writing them first)…`);
      const description = await measureDescription(dir, args.descriptionHours, args.quick ? 1 : 3);
      out['description'] = description;
      for (const l of descriptionLines(description)) lines.push(l);
    }
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
  out['loadavgAtEnd'] = loadavg();
  out['seconds'] = (Date.now() - started.getTime()) / 1000;
  const resultsDir = join(ROOT, 'bench', 'results');
  await mkdir(resultsDir, { recursive: true });
  const file = join(resultsDir, `${stamp(started)}.json`);
  await writeFile(file, `${JSON.stringify(out, null, 2)}\n`);
  console.log(lines.join('\n'));
  console.log(`(${(out['seconds'] as number).toFixed(0)} s; load ${loadavg().map((x) => x.toFixed(1)).join(' ')}; written to ${file})`);
}

const given = parseArgs(process.argv.slice(2));
const replayFormat = given.replayChild;
if (given.tableChild) await childMeasurement((dir) => measureTable(dir, given.samples, given.pairs));
else if (replayFormat !== undefined) await childMeasurement(async (dir) => measureReplay(await writeBenchTrial(dir, replayFormat, { samples: given.samples }), given.pairs));
else await main(given);
