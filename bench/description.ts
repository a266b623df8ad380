/**
 * A trial description's memory: one invented walking trial from the generator (two muscles at 100 Hz,
 * foot strikes and toe-offs) written as a two-probe set-up exports it, `calf.csv` and `thigh.csv` (the
 * second on a clock 412.35 s ahead) with an events table, joined by a description; and written as one
 * table with both muscles and the same events table. Each is replayed by the command in a fresh process
 * (`replay FILE --speed max --plain`; no summary is written, as its JSON of a day's strides would dwarf
 * what reading costs), with its peak RSS. At each length, the description's peak against the one
 * table's says what reading two files side by side and merging them costs; from the short trial to the
 * day-long one, that difference must not grow (what grows in both is the list of strides the trial keeps).
 * The files are streamed to disk as they are made, never held whole.
 */
import { createWriteStream, type WriteStream } from 'node:fs';
import { rm, stat, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { createTrial } from '../src/sim/gait-generator.ts';
import { scenarioSpec } from '../src/sim/scenarios.ts';
import { formatNumber } from '../src/sim/format-number.ts';
import { isWireEvent, isWireSample } from '../src/sim/wire.ts';
import { median } from '../src/model/stats.ts';
import { startWithPeakRss, writePeakRssPreload } from './peak-rss.ts';
import { BIN } from './fresh-process.ts';

/** The second probe's clock runs this far ahead of the first's (s). */
const THIGH_AHEAD_S = 412.35;

export interface DescriptionRun {
  /** The process's peak RSS, MB. */
  readonly peakRssMb: number;
  readonly ms: number;
  readonly exitCode: number | null;
  /** The end-of-trial report's lines for the muscles ("calf (left): 3270 strides, …"). */
  readonly muscles: readonly string[];
}

export interface DescriptionMemoryResult {
  readonly hours: number;
  /** Samples of both muscles together. */
  readonly samples: number;
  /** Bytes of the two recordings together. */
  readonly recordingBytes: number;
  /** Alternating runs: description, table, description, table, … */
  readonly description: readonly DescriptionRun[];
  readonly table: readonly DescriptionRun[];
  readonly descriptionPeakMedianMb: number;
  readonly tablePeakMedianMb: number;
  /** Whether every run ended well and gave the same muscles, sides and strides in its report. */
  readonly agree: boolean;
}

/** Lines to a file, in chunks that wait for the file to drain. */
class Lines {
  private readonly out: WriteStream;
  private chunk = '';

  constructor(path: string) {
    this.out = createWriteStream(path);
  }

  async add(line: string): Promise<void> {
    this.chunk += `${line}\n`;
    if (this.chunk.length < 1 << 16) return;
    const text = this.chunk;
    this.chunk = '';
    if (!this.out.write(text)) await new Promise<void>((resolve) => this.out.once('drain', () => resolve()));
  }

  end(): Promise<void> {
    return new Promise((resolve) => this.out.end(this.chunk, () => resolve()));
  }
}

interface Written {
  readonly description: string;
  readonly table: string;
  readonly events: string;
  readonly samples: number;
  readonly recordingBytes: number;
  readonly files: readonly string[];
}

async function writeTrial(dir: string, hours: number): Promise<Written> {
  const spec = scenarioSpec('walk', { seed: 20_261_204, durationS: hours * 3600, header: null, muscles: ['calf', 'thigh'] });
  const at = (name: string): string => join(dir, `${hours}h-${name}`);
  const calf = new Lines(at('calf.csv'));
  const thigh = new Lines(at('thigh.csv'));
  const both = new Lines(at('both.csv'));
  const events = new Lines(at('events.csv'));
  await calf.add('time_s,fascicle_mm,pennation_deg,quality');
  await thigh.add('clock_s,fascicle_mm,pennation_deg,quality');
  await both.add('time_s,muscle,fascicle_mm,pennation_deg,quality');
  await events.add('time_s,event,side');
  let samples = 0;
  for (const item of createTrial(spec).records({ badLines: 'none' })) {
    if (typeof item === 'string') continue;
    if (isWireSample(item)) {
      samples++;
      const cells = `${formatNumber(item.fascicle_mm)},${formatNumber(item.pennation_deg ?? 0)},${formatNumber(item.quality ?? 1)}`;
      await both.add(`${formatNumber(item.t)},${item.muscle},${cells}`);
      if (item.muscle === 'calf') await calf.add(`${formatNumber(item.t)},${cells}`);
      else await thigh.add(`${formatNumber(Math.round((item.t + THIGH_AHEAD_S) * 1e6) / 1e6)},${cells}`);
    } else if (isWireEvent(item)) await events.add(`${formatNumber(item.t)},${item.event},${item.side}`);
  }
  await Promise.all([calf.end(), thigh.end(), both.end(), events.end()]);
  const mapping = (muscle: string, t: string): object => ({
    format: 'lengthwise-mapping',
    version: 1,
    fields: { t },
    muscles: { [muscle]: { side: muscle === 'calf' ? 'left' : 'right', fascicle: 'fascicle_mm', pennation: 'pennation_deg', quality: 'quality' } },
  });
  await writeFile(at('calf-map.json'), JSON.stringify(mapping('calf', 'time_s')));
  await writeFile(at('thigh-map.json'), JSON.stringify(mapping('thigh', 'clock_s')));
  await writeFile(at('both-map.json'), JSON.stringify({ format: 'lengthwise-mapping', version: 1, muscles: { calf: { side: 'left' }, thigh: { side: 'right' } } }));
  await writeFile(
    at('trial.json'),
    JSON.stringify({
      format: 'lengthwise-trial',
      version: 1,
      recordings: [
        { file: `${hours}h-calf.csv`, mapping: `${hours}h-calf-map.json` },
        { file: `${hours}h-thigh.csv`, mapping: `${hours}h-thigh-map.json`, time_offset_s: -THIGH_AHEAD_S },
      ],
      events: { file: `${hours}h-events.csv` },
    }),
  );
  const recordingBytes = (await stat(at('calf.csv'))).size + (await stat(at('thigh.csv'))).size;
  const files = ['calf.csv', 'thigh.csv', 'both.csv', 'events.csv', 'calf-map.json', 'thigh-map.json', 'both-map.json', 'trial.json'].map(at);
  return { description: at('trial.json'), table: at('both.csv'), events: at('events.csv'), samples, recordingBytes, files };
}

async function replayRun(bin: string, dir: string, name: string, args: readonly string[]): Promise<DescriptionRun> {
  const run = startWithPeakRss(bin, dir, name, ['replay', ...args, '--speed', 'max', '--plain']);
  const { exitCode, ms, peakRssMb } = await run.ended;
  // The end-of-trial report's muscle lines: "calf (left): 78 500 strides, SL …".
  const muscles = run.stdout.split('\n').filter((l) => /^\S+ \((left|right|side unknown)\): \d+ strides/.test(l));
  return { peakRssMb, ms, exitCode, muscles };
}

/**
 * The description and the one table, at each length in hours, `runs` times each, alternating. The peak
 * comes at the end of a long trial, when its strides are made into figures at once, and moves by some
 * 100 MB from run to run with the collector's timing: the medians are read.
 */
export async function measureDescription(dir: string, hoursList: readonly number[], runs: number, bin = BIN): Promise<DescriptionMemoryResult[]> {
  await writePeakRssPreload(dir);
  const results: DescriptionMemoryResult[] = [];
  for (const hours of hoursList) {
    const w = await writeTrial(dir, hours);
    try {
      const description: DescriptionRun[] = [];
      const table: DescriptionRun[] = [];
      for (let i = 0; i < runs; i++) {
        description.push(await replayRun(bin, dir, `${hours}h-description`, [w.description]));
        table.push(await replayRun(bin, dir, `${hours}h-table`, [w.table, '--mapping', join(dir, `${hours}h-both-map.json`), '--events', w.events]));
      }
      const report = (r: DescriptionRun): string => r.muscles.join('\n');
      const first = description[0];
      const agree = first !== undefined && first.muscles.length === 2 && [...description, ...table].every((r) => r.exitCode === 0 && report(r) === report(first));
      results.push({
        hours,
        samples: w.samples,
        recordingBytes: w.recordingBytes,
        description,
        table,
        descriptionPeakMedianMb: median(description.map((r) => r.peakRssMb)),
        tablePeakMedianMb: median(table.map((r) => r.peakRssMb)),
        agree,
      });
    } finally {
      for (const f of w.files) await rm(f, { force: true });
    }
  }
  return results;
}

/** One line per length for the bench's table. */
export function descriptionLines(results: readonly DescriptionMemoryResult[]): string[] {
  const peaks = (runs: readonly DescriptionRun[]): string => runs.map((r) => r.peakRssMb.toFixed(0)).join(' ');
  const seconds = (runs: readonly DescriptionRun[]): string => (median(runs.map((r) => r.ms)) / 1000).toFixed(1);
  return results.map(
    (r) =>
      `description ${String(r.hours).padStart(4)} h (${(r.samples / 1e6).toFixed(2)} M samples, recordings ${(r.recordingBytes / 1e6).toFixed(0)} MB): ` +
      `peak RSS ${r.descriptionPeakMedianMb.toFixed(0)} MB (${peaks(r.description)}), ${seconds(r.description)} s; ` +
      `the same trial in one table ${r.tablePeakMedianMb.toFixed(0)} MB (${peaks(r.table)}), ${seconds(r.table)} s; ` +
      `${r.agree ? 'same strides' : 'DIFFER, or a run failed'}`,
  );
}
