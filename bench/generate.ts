/**
 * Bench trials: invented walking trials from the repo's own generator (src/sim/), written once to a
 * temporary folder, streamed to disk so a trial of millions of samples is never held in memory.
 */
import { join } from 'node:path';
import { parseCalibration } from '../adapters/calibration-file.ts';
import type { CalibrationSpec } from '../src/model/calibration.ts';
import { calibrationJson, createTrial, type BadLineSpec, type TrialSpec } from '../src/sim/gait-generator.ts';
import { scenarioSpec } from '../src/sim/scenarios.ts';
import { writeCsv, writeNdjson } from '../src/sim/writers.ts';

export type BenchFormat = 'csv' | 'ndjson';

export interface BenchTrial {
  readonly path: string;
  readonly format: BenchFormat;
  /** Sample ticks × muscles written (bad lines and events not included). */
  readonly samples: number;
  readonly spec: TrialSpec;
  /** The trial's true sarcomere counts as a calibration (given to the tool and the plain loop alike). */
  readonly calibration: CalibrationSpec;
  readonly bytes: number;
}

export interface BenchTrialOptions {
  /** Samples of all muscles together (rounded to whole ticks). */
  readonly samples: number;
  /** @default 2 */
  readonly muscles?: number;
  /** @default 100 */
  readonly rateHz?: number;
  /** @default 1 */
  readonly seed?: number;
  /** Add a handful of bad lines and two tracking dropouts. @default true */
  readonly faults?: boolean;
}

const MUSCLE_NAMES = ['calf', 'thigh', 'shin', 'hamstring', 'glute', 'foot'];

/** The spec of a bench trial: walking, a few faults spread over the trial. */
export function benchSpec(options: BenchTrialOptions): TrialSpec {
  const muscleCount = options.muscles ?? 2;
  const rateHz = options.rateHz ?? 100;
  const durationS = Math.max(1, Math.round(options.samples / muscleCount)) / rateHz;
  const base = scenarioSpec('walk', {
    seed: options.seed ?? 1,
    rateHz,
    durationS,
    muscles: MUSCLE_NAMES.slice(0, muscleCount),
    header: { subject: 'SYN-BENCH', trial: 'bench-walk', calibrate: 'all' },
  });
  if (options.faults === false) return base;
  const at = (f: number): number => Math.round(durationS * f * 100) / 100;
  const first = base.muscles[0]?.name ?? 'calf';
  const badLines: BadLineSpec[] = [
    { atS: at(0.1), reason: 'not_json', muscle: first },
    { atS: at(0.3), reason: 'out_of_range', muscle: first },
    { atS: at(0.5), reason: 'duplicate', muscle: first },
    { atS: at(0.7), reason: 'schema', muscle: first },
    { atS: at(0.9), reason: 'unknown_event' },
  ];
  return {
    ...base,
    badLines,
    dropouts: [
      { muscle: first, fromS: at(0.2), toS: at(0.2) + 0.3, mode: 'low_quality' },
      { muscle: first, fromS: at(0.6), toS: at(0.6) + 0.4, mode: 'missing' },
    ],
  };
}

export function benchCalibration(spec: TrialSpec): CalibrationSpec {
  const parsed = parseCalibration(calibrationJson(spec));
  if (!parsed.ok) throw new Error(`bench calibration: ${parsed.problems.join('; ')}`);
  return parsed.spec;
}

/** Each muscle's true sarcomeres in series, by name: what the plain loop is given for the calibration. */
export function benchSarcomeres(spec: TrialSpec): Record<string, number> {
  return Object.fromEntries(spec.muscles.map((m) => [m.name, m.sarcomeresInSeries]));
}

/** Writes one bench trial into `dir`; throws when the file cannot be written. */
export async function writeBenchTrial(dir: string, format: BenchFormat, options: BenchTrialOptions): Promise<BenchTrial> {
  const spec = benchSpec(options);
  const trial = createTrial(spec);
  const path = join(dir, `bench-${Math.round(options.samples)}.${format}`);
  const result = format === 'csv' ? await writeCsv(trial.records({ badLines: 'csv' }), path) : await writeNdjson(trial.records(), path);
  if (!result.ok) throw new Error(result.problem);
  return { path, format, samples: trial.ticks * spec.muscles.length, spec, calibration: benchCalibration(spec), bytes: result.bytes };
}
