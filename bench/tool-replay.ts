/** The tool's whole replay path, as `lengthwise replay FILE --speed max --summary …` runs it. */
import { fileSource } from '../adapters/file-source.ts';
import { paceReplay } from '../src/pipeline/pace-replay.ts';
import { runTrial } from '../src/run/run-trial.ts';
import { summaryJson, type SummaryJson } from '../src/output/summary-json.ts';
import type { CalibrationSpec } from '../src/model/calibration.ts';
import type { DeviceMapping } from '../adapters/device-mapping.ts';

/** The run's summary; the benches time the call (paired.ts timeHere). */
export interface ToolRun {
  readonly summary: SummaryJson;
}

/** Reads, parses, cleans, converts, evaluates, segments and summarizes one file. */
export async function runToolReplay(path: string, calibration?: CalibrationSpec, mapping?: DeviceMapping): Promise<ToolRun> {
  const run = runTrial(fileSource(path, { mapping: mapping ?? null }).pipe(paceReplay('max')), {
    source: path,
    ...(calibration !== undefined ? { calibration } : {}),
  });
  const state = await run.done;
  return { summary: summaryJson(state) };
}
