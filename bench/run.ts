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
import { execFile } from 'node:child_process';
import { PerformanceObserver, constants, type PerformanceEntry } from 'node:perf_hooks';
import { promisify } from 'node:util';
import { mkdir, mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir, cpus, loadavg } from 'node:os';
import { join, dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import { writeBenchTrial, type BenchFormat, type BenchTrial } from './generate.ts';
import { runToolReplay } from './tool-replay.ts';
import { plainLoop } from './plain-loop.ts';
import { figureDifferences, figuresFromSummary, type BenchFigures } from './figures.ts';
import { median } from '../src/model/stats.ts';
import { measureMemory, type MemoryResult } from './memory.ts';
import { measureLive, type LiveResult } from './live.ts';
import { measureCommand, measureStart, type CommandResult, type StartResult } from './command.ts';
import { measureTable, type TableResult } from './table.ts';
import { floodLines, measureFloods } from './floods.ts';
import { measureStudy, type StudyBenchResult } from './study.ts';
import { descriptionLines, measureDescription } from './description.ts';

export interface ReplayResult {
  readonly format: BenchFormat;
  readonly samples: number;
  readonly bytes: number;
  readonly toolMs: readonly number[];
  readonly loopMs: readonly number[];
  /** Each pair's tool ms / loop ms (wall time). */
  readonly ratios: readonly number[];
  readonly ratioMedian: number;
  /** Process CPU time of each run, ms: less moved by other programs on a shared machine than wall time. */
  readonly toolCpuMs: readonly number[];
  readonly loopCpuMs: readonly number[];
  readonly cpuRatios: readonly number[];
  readonly cpuRatioMedian: number;
  /** Full (mark-compact) collections during the timed runs; many of them mean objects went to the old space. */
  readonly majorGcs: number;
  readonly toolSamplesPerS: number;
  readonly loopSamplesPerS: number;
  readonly figures: BenchFigures;
  /** Where the tool's and the loop's figures differ; empty when they agree. */
  readonly differences: readonly string[];
}

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
}

function parseArgs(argv: readonly string[]): Args {
  const quick = argv.includes('--quick');
  const value = (name: string): string | undefined => {
    const i = argv.indexOf(name);
    return i >= 0 ? argv[i + 1] : undefined;
  };
  const only = new Set((value('--only') ?? 'replay,table,command,study,live,memory,screen,floods,description').split(','));
  for (const part of only) {
    if (!['replay', 'table', 'command', 'study', 'live', 'memory', 'screen', 'floods', 'description'].includes(part)) {
      console.error(`bench: --only ${part}: accepted are replay, table, command, study, live, memory, screen, floods, description (comma-separated)`);
      process.exit(2);
    }
  }
  return {
    quick,
    only,
    samples: Number(value('--samples') ?? (quick ? 200_000 : 1_000_000)),
    pairs: Number(value('--pairs') ?? (quick ? 3 : 5)),
    memorySamples: Number(value('--memory-samples') ?? (quick ? 1_000_000 : 10_000_000)),
    commandPairs: Number(value('--command-pairs') ?? (quick ? 2 : 5)),
    startPairs: Number(value('--start-pairs') ?? (quick ? 10 : 20)),
    bin: value('--bin'),
    screenFrames: quick ? 60 : 200,
    against: value('--against'),
    descriptionHours: (value('--description-hours') ?? (quick ? '0.25,1' : '1,24')).split(',').map(Number),
  };
}

function sarcomeresOf(trial: BenchTrial): Record<string, number> {
  const n: Record<string, number> = {};
  for (const m of trial.spec.muscles) n[m.name] = m.sarcomeresInSeries;
  return n;
}

