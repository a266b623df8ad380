/**
 * One generated trial (the repo's generator, src/sim/) written as an invented two-probe lab set-up exports
 * it, by an independent CSV writer (csv-stringify):
 *
 * - `calf.csv`: the first probe, its own columns (a row per time, seconds, millimetres, degrees, commas);
 * - `thigh.csv`: the second probe, started on its own clock THIGH_CLOCK_AHEAD_S ahead of the first
 *   (milliseconds, centimetres, radians, ";" between cells);
 * - `footswitch.tsv`: the gait events from a third system, on its own clock too;
 * - the same trial unsplit, `both.csv` (our own columns, both muscles), for comparison,
 *
 * with the mappings that read them, the calibration the generator knows (true sarcomere counts), and a
 * trial description that joins them.
 */
import { writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { stringify } from 'csv-stringify/sync';
import { calibrationJson, createTrial } from '../../src/sim/gait-generator.ts';
import { scenarioSpec } from '../../src/sim/scenarios.ts';
import { isWireEvent, isWireSample, type WireEvent, type WireSample } from '../../src/sim/wire.ts';

/** How far the thigh probe's clock runs ahead of the calf probe's, seconds (a probe counts from its own start). */
export const THIGH_CLOCK_AHEAD_S = 412.35;

/**
 * How far the footswitch's clock runs ahead, seconds, and where its events land on the probes' clock:
 * half a millisecond after the generator's, off the probes' 10 ms grid, so that no sample shares an
 * event's time and the last bit of a converted clock cannot move a sample across a stride's start.
 */
export const FOOTSWITCH_CLOCK_AHEAD_S = 3.2;
const FOOTSWITCH_OFFSET_S = -(FOOTSWITCH_CLOCK_AHEAD_S - 0.0005);

export interface TwoProbeTrial {
  readonly dir: string;
  readonly calf: string;
  readonly thigh: string;
  readonly events: string;
  readonly calfMapping: string;
  readonly thighMapping: string;
  readonly eventsMapping: string;
  readonly calibration: string;
  /** The unsplit trial (our own columns) and the mapping that reads its events file ("events" only). */
  readonly both: string;
  readonly bothMapping: string;
  /** The description joining the recordings, with the right offset. */
  readonly description: string;
  /** Writes another description beside the files (its paths relative to them); returns its path. */
  describe(name: string, description: object): Promise<string>;
  /** The description's content with the right offset, to vary. */
  readonly content: DescriptionContent;
}

export interface DescriptionContent {
  readonly format: 'lengthwise-trial';
  readonly version: 1;
  readonly subject: string;
  readonly trial: string;
  readonly recordings: readonly { readonly file: string; readonly mapping?: string; readonly time_offset_s?: number }[];
  readonly events?: { readonly file: string; readonly mapping?: string };
  readonly calibration?: string;
}

/** Fixed decimals, without a float's tail (toFixed, then back to the shortest text). */
function fixed(x: number, digits: number): string {
  return String(Number(x.toFixed(digits)));
}

export async function twoProbeTrial(dir: string, durationS = 40): Promise<TwoProbeTrial> {
  const spec = scenarioSpec('walk', { seed: 20_261_203, durationS, header: null, muscles: ['calf', 'thigh'] });
  const trial = createTrial(spec);
  const samples: WireSample[] = [];
  const events: WireEvent[] = [];
  for (const item of trial.records({ badLines: 'none' })) {
    if (typeof item === 'string') continue;
    if (isWireSample(item)) samples.push(item);
    else if (isWireEvent(item)) events.push(item);
  }
  const of = (muscle: string): WireSample[] => samples.filter((s) => s.muscle === muscle);
  const at = (name: string): string => join(dir, name);
  const write = async (name: string, content: string | object): Promise<string> => {
    await writeFile(at(name), typeof content === 'string' ? content : JSON.stringify(content, null, 2));
    return at(name);
  };

  const calf = await write(
    'calf.csv',
    stringify([
      ['Time (s)', 'Fascicle length (mm)', 'Pennation (deg)', 'Tracking quality'],
      ...of('calf').map((s) => [String(s.t), String(s.fascicle_mm), String(s.pennation_deg), String(s.quality)]),
    ]),
  );
  const calfMapping = await write('calf-map.json', {
    format: 'lengthwise-mapping',
    version: 1,
    device: 'probe A (invented)',
    fields: { t: 'Time (s)' },
    muscles: { calf: { side: 'left', fascicle: 'Fascicle length (mm)', pennation: 'Pennation (deg)', quality: 'Tracking quality' } },
  });
  const thigh = await write(
    'thigh.csv',
    stringify(
      [
        ['t_ms', 'fascicle_cm', 'angle_rad'],
        ...of('thigh').map((s) => [fixed((s.t + THIGH_CLOCK_AHEAD_S) * 1000, 3), fixed(s.fascicle_mm / 10, 6), fixed(((s.pennation_deg ?? 0) * Math.PI) / 180, 10)]),
      ],
      { delimiter: ';' },
    ),
  );
  const thighMapping = await write('thigh-map.json', {
    format: 'lengthwise-mapping',
    version: 1,
    device: 'probe B (invented)',
    table: { delimiter: ';' },
    fields: { t: 't_ms' },
    units: { length: 'cm', angle: 'rad', time: 'ms' },
    muscles: { thigh: { side: 'right', fascicle: 'fascicle_cm', pennation: 'angle_rad' } },
  });
  const footswitch = await write(
    'footswitch.tsv',
    stringify(
      [['time', 'kind', 'foot'], ...events.map((e) => [fixed(e.t + FOOTSWITCH_CLOCK_AHEAD_S, 6), e.event === 'foot_strike' ? 'HS' : 'TO', e.side === 'left' ? 'L' : 'R'])],
      { delimiter: '\t' },
    ),
  );
  const eventsReading = {
    table: { delimiter: '\t' },
    fields: { t: 'time', event: 'kind', side: 'foot' },
    units: { time: 's' },
    time_offset_s: FOOTSWITCH_OFFSET_S,
    values: { event: { HS: 'foot_strike', TO: 'toe_off' }, side: { L: 'left', R: 'right' } },
  };
  // The description's events mapping describes the events table at its top level.
  const eventsMapping = await write('footswitch-map.json', { format: 'lengthwise-mapping', version: 1, device: 'footswitch (invented)', ...eventsReading });
  const calibration = await write('cal.json', calibrationJson(spec));

  const both = await write(
    'both.csv',
    stringify([
      ['time_s', 'muscle', 'fascicle_mm', 'pennation_deg', 'quality'],
      ...samples.map((s) => [String(s.t), s.muscle, String(s.fascicle_mm), String(s.pennation_deg), s.muscle === 'calf' ? String(s.quality) : '']),
    ]),
  );
  const bothMapping = await write('both-map.json', { format: 'lengthwise-mapping', version: 1, muscles: { calf: { side: 'left' }, thigh: { side: 'right' } }, events: eventsReading });

  const content: DescriptionContent = {
    format: 'lengthwise-trial',
    version: 1,
    subject: 'SYN-031',
    trial: 'walk-2probe',
    recordings: [
      { file: 'calf.csv', mapping: 'calf-map.json' },
      { file: 'thigh.csv', mapping: 'thigh-map.json', time_offset_s: -THIGH_CLOCK_AHEAD_S },
    ],
    events: { file: 'footswitch.tsv', mapping: 'footswitch-map.json' },
    calibration: 'cal.json',
  };
  const description = await write('walk-2probe.json', content);
  return {
    dir,
    calf,
    thigh,
    events: footswitch,
    calfMapping,
    thighMapping,
    eventsMapping,
    calibration,
    both,
    bothMapping,
    description,
    content,
    describe: (name, d) => write(name, d),
  };
}
