/**
 * The bundled demo trials: invented scenarios of our own (the subject and trial codes are made up, the
 * data come from the generator), written by `npm run make-replays` into replays/.
 */
import { mkdir } from 'node:fs/promises';
import { join } from 'node:path';
import { writeFile } from 'node:fs/promises';
import { calibrationJson, createTrial, type Scenario, type TrialSpec } from './gait-generator.ts';
import { scenarioSpec } from './scenarios.ts';
import { writeCsv, writeNdjson, type WriteResult } from './writers.ts';
import { DEMO_STUDY, writeStudy } from './demo-study.ts';

/** One invented subject's trial at 100 Hz, fully calibrated in its header, with what happens in it. */
function demoTrial(scenario: Scenario, seed: number, durationS: number, trial: string, events: Pick<TrialSpec, 'dropouts' | 'markers' | 'badLines'>): TrialSpec {
  return { ...scenarioSpec(scenario, { seed, rateHz: 100, durationS, header: { subject: 'SYN-017', trial, calibrate: 'all' } }), ...events };
}

/** About 60 s of treadmill walking at 100 Hz: a calf and a thigh muscle, one short tracking dropout, bad lines of many kinds. */
export function demoWalkSpec(): TrialSpec {
  return demoTrial('walk', 20_260_101, 60, 'walk-a', {
    dropouts: [
      { muscle: 'calf', fromS: 22.4, toS: 22.75, mode: 'low_quality' },
      { muscle: 'calf', fromS: 22.75, toS: 22.9, mode: 'missing' },
    ],
    markers: [
      { atS: 0, text: 'belt 1.3 m/s' },
      { atS: 59.5, text: 'belt stopping' },
    ],
    badLines: [
      { atS: 5.2, reason: 'not_json', muscle: 'calf' },
      { atS: 9.7, reason: 'schema', muscle: 'thigh' },
      { atS: 14.1, reason: 'out_of_range', muscle: 'calf' },
      { atS: 18.6, reason: 'time_not_increasing', muscle: 'thigh' },
      { atS: 27.05, reason: 'duplicate', muscle: 'calf' },
      { atS: 31.3, reason: 'out_of_range', muscle: 'thigh' },
      { atS: 35.5, reason: 'unknown_event' },
      { atS: 40.2, reason: 'unsafe_key', muscle: 'thigh' },
      { atS: 44.8, reason: 'too_deep' },
      { atS: 50.3, reason: 'line_too_long' },
      { atS: 53.9, reason: 'out_of_range', muscle: 'calf' },
    ],
  });
}

/** About 20 s of treadmill running at 100 Hz, the same two muscles, a brief low-quality stretch, two bad lines. */
export function demoRunSpec(): TrialSpec {
  return demoTrial('run', 20_260_102, 20, 'run-a', {
    dropouts: [{ muscle: 'thigh', fromS: 11.2, toS: 11.5, mode: 'low_quality' }],
    markers: [{ atS: 0, text: 'belt 3.0 m/s' }],
    badLines: [
      { atS: 6.3, reason: 'not_json', muscle: 'thigh' },
      { atS: 15.8, reason: 'duplicate', muscle: 'calf' },
    ],
  });
}

export const DEMO_FILES = {
  walkNdjson: 'demo-walk.ndjson',
  walkCsv: 'demo-walk.csv',
  calibration: 'demo-calibration.json',
  runNdjson: 'demo-run.ndjson',
} as const;

/** Writes every demo file into a folder; deterministic (the same bytes on every run). */
export async function makeReplays(outDir: string): Promise<WriteResult[]> {
  await mkdir(outDir, { recursive: true });
  const walk = createTrial(demoWalkSpec());
  const run = createTrial(demoRunSpec());
  const calPath = join(outDir, DEMO_FILES.calibration);
  const calText = `${JSON.stringify(calibrationJson(walk.spec), null, 2)}\n`;
  let calResult: WriteResult;
  try {
    await writeFile(calPath, calText);
    calResult = { ok: true, path: calPath, lines: calText.split('\n').length - 1, bytes: Buffer.byteLength(calText) };
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code ?? 'unknown error';
    calResult = { ok: false, path: calPath, problem: `cannot write ${calPath} (${code}); check that its folder is writable` };
  }
  return [
    await writeNdjson(walk.records(), join(outDir, DEMO_FILES.walkNdjson)),
    await writeCsv(walk.records({ badLines: 'csv' }), join(outDir, DEMO_FILES.walkCsv)),
    calResult,
    await writeNdjson(run.records(), join(outDir, DEMO_FILES.runNdjson)),
    ...(await writeStudy(join(outDir, 'study'), DEMO_STUDY)),
  ];
}