/** Alternating runs of the tool and the plain loop over one file, after one warm-up run of each. */
export async function measureReplay(trial: BenchTrial, pairs: number): Promise<ReplayResult> {
  const loopOptions = { format: trial.format, sarcomeresInSeries: sarcomeresOf(trial) };
  // Warm-up: both paths compiled before anything is timed.
  const warm = await runToolReplay(trial.path, trial.calibration);
  const loopFigures = await plainLoop(trial.path, loopOptions);
  const figures = figuresFromSummary(warm.summary);
  const differences = figureDifferences(figures, loopFigures);
  const toolMs: number[] = [];
  const loopMs: number[] = [];
  const ratios: number[] = [];
  const toolCpuMs: number[] = [];
  const loopCpuMs: number[] = [];
  const cpuRatios: number[] = [];
  let majorGcs = 0;
  const observer = new PerformanceObserver((list) => {
    for (const entry of list.getEntries()) if ((entry as PerformanceEntry & { detail?: { kind?: number } }).detail?.kind === constants.NODE_PERFORMANCE_GC_MAJOR) majorGcs++;
  });
  observer.observe({ entryTypes: ['gc'] });
  for (let i = 0; i < pairs; i++) {
    let c0 = cpuMs();
    const tool = await runToolReplay(trial.path, trial.calibration);
    const toolCpu = cpuMs() - c0;
    c0 = cpuMs();
    const t0 = performance.now();
    await plainLoop(trial.path, loopOptions);
    const loop = performance.now() - t0;
    const loopCpu = cpuMs() - c0;
    toolMs.push(tool.ms);
    loopMs.push(loop);
    ratios.push(tool.ms / loop);
    toolCpuMs.push(toolCpu);
    loopCpuMs.push(loopCpu);
    cpuRatios.push(toolCpu / loopCpu);
  }
  // Entries are delivered asynchronously: give them a turn before counting.
  await new Promise((resolve) => setTimeout(resolve, 50));
  observer.disconnect();
  return {
    format: trial.format,
    samples: trial.samples,
    bytes: trial.bytes,
    toolMs,
    loopMs,
    ratios,
    ratioMedian: median(ratios),
    toolCpuMs,
    loopCpuMs,
    cpuRatios,
    cpuRatioMedian: median(cpuRatios),
    majorGcs,
    toolSamplesPerS: trial.samples / (median(toolMs) / 1000),
    loopSamplesPerS: trial.samples / (median(loopMs) / 1000),
    figures,
    differences,
  };
}

const execFileAsync = promisify(execFile);

/**
 * One format's replay measurement in a fresh process (bench/run.ts --replay-child FORMAT SAMPLES PAIRS),
 * so that what one format's run leaves in the JIT and the heap does not move the other's figures.
 */
async function replayInChild(format: BenchFormat, samples: number, pairs: number): Promise<ReplayResult> {
  const root = join(dirname(fileURLToPath(import.meta.url)), '..');
  const { stdout } = await execFileAsync(
    process.execPath,
    // Without allocation-site pretenuring: alternating the tool and the plain loop in one process
    // sometimes sends it into a slow mode that a user's process does not show (bench/README.md).
    ['--no-allocation-site-pretenuring', join(root, 'bin/run-ts.js'), join(root, 'bench/run.ts'), '--replay-child', format, String(samples), String(pairs)],
    { maxBuffer: 16 * 1024 * 1024 },
  );
  return JSON.parse(stdout.trim().split('\n').pop() ?? '{}') as ReplayResult;
}

/** bench/screen-frames.ts in a fresh process: its table line and its figures. */
async function screenInChild(frames: number, passes: number, against: string | undefined): Promise<{ readonly lines: readonly string[] } & Record<string, unknown>> {
  const root = join(dirname(fileURLToPath(import.meta.url)), '..');
  const { stdout } = await execFileAsync(
    process.execPath,
    [
      join(root, 'bin/run-ts.js'),
      join(root, 'bench/screen-frames.ts'),
      '--frames',
      String(frames),
      '--passes',
      String(passes),
      ...(against === undefined ? [] : ['--against', against]),
    ],
    { maxBuffer: 16 * 1024 * 1024 },
  );
  const all = stdout.trim().split('\n');
  const json = all.pop() ?? '{}';
  return { ...(JSON.parse(json) as Record<string, unknown>), lines: all.filter((l) => l.startsWith('screen ')) };
}

async function replayChild(format: BenchFormat, samples: number, pairs: number): Promise<void> {
  const dir = await mkdtemp(join(tmpdir(), 'lengthwise-bench-'));
  try {
    const trial = await writeBenchTrial(dir, format, { samples });
    const r = await measureReplay(trial, pairs);
    process.stdout.write(`${JSON.stringify(r)}\n`);
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}

/** The wide-table measurement in a fresh process of its own (bench/run.ts --table-child SAMPLES PAIRS). */
async function tableInChild(samples: number, pairs: number): Promise<TableResult> {
  const root = join(dirname(fileURLToPath(import.meta.url)), '..');
  const { stdout } = await execFileAsync(
    process.execPath,
    ['--no-allocation-site-pretenuring', join(root, 'bin/run-ts.js'), join(root, 'bench/run.ts'), '--table-child', String(samples), String(pairs)],
    { maxBuffer: 16 * 1024 * 1024 },
  );
  return JSON.parse(stdout.trim().split('\n').pop() ?? '{}') as TableResult;
}

async function tableChild(samples: number, pairs: number): Promise<void> {
  const dir = await mkdtemp(join(tmpdir(), 'lengthwise-bench-'));
  try {
    process.stdout.write(`${JSON.stringify(await measureTable(dir, samples, pairs))}\n`);
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}

function cpuMs(): number {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1000;
}

function stamp(d: Date): string {
  return d.toISOString().replace(/[:]/g, '-').replace(/\..+$/, '');
}

function fmtRate(perS: number): string {
  return `${(perS / 1e6).toFixed(2)} M/s`;
}

async function main(): Promise<void> {
  const args = parseArgs(process.argv.slice(2));
  const started = new Date();
  const here = dirname(fileURLToPath(import.meta.url));
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
            `tool/loop ${r.ratioMedian.toFixed(2)}× wall (${r.ratios.map((x) => x.toFixed(2)).join(' ')}), ` +
            `${r.cpuRatioMedian.toFixed(2)}× CPU (${r.cpuRatios.map((x) => x.toFixed(2)).join(' ')})  ` +
            `figures ${r.differences.length === 0 ? 'agree' : `DIFFER: ${r.differences.join('; ')}`}; ${r.majorGcs} full collections`,
        );
      }
      out['replay'] = replay;
    }
    if (args.only.has('table')) {
      console.error(`bench: a ${args.samples}-sample wide table with decimal commas against the same trial in our CSV, ${args.pairs} alternating pairs, in a fresh process…`);
      const t = await tableInChild(args.samples, args.pairs);
      out['table'] = t;
      lines.push(
        `table   wide ";" table with decimal commas / our CSV: ${t.ratioMedian.toFixed(2)}× wall (${t.ratios.map((x) => x.toFixed(2)).join(' ')}), ` +
          `${t.cpuRatioMedian.toFixed(2)}× CPU (${t.cpuRatios.map((x) => x.toFixed(2)).join(' ')}); CSV ${fmtRate(t.samples / (median(t.csvMs) / 1000))}, ` +
          `wide ${fmtRate(t.samples / (median(t.wideMs) / 1000))}; figures ${t.differences.length === 0 ? 'agree' : `differ: ${t.differences.join('; ')}`}`,
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
            `command/loop ${r.ratioMedian.toFixed(2)}× wall (${r.ratios.map((x) => x.toFixed(2)).join(' ')}), ` +
            `${r.cpuRatioMedian.toFixed(2)}× CPU (${r.cpuRatios.map((x) => x.toFixed(2)).join(' ')})  ` +
            `figures ${r.differences.length === 0 ? 'agree' : `DIFFER: ${r.differences.join('; ')}`}`,
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
          `${study.ratioMedian.toFixed(3)}× wall (${study.ratios.map((x) => x.toFixed(3)).join(' ')}), ${study.cpuRatioMedian.toFixed(3)}× CPU ` +
          `(${study.cpuRatios.map((x) => x.toFixed(3)).join(' ')}); trials.csv ${study.trialsAgree ? 'the same' : 'DIFFERS'}`,
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
  const resultsDir = join(here, 'results');
  await mkdir(resultsDir, { recursive: true });
  const file = join(resultsDir, `${stamp(started)}.json`);
  await writeFile(file, `${JSON.stringify(out, null, 2)}\n`);
  console.log(lines.join('\n'));
  console.log(`(${(out['seconds'] as number).toFixed(0)} s; load ${loadavg().map((x) => x.toFixed(1)).join(' ')}; written to ${file})`);
}

const child = process.argv.indexOf('--replay-child');
const tableChildAt = process.argv.indexOf('--table-child');
if (tableChildAt >= 0) {
  const [samples, pairs] = process.argv.slice(tableChildAt + 1);
  await tableChild(Number(samples), Number(pairs));
} else if (child >= 0) {
  const [format, samples, pairs] = process.argv.slice(child + 1);
  await replayChild(format === 'csv' ? 'csv' : 'ndjson', Number(samples), Number(pairs));
} else {
  await main();
}
